import { z } from "zod";
import { YEAR_MESSAGE, inPlanningYears, multiLine, rowVersionNumber, singleLine } from "@/lib/input-fields";
import { DEFAULT_ORDER_PRIORITY } from "@/lib/auth/permissions";

// Orders, parts and units: one set of schemas for the API, the forms and the CSV import.
// Form fields arrive as strings and JSON as numbers, so numeric fields take either; an empty
// field means "not given" (and fails where a value is required).

const toNumber = (v: unknown) => {
  if (typeof v === "string") {
    const t = v.trim().replace(",", ".");
    return t === "" ? undefined : Number(t);
  }
  return v === null ? undefined : v;
};
const toNullableNumber = (v: unknown) => {
  const n = toNumber(v);
  return n === undefined ? null : n;
};
const blankToNull = (v: unknown) => (typeof v === "string" && v.trim() === "" ? null : v === undefined ? null : v);

const NUMBER = "enter a number";

export const lengthMm = (label = "a length") =>
  z.preprocess(toNumber, z.number({ error: NUMBER }).finite(NUMBER).positive(`${label} must be greater than 0 mm`).max(5000, "more than 5 m: check the unit"));
export const stockMm = z.preprocess(
  (v) => toNumber(v) ?? 0,
  z.number({ error: NUMBER }).finite(NUMBER).min(0, "stock cannot be negative").max(25, "more than 25 mm of stock: check the value"),
);
export const optionalPositive = (label: string, max: number) =>
  z.preprocess(toNullableNumber, z.number({ error: NUMBER }).finite(NUMBER).positive(`${label} must be greater than 0`).max(max).nullable());

const text = (max: number) => singleLine().trim().max(max, `at most ${max} characters`);
const notesText = (max: number) => multiLine().trim().max(max, `at most ${max} characters`);
const required = (label: string, max: number) => singleLine({ error: `${label} is required` }).trim().min(1, `${label} is required`).max(max, `at most ${max} characters`);

/** Accepts an ISO instant or a calendar date (taken as the end of that day, UTC). */
export const dueAtSchema = z.preprocess(
  (v) => {
    if (typeof v !== "string") return v;
    const t = v.trim();
    if (/^\d{4}-\d{2}-\d{2}$/.test(t)) return new Date(`${t}T23:59:00Z`);
    if (t === "") return undefined;
    return new Date(t);
  },
  z.date({ error: "enter a date (YYYY-MM-DD)" }).refine((d) => !Number.isNaN(d.getTime()), "enter a date (YYYY-MM-DD)").refine((d) => inPlanningYears(d.getTime()), YEAR_MESSAGE),
);

export const prioritySchema = z.preprocess(
  (v) => toNumber(v) ?? DEFAULT_ORDER_PRIORITY,
  z.number({ error: NUMBER }).int("a whole number from 1 to 5").min(1, "1 (most urgent) to 5").max(5, "1 (most urgent) to 5"),
);

export const versionSchema = z.preprocess(toNumber, rowVersionNumber("the row's version is required"));

export const createOrderSchema = z.object({
  code: required("Work order number", 40).regex(/^[A-Za-z0-9][A-Za-z0-9._/-]*$/, "letters, digits and . _ / - only"),
  customer: required("Customer", 120),
  project: text(120).default(""),
  due_at: dueAtSchema,
  priority: prioritySchema,
  notes: notesText(2000).default(""),
});
export type CreateOrderInput = z.input<typeof createOrderSchema>;
export type CreateOrder = z.output<typeof createOrderSchema>;

export const updateOrderSchema = createOrderSchema.partial().extend({ version: versionSchema });
export type UpdateOrder = z.output<typeof updateOrderSchema>;

export const TOLERANCE_GRADE = /^IT([0-9]|1[0-8])$/;

const partFields = {
  part_number: required("Part number", 60),
  revision: text(12).default("A").transform((r) => r || "A"),
  name: required("Name", 120),
  material_id: singleLine({ error: "choose a material" }).uuid("choose a material"),
  quantity: z.preprocess(toNumber, z.number({ error: NUMBER }).int("a whole number").min(1, "at least 1").max(500, "at most 500 units per part")),
  nominal_x_mm: lengthMm("X"),
  nominal_y_mm: lengthMm("Y"),
  nominal_z_mm: lengthMm("Z"),
  thickest_wall_mm: lengthMm("the thickest wall").pipe(z.number().max(100, "walls over 100 mm do not wash out")),
  stock_x_neg_mm: stockMm,
  stock_x_pos_mm: stockMm,
  stock_y_neg_mm: stockMm,
  stock_y_pos_mm: stockMm,
  stock_z_neg_mm: stockMm,
  stock_z_pos_mm: stockMm,
  finishing_notes: notesText(2000).default(""),
  target_ra_um: optionalPositive("Ra", 50),
  tolerance_um: optionalPositive("the tolerance", 5000),
  tolerance_grade: z.preprocess(
    blankToNull,
    singleLine().trim().toUpperCase().regex(TOLERANCE_GRADE, "an ISO 286-1 grade, IT0 to IT18").nullable(),
  ),
};

export const partBodySchema = z.object(partFields);

export const createPartSchema = z.object({ order_id: singleLine({ error: "choose an order" }).uuid("choose an order"), ...partFields });
export type CreatePartInput = z.input<typeof createPartSchema>;
export type CreatePart = z.output<typeof createPartSchema>;

export const updatePartSchema = partBodySchema.partial().extend({ version: versionSchema });
export type UpdatePart = z.output<typeof updatePartSchema>;

/** The form edits every field at once; the API also takes a partial update. */
export const partFormSchema = createPartSchema;

// Lists ----------------------------------------------------------------------------------------

const pageSchema = {
  page: z.preprocess((v) => toNumber(v) ?? 1, z.number().int().min(1).max(100_000)),
  page_size: z.preprocess((v) => toNumber(v) ?? 25, z.number().int().min(1).max(200)),
  search: singleLine().trim().max(100).optional(),
  dir: z.enum(["asc", "desc"]).default("asc"),
};

export const ORDER_SORTS = ["code", "customer", "due_at", "priority", "created_at"] as const;
export const listOrdersSchema = z.object({ ...pageSchema, sort: z.enum(ORDER_SORTS).default("due_at") });
export type ListOrders = z.output<typeof listOrdersSchema>;

export const PART_SORTS = ["part_number", "name", "order_code", "material_code", "quantity", "due_at", "created_at"] as const;
export const listPartsSchema = z.object({
  ...pageSchema,
  sort: z.enum(PART_SORTS).default("due_at"),
  order_id: z.string().uuid().optional(),
  material_id: z.string().uuid().optional(),
});
export type ListParts = z.output<typeof listPartsSchema>;

export const UNIT_STATES = [
  "planned", "printing", "green", "washing", "brown", "sintering", "sintered",
  "ready_for_finishing", "finishing", "done", "on_hold", "scrapped",
] as const;
export type UnitState = (typeof UNIT_STATES)[number];

export const UNIT_SORTS = ["serial", "state", "part_number", "due_at", "material_code", "state_changed_at"] as const;
export const listUnitsSchema = z.object({
  ...pageSchema,
  sort: z.enum(UNIT_SORTS).default("due_at"),
  state: z.enum(UNIT_STATES).optional(),
  part_id: z.string().uuid().optional(),
  order_id: z.string().uuid().optional(),
  material_id: z.string().uuid().optional(),
  /** Only units not yet on a build (what can be grouped into a new one). */
  unbuilt: z.preprocess((v) => v === "true" || v === "1" || v === true, z.boolean()).optional(),
});
export type ListUnits = z.output<typeof listUnitsSchema>;

// CSV import -------------------------------------------------------------------------------------

/** Columns of the import file, in the order the template lists them. */
export const CSV_COLUMNS = [
  "order_code", "customer", "project", "due_date", "priority",
  "part_number", "revision", "name", "material", "quantity",
  "nominal_x_mm", "nominal_y_mm", "nominal_z_mm", "thickest_wall_mm",
  "stock_x_neg_mm", "stock_x_pos_mm", "stock_y_neg_mm", "stock_y_pos_mm", "stock_z_neg_mm", "stock_z_pos_mm",
  "finishing_notes", "target_ra_um", "tolerance_um", "tolerance_grade",
] as const;
export const CSV_REQUIRED = ["order_code", "customer", "due_date", "part_number", "name", "material", "quantity", "nominal_x_mm", "nominal_y_mm", "nominal_z_mm", "thickest_wall_mm"] as const;

/** One CSV row: the order's and the part's fields, the material by its code. */
export const csvRowSchema = z.object({
  order_code: createOrderSchema.shape.code,
  customer: createOrderSchema.shape.customer,
  project: text(120).default(""),
  due_date: dueAtSchema,
  priority: prioritySchema,
  ...partFields,
  material: required("Material", 40),
  // filled in from the material code on the server
  material_id: z.string().uuid().optional(),
});
export type CsvRow = z.output<typeof csvRowSchema>;

export const importSchema = z.object({
  rows: z.array(z.record(z.string(), z.unknown())).min(1, "the file has no rows").max(2000, "at most 2,000 rows per import"),
  /** all: nothing is imported when any row is invalid; valid_only: the valid rows are. */
  mode: z.enum(["all", "valid_only"]).default("all"),
  dry_run: z.boolean().default(false),
});
export type ImportRequest = z.output<typeof importSchema>;

export type RowResult = { row: number; ok: boolean; errors: Record<string, string[]>; order_code?: string; part_number?: string; creates_order?: boolean };
