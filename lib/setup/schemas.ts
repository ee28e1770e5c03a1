import { z } from "zod";
import { boundedDate, multiLine, rowVersion, singleLine } from "@/lib/input-fields";
import { shiftSchema, timeZoneSchema } from "@/lib/process/time-zone";

// Schemas for the admin's set-up of the shop, shared by the API and the forms.

const positive = (what: string) => z.coerce.number({ error: `${what} must be a number` }).positive(`${what} must be more than 0`).finite();
const nonNegative = (what: string) => z.coerce.number({ error: `${what} must be a number` }).min(0, `${what} cannot be negative`).finite();
const name = singleLine().trim().min(1, "Give it a name").max(80, "At most 80 characters");
const ids = z.array(z.string().uuid()).max(50);
export const versionSchema = rowVersion();

/**
 * The PATCH form of a create schema: every field optional and no defaults, so a field the
 * client leaves out stays as it is (zod keeps a default inside `.partial()`).
 */
function patchOf<T extends z.ZodObject>(schema: T): z.ZodType<Partial<z.infer<T>> & { version: number }> {
  const shape = Object.fromEntries(Object.entries(schema.shape).map(([k, v]) => [k, v instanceof z.ZodDefault ? v.unwrap() : v]));
  return z.object(shape).partial().extend({ version: versionSchema }) as unknown as z.ZodType<Partial<z.infer<T>> & { version: number }>;
}

export const printerSchema = z.object({
  name,
  model_note: multiLine().trim().max(200).default(""),
  build_x_mm: positive("Build volume X"),
  build_y_mm: positive("Build volume Y"),
  build_z_mm: positive("Build volume Z"),
  deposition_cm3_per_h: positive("Deposition rate"),
  layer_height_mm: positive("Layer height").max(2, "Layer height above 2 mm is not a real layer"),
  layer_overhead_s: nonNegative("Per-layer overhead").max(600),
  active: z.boolean().default(true),
  material_ids: ids.default([]),
});
export const updatePrinterSchema = patchOf(printerSchema);

export const washStationSchema = z.object({
  name,
  solvent: singleLine().trim().min(1, "Name the solvent").max(120),
  basket_x_mm: positive("Basket X"),
  basket_y_mm: positive("Basket Y"),
  basket_z_mm: positive("Basket Z"),
  capacity_units: z.coerce.number().int("Whole units").positive("At least one unit").max(10000),
  max_load_g: positive("Maximum load"),
  active: z.boolean().default(true),
});
export const updateWashStationSchema = patchOf(washStationSchema);

export const furnaceSchema = z.object({
  name,
  tray_x_mm: positive("Tray X"),
  tray_y_mm: positive("Tray Y"),
  tray_count: z.coerce.number().int("Whole trays").positive("At least one tray").max(100),
  usable_height_mm: positive("Usable height"),
  max_load_g: positive("Maximum load"),
  max_cool_rate_c_per_min: positive("Maximum cooling rate"),
  active: z.boolean().default(true),
  profile_ids: ids.default([]),
});
export const updateFurnaceSchema = patchOf(furnaceSchema);

export const materialSchema = z
  .object({
    code: singleLine().trim().min(1, "Give it a short code").max(20).regex(/^[A-Za-z0-9.+-]+$/, "Letters, digits, '.', '+' and '-' only"),
    name,
    alloy_family: singleLine().trim().min(1, "Name the alloy family").max(80),
    shrink_xy: z.coerce.number().gt(0, "Shrinkage must be above 0").lt(0.5, "Shrinkage must be below 0.5 (50 %)"),
    shrink_z: z.coerce.number().gt(0, "Shrinkage must be above 0").lt(0.5, "Shrinkage must be below 0.5 (50 %)"),
    green_density_g_cm3: positive("Green density"),
    sintered_density_g_cm3: positive("Sintered density"),
    theoretical_density_g_cm3: positive("Theoretical density"),
    solids_loading: z.coerce.number().gt(0, "Solids loading must be above 0").lt(1, "Solids loading must be below 1"),
    binder_density_g_cm3: positive("Binder density"),
    wash_k_min_per_mm2: positive("Wash constant k"),
    wash_min_minutes: nonNegative("Minimum wash time"),
    min_mass_loss: z.coerce.number().gt(0, "Minimum mass loss must be above 0").lt(1, "Minimum mass loss must be below 1"),
    default_profile_id: z.string().uuid().nullable().default(null),
    active: z.boolean().default(true),
  });
export const updateMaterialSchema = patchOf(materialSchema);

export const maintenanceWindowSchema = z
  .object({
    resource: z.enum(["printer", "wash_station", "furnace"]),
    resource_id: z.string().uuid("Choose the equipment"),
    starts_at: boundedDate("Give a start time"),
    ends_at: boundedDate("Give an end time"),
    reason: multiLine().trim().max(200).default(""),
  })
  .refine((w) => w.starts_at < w.ends_at, { message: "The window must end after it starts", path: ["ends_at"] });

/** GET /api/maintenance-windows?from&to: a week back to two months ahead unless given. */
export const maintenanceWindowQuerySchema = z
  .object({
    from: z.coerce.date({ error: "from must be a date" }).default(() => new Date(Date.now() - 7 * 86_400_000)),
    to: z.coerce.date({ error: "to must be a date" }).default(() => new Date(Date.now() + 60 * 86_400_000)),
  })
  .refine((q) => q.from < q.to, { message: "from must be before to", path: ["to"] });

export const shopSettingsSchema = z.object({
  shop_name: name,
  time_zone: timeZoneSchema,
  staffed_hours: z.array(shiftSchema).max(50),
  drying_minutes: z.coerce.number().int().min(0).max(7 * 24 * 60),
  finishing_lead_minutes: z.coerce.number().int().min(0).max(60 * 24 * 60),
  at_risk_margin_minutes: z.coerce.number().int().min(0).max(60 * 24 * 60),
  plate_clearance_mm: nonNegative("Plate clearance").max(100),
  tray_clearance_mm: nonNegative("Tray clearance").max(100),
  version: versionSchema,
});

export type PrinterInput = z.infer<typeof printerSchema>;
export type WashStationInput = z.infer<typeof washStationSchema>;
export type FurnaceInput = z.infer<typeof furnaceSchema>;
export type MaterialInput = z.infer<typeof materialSchema>;
export type ShopSettingsInput = z.infer<typeof shopSettingsSchema>;
