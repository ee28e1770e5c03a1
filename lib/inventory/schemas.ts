import { z } from "zod";
import { calendarDay, multiLine, rowVersion, singleLine } from "@/lib/input-fields";
import { LOT_STATES } from "./lots";

// Schemas for feedstock lots and consumables, shared by the API, the forms and the CSV import.

const text = (what: string, max: number) =>
  singleLine({ error: `${what} must be text` }).trim().min(1, `${what} is required`).max(max, `${what}: at most ${max} characters`);
const optionalText = (max: number) => singleLine().trim().max(max, `at most ${max} characters`).default("");
const notes = (max: number) => multiLine().trim().max(max, `at most ${max} characters`);
const isoDay = calendarDay;
/** Kilograms as people type them; stored as grams. Up to 10 t per lot. */
const kg = (what: string) =>
  z.coerce.number({ error: `${what} must be a number` }).finite(`${what} must be a number`).positive(`${what} must be more than 0 kg`).max(10_000, `${what}: at most 10 000 kg per lot`);
export const versionSchema = rowVersion();

export const receiveLotSchema = z
  .object({
    material_id: z.string().uuid("Choose a material"),
    supplier: text("Supplier", 120),
    supplier_lot: text("Supplier's lot number", 80),
    form_id: z.string().uuid("Choose a form").nullish(),
    received_on: isoDay("Received"),
    expires_on: isoDay("Expires").nullish(),
    quantity_kg: kg("Quantity"),
    storage_notes: notes(500).default(""),
  })
  .refine((v) => !v.expires_on || v.expires_on >= v.received_on, { path: ["expires_on"], message: "Expires before it was received" });
export type ReceiveLot = z.infer<typeof receiveLotSchema>;

/** One row of a receiving CSV: the material by its code and the form by its name. */
export const lotCsvRowSchema = z.object({
  material: text("material", 40),
  supplier: text("supplier", 120),
  supplier_lot: text("supplier_lot", 80),
  form: optionalText(60),
  received_on: isoDay("received_on"),
  expires_on: z.union([isoDay("expires_on"), z.literal("")]).default(""),
  quantity_kg: kg("quantity_kg"),
  storage_notes: notes(500).default(""),
});
export type LotCsvRow = z.infer<typeof lotCsvRowSchema>;

export const updateLotSchema = z.object({
  version: versionSchema,
  state: z.enum(LOT_STATES as [string, ...string[]]).optional(),
  reason: optionalText(300),
  storage_notes: notes(500).optional(),
  expires_on: isoDay("Expires").nullish(),
  /** A count of what is left on the shelf (e.g. a weighed spool), in kg. */
  remaining_kg: z.coerce.number().finite().min(0, "Remaining cannot be negative").max(10_000).optional(),
});
export type UpdateLot = z.infer<typeof updateLotSchema>;

export const recallSchema = z.object({ version: versionSchema, reason: text("Reason", 300) });

export const listLotsQuerySchema = z.object({
  material_id: z.string().uuid().optional(),
  state: z.enum(LOT_STATES as [string, ...string[]]).optional(),
  q: singleLine().trim().max(80).optional(),
});

export const projectionQuerySchema = z.object({ days: z.coerce.number().int().min(1).max(90).default(28) });

export const formSchema = z.object({ name: text("Name", 60) });

export const materialInventorySchema = z.object({
  version: versionSchema,
  support_allowance: z.coerce.number().finite().min(0).max(4.99),
  purge_g: z.coerce.number().finite().min(0).max(100_000),
  reorder_point_kg: z.coerce.number().finite().min(0).max(100_000),
  lead_time_days: z.coerce.number().int().min(0).max(365),
});

export const gasCountSchema = z.object({ gas: text("Gas", 60), on_hand_l: z.coerce.number().finite().min(0).max(1e9), note: notes(300).default("") });
export const bathChangeSchema = z.object({ version: versionSchema, note: notes(300).default("") });

/** ?version= on a certificate upload: the lot as the person loaded it (optional). */
export const certificateQuerySchema = z.object({ version: versionSchema.optional() });
