import { z } from "zod";
import { dueAtSchema, lengthMm, optionalPositive, stockMm, versionSchema } from "@/lib/parts/schemas";

// Quotes: the API's bodies and the settings form. Numbers arrive as JSON numbers or form text.

export const QUOTE_STATUSES = ["draft", "sent", "accepted", "declined", "expired"] as const;
export type QuoteStatus = (typeof QUOTE_STATUSES)[number];

const uuid = z.uuid("choose one from the list");
const required = (label: string, max: number) => z.string({ error: `${label} is required` }).trim().min(1, `${label} is required`).max(max, `at most ${max} characters`);

export const createQuoteSchema = z.object({
  customer: required("Customer", 200),
  contact_email: z.email("enter an e-mail address").max(254),
  notes: z.string().trim().max(2000).default(""),
  valid_until: dueAtSchema.optional(),
});
export type CreateQuote = z.infer<typeof createQuoteSchema>;

export const updateQuoteSchema = createQuoteSchema.partial().extend({ version: versionSchema });
export type UpdateQuote = z.infer<typeof updateQuoteSchema>;

const quantity = z.preprocess(
  (v) => (typeof v === "string" && v.trim() !== "" ? Number(v) : v),
  z.number({ error: "enter a whole number" }).int("a whole number").min(1, "at least 1").max(10_000, "at most 10 000 per line"),
);

/** A line: an existing part, or an uploaded STL (its file, once analysed) with its material. */
export const addLineSchema = z
  .object({
    version: versionSchema,
    part_id: uuid.optional(),
    file_id: uuid.optional(),
    name: z.string().trim().max(200).optional(),
    material_id: uuid.optional(),
    quantity,
    thickest_wall_mm: lengthMm("the thickest wall").optional(),
    stock_x_neg_mm: stockMm, stock_x_pos_mm: stockMm, stock_y_neg_mm: stockMm,
    stock_y_pos_mm: stockMm, stock_z_neg_mm: stockMm, stock_z_pos_mm: stockMm,
    target_ra_um: optionalPositive("Ra", 50).optional(),
    tolerance_um: optionalPositive("the tolerance", 5000).optional(),
    requested_at: dueAtSchema.optional(),
  })
  .superRefine((v, ctx) => {
    if (!v.part_id === !v.file_id) ctx.addIssue({ code: "custom", path: ["part_id"], message: "choose an existing part or upload an STL (one of the two)" });
    if (v.file_id && !v.material_id) ctx.addIssue({ code: "custom", path: ["material_id"], message: "choose the material" });
  });
export type AddLine = z.infer<typeof addLineSchema>;

export const removeLineSchema = z.object({ version: versionSchema });

export const quoteActionSchema = z.discriminatedUnion("action", [
  z.object({ action: z.literal("send"), version: versionSchema }),
  z.object({ action: z.literal("accept"), version: versionSchema }),
  z.object({ action: z.literal("decline"), version: versionSchema, reason: z.string().trim().max(500).default("") }),
  z.object({ action: z.literal("reprice"), version: versionSchema }),
]);
export type QuoteAction = z.infer<typeof quoteActionSchema>;

export const capableQuerySchema = z.object({ by: dueAtSchema });

const minor = z.preprocess((v) => (typeof v === "string" && v.trim() !== "" ? Number(v) : v), z.number({ error: "enter a whole number of minor units" }).int().min(0).max(1e12));
const positive = z.preprocess((v) => (typeof v === "string" && v.trim() !== "" ? Number(v) : v), z.number({ error: "enter a number" }).finite().positive());
const nonNeg = z.preprocess((v) => (typeof v === "string" && v.trim() !== "" ? Number(v) : v), z.number({ error: "enter a number" }).finite().min(0));
const bp = z.preprocess((v) => (typeof v === "string" && v.trim() !== "" ? Number(v) : v), z.number({ error: "enter a whole number" }).int().min(0).max(100_000));

export const quoteSettingsSchema = z.object({
  version: versionSchema,
  currency: z.string().trim().toUpperCase().regex(/^[A-Z]{3}$/, "a three-letter ISO 4217 code"),
  minor_digits: z.preprocess((v) => (typeof v === "string" ? Number(v) : v), z.number().int().min(0).max(3)),
  printer_rate_minor_per_h: minor,
  wash_batch_cost_minor: minor,
  wash_batch_volume_cm3: positive,
  furnace_run_cost_minor: minor,
  furnace_gas_cost_minor: minor,
  furnace_energy_cost_minor: minor,
  finishing_rate_minor_per_h: minor,
  finishing_min_per_cm2: nonNeg,
  inspection_rate_minor_per_h: minor,
  inspection_min_per_unit: nonNeg,
  setup_minor_per_order: minor,
  overhead_bp: bp,
  margin_bp: bp,
  fallback_yield: z.preprocess((v) => (typeof v === "string" ? Number(v) : v), z.number().gt(0).max(1)),
  validity_days: z.preprocess((v) => (typeof v === "string" ? Number(v) : v), z.number().int().min(1).max(365)),
});
export type QuoteSettingsInput = z.infer<typeof quoteSettingsSchema>;

export const materialRateSchema = z.object({
  material_id: uuid,
  feedstock_minor_per_kg: minor,
  infill_fraction: z.preprocess((v) => (typeof v === "string" ? Number(v) : v), z.number().gt(0).max(1)),
  support_fraction: z.preprocess((v) => (typeof v === "string" ? Number(v) : v), z.number().min(0).max(2)),
});
export type MaterialRateInput = z.infer<typeof materialRateSchema>;

// A machine's own rate; an empty field (or null) leaves that figure to the shop's rate.
const minorOrShop = z.preprocess(
  (v) => (v === "" || v === undefined ? null : typeof v === "string" && v.trim() !== "" ? Number(v) : v),
  z.number({ error: "enter a whole number of minor units, or leave empty for the shop's rate" }).int("a whole number of minor units").min(0, "at least 0").max(1e12).nullable(),
);

export const equipmentRateSchema = z.discriminatedUnion("kind", [
  z.object({ kind: z.literal("printer"), printer_id: uuid, rate_minor_per_h: minorOrShop }),
  z.object({ kind: z.literal("furnace"), furnace_id: uuid, run_cost_minor: minorOrShop, gas_cost_minor: minorOrShop, energy_cost_minor: minorOrShop }),
]);
export type EquipmentRateInput = z.infer<typeof equipmentRateSchema>;
