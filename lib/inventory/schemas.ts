import { z } from "zod";
import { LOT_STATES } from "./lots";

// Schemas for feedstock lots and consumables, shared by the API, the forms and the CSV import.

const text = (what: string, max: number) =>
  z
    .string({ error: `${what} must be text` })
    .trim()
    .min(1, `${what} is required`)
    .max(max, `${what}: at most ${max} characters`)
    .refine((s) => !/[\u0000-\u0008\u000b\u000c\u000e-\u001f\u007f]/.test(s), `${what} contains control characters`);
const optionalText = (max: number) =>
  z
    .string()
    .trim()
    .max(max, `at most ${max} characters`)
    .refine((s) => !/[\u0000-\u0008\u000b\u000c\u000e-\u001f\u007f]/.test(s), "contains control characters")
    .default("");
const isoDay = (what: string) =>
  z
    .string({ error: `${what} must be a date` })
    .regex(/^\d{4}-\d{2}-\d{2}$/, `${what} must be a date (YYYY-MM-DD)`)
    .refine((d) => !Number.isNaN(Date.parse(`${d}T00:00:00Z`)) && new Date(`${d}T00:00:00Z`).toISOString().startsWith(d), `${what} is not a real date`)
    .refine((d) => d >= "2000-01-01" && d <= "2100-12-31", `${what} must be between 2000 and 2100`);
/** Kilograms as people type them; stored as grams. Up to 10 t per lot. */
const kg = (what: string) =>
  z.coerce.number({ error: `${what} must be a number` }).finite(`${what} must be a number`).positive(`${what} must be more than 0 kg`).max(10_000, `${what}: at most 10 000 kg per lot`);
export const versionSchema = z.coerce.number().int().positive().max(2_147_483_647);

export const receiveLotSchema = z
  .object({
    material_id: z.string().uuid("Choose a material"),
    supplier: text("Supplier", 120),
    supplier_lot: text("Supplier's lot number", 80),
    form_id: z.string().uuid("Choose a form").nullish(),
    received_on: isoDay("Received"),
    expires_on: isoDay("Expires").nullish(),
    quantity_kg: kg("Quantity"),
    storage_notes: optionalText(500),
    certificate_file_id: z.string().uuid().nullish(),
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
  storage_notes: optionalText(500),
});
export type LotCsvRow = z.infer<typeof lotCsvRowSchema>;

export const updateLotSchema = z.object({
  version: versionSchema,
  state: z.enum(LOT_STATES as [string, ...string[]]).optional(),
  reason: optionalText(300),
  storage_notes: z.string().trim().max(500).optional(),
  expires_on: isoDay("Expires").nullish(),
  certificate_file_id: z.string().uuid().nullish(),
  /** A count of what is left on the shelf (e.g. a weighed spool), in kg. */
  remaining_kg: z.coerce.number().finite().min(0, "Remaining cannot be negative").max(10_000).optional(),
});
export type UpdateLot = z.infer<typeof updateLotSchema>;

export const recallSchema = z.object({ version: versionSchema, reason: text("Reason", 300) });

export const listLotsQuerySchema = z.object({
  material_id: z.string().uuid().optional(),
  state: z.enum(LOT_STATES as [string, ...string[]]).optional(),
  q: z.string().trim().max(80).optional(),
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

export const gasCountSchema = z.object({ gas: text("Gas", 60), on_hand_l: z.coerce.number().finite().min(0).max(1e9), note: optionalText(300) });
export const bathChangeSchema = z.object({ version: versionSchema, note: optionalText(300) });
