import { z } from "zod";
import { boundedInstant } from "@/lib/input-fields";

const instant = boundedInstant("an ISO 8601 time with its offset");

/** The most the floor loads at once: a little over a month, enough for any view with margin. */
export const MAX_WINDOW_DAYS = 45;

export const floorWindowSchema = z
  .object({ from: instant, to: instant })
  .refine((w) => Date.parse(w.to) > Date.parse(w.from), { message: "the window must end after it starts", path: ["to"] })
  .refine((w) => Date.parse(w.to) - Date.parse(w.from) <= MAX_WINDOW_DAYS * 86_400_000, {
    message: `at most ${MAX_WINDOW_DAYS} days at once`,
    path: ["to"],
  });
export type FloorWindow = z.output<typeof floorWindowSchema>;

export const proposePlanSchema = z.object({
  /** Plan only these builds; all unscheduled builds when absent. */
  build_ids: z.array(z.string().uuid()).max(2000).optional(),
  /** Earliest start; now when absent. */
  from: instant.optional(),
  /** Time the planner's search may take, ms. */
  budget_ms: z.coerce.number().int().min(200).max(30_000).default(2_000),
});

export const decidePlanSchema = z.object({ decision: z.enum(["apply", "refuse"], { error: "decision must be apply or refuse" }) });

export type ResourceKind = "printer" | "wash_station" | "furnace";

export type FloorResource = {
  id: string;
  kind: ResourceKind;
  title: string;
  group: string;
  /** Only printers take drops until the batching board makes the other lanes interactive. */
  editable: boolean;
  build_x_mm?: number;
  build_y_mm?: number;
  build_z_mm?: number;
  material_ids?: string[];
  /** Furnaces: the sinter profiles they run (a run may only move to one of these). */
  profile_ids?: string[];
};

export type FloorEvent = {
  id: string;
  kind: "build" | "wash_batch" | "furnace_run";
  resource_id: string;
  title: string;
  start: string;
  end: string;
  state: string;
  version: number;
  editable: boolean;
  material_code?: string;
  material_id?: string;
  failed?: boolean;
  unit_count?: number;
  /** Furnace runs: their sinter profile. */
  profile_id?: string;
};

export type FloorBlock = { id: string; resource_id: string; start: string; end: string; reason: string };

export type UnscheduledBuild = {
  id: string;
  code: string;
  version: number;
  material_id: string;
  material_code: string;
  unit_count: number;
  due_at: string | null;
  /** Printers that can take it, with their print time; the rest with the reason. */
  printers: { printer_id: string; ok: boolean; est_minutes: number | null; reason: string | null }[];
};

export type FloorData = {
  from: string;
  to: string;
  resources: FloorResource[];
  events: FloorEvent[];
  blocks: FloorBlock[];
  /** Changes when any booking in the shop changes: the client refetches when it moves. */
  stamp: string;
};
