// Planning instances: one planning problem as JSON, without a database. The benchmark reads
// folders of them and the app can export its own state in the same shape. Lengths in mm, masses
// in g, durations in minutes, times ISO 8601 (UTC in practice). Unknown fields are stripped, so
// files may carry notes such as a known optimum.

import { z } from "zod";
import { staffedHoursSchema } from "./staffed-hours";

const id = z.string().min(1);
const positive = z.number().positive().finite();
const isoTime = z.iso.datetime({ offset: true });

export const furnaceSchema = z.object({
  id,
  tray_mm: z.tuple([positive, positive]),
  tray_count: z.number().int().min(1),
  usable_height_mm: positive,
  max_load_g: positive,
  profiles: z.array(id).min(1),
});

export const furnaceUnitSchema = z.object({
  id,
  profile: id,
  footprint_mm: z.tuple([positive, positive]),
  height_mm: positive,
  mass_g: z.number().nonnegative().finite(),
  due: isoTime,
});

export const furnaceRunsInstanceSchema = z.object({
  kind: z.literal("furnace-runs"),
  name: z.string().min(1),
  clearance_mm: z.number().nonnegative().finite(),
  furnaces: z.array(furnaceSchema).min(1),
  units: z.array(furnaceUnitSchema),
});

export const blockedWindowSchema = z
  .object({ start: isoTime, end: isoTime })
  .refine((w) => Date.parse(w.end) > Date.parse(w.start), { message: "a blocked window must end after it starts" });

export const printerSchema = z.object({
  id,
  materials: z.array(id).min(1),
  build_volume_mm: z.tuple([positive, positive, positive]),
  /** Absent: available from `now`. */
  available_from: isoTime.optional(),
  blocked: z.array(blockedWindowSchema).default([]),
});

export const buildSchema = z.object({
  id,
  material: id,
  size_mm: z.tuple([positive, positive, positive]),
  duration_min: positive,
  due: isoTime,
});

export const printerPlanInstanceSchema = z.object({
  kind: z.literal("printer-plan"),
  name: z.string().min(1),
  now: isoTime,
  printers: z.array(printerSchema).min(1),
  builds: z.array(buildSchema),
  /** Optional shop setting (not part of the exchange format): builds may only start in these hours. */
  staffed_hours: staffedHoursSchema.optional(),
});

export const planningInstanceSchema = z.discriminatedUnion("kind", [
  furnaceRunsInstanceSchema,
  printerPlanInstanceSchema,
]);

export type FurnaceSpec = z.infer<typeof furnaceSchema>;
export type FurnaceUnit = z.infer<typeof furnaceUnitSchema>;
export type FurnaceRunsInstance = z.infer<typeof furnaceRunsInstanceSchema>;
export type BlockedWindow = z.infer<typeof blockedWindowSchema>;
export type PrinterSpec = z.infer<typeof printerSchema>;
export type PrinterSpecInput = z.input<typeof printerSchema>;
export type BuildSpec = z.infer<typeof buildSchema>;
export type PrinterPlanInstance = z.infer<typeof printerPlanInstanceSchema>;
export type PrinterPlanInstanceInput = z.input<typeof printerPlanInstanceSchema>;
export type PlanningInstance = z.infer<typeof planningInstanceSchema>;
