// The batching board's data, as the API sends it and the board draws it. Times are ISO strings,
// lengths mm, masses g, durations minutes; names follow the database columns.

import type { TrayRun } from "@/lib/packing/types";

export type UnitState =
  | "planned"
  | "printing"
  | "green"
  | "washing"
  | "brown"
  | "sintering"
  | "sintered"
  | "ready_for_finishing"
  | "finishing"
  | "done"
  | "on_hold"
  | "scrapped";

export type BookingState = "draft" | "scheduled" | "running" | "complete" | "cancelled";

export type MassSource = "brown" | "green" | "estimate";

export interface BoardUnit {
  id: string;
  serial: string;
  version: number;
  state: UnitState;
  part_id: string;
  part_number: string;
  part_name: string;
  order_code: string;
  due_at: string;
  priority: number;
  material_id: string;
  material_code: string;
  /** The material's default sinter profile (null when the material has none). */
  profile_id: string | null;
  /** Every profile that lists this unit's material as compatible. */
  compatible_profile_ids: string[];
  green_x_mm: number;
  green_y_mm: number;
  green_z_mm: number;
  /** Best mass known for load limits: brown weighing, else green weighing, else an estimate. */
  mass_g: number;
  mass_source: MassSource;
  green_mass_g: number | null;
  brown_mass_g: number | null;
  wash_passed: boolean | null;
  min_mass_loss: number;
  thickest_wall_mm: number;
  wash_minutes: number;
  wash_k_min_per_mm2: number;
  wash_min_minutes: number;
  wash_batch_id: string | null;
  furnace_run_id: string | null;
  /** When the unit is (or will be) brown: now for brown units, the wash end plus drying for washing ones. */
  ready_at: string | null;
  /** Projected due date minus projected completion, minutes (negative = late). */
  slack_minutes: number;
  projection_status: "on_time" | "at_risk" | "late";
  hold_reason: string | null;
}

export interface BoardStation {
  id: string;
  name: string;
  solvent: string;
  basket_x_mm: number;
  basket_y_mm: number;
  basket_z_mm: number;
  capacity_units: number;
  max_load_g: number;
}

export interface BoardFurnace {
  id: string;
  name: string;
  tray_x_mm: number;
  tray_y_mm: number;
  tray_count: number;
  usable_height_mm: number;
  max_load_g: number;
  max_cool_rate_c_per_min: number;
  profile_ids: string[];
}

export interface ProfileSegmentRow {
  position: number;
  rate_c_per_min: number;
  setpoint_c: number;
  hold_min: number;
}

export interface BoardProfile {
  id: string;
  code: string;
  revision: number;
  /** "code r2": unique, used in messages and by the packer. */
  label: string;
  name: string;
  atmosphere: string;
  start_temp_c: number;
  cool_rate_c_per_min: number;
  cool_to_c: number;
  material_ids: string[];
  segments: ProfileSegmentRow[];
}

export interface BoardMaterial {
  id: string;
  code: string;
  name: string;
  default_profile_id: string | null;
  min_mass_loss: number;
}

export interface BoardWashBatch {
  id: string;
  code: string;
  state: BookingState;
  version: number;
  wash_station_id: string;
  starts_at: string | null;
  ends_at: string | null;
  est_minutes: number | null;
  started_at: string | null;
  finished_at: string | null;
  units: BoardUnit[];
}

export interface BoardFurnaceRun {
  id: string;
  code: string;
  state: BookingState;
  version: number;
  furnace_id: string;
  profile_id: string;
  starts_at: string | null;
  ends_at: string | null;
  cycle_minutes: number | null;
  tray_layout: TrayRun | null;
  units: BoardUnit[];
}

/** A wash in the solvent or a run in (or just out of) the furnace: where masses and unloads are recorded. */
export interface BoardActive {
  kind: "wash_batch" | "furnace_run";
  id: string;
  code: string;
  state: BookingState;
  resource_name: string;
  starts_at: string | null;
  ends_at: string | null;
  unit_count: number;
  /** A finished run still waiting for its unload to be recorded, or a wash waiting for its weighings. */
  needs: "unload" | "weighing" | null;
}

export interface Board {
  now: string;
  time_zone: string;
  clearance_mm: number;
  drying_minutes: number;
  /** Green units not in an open wash batch. */
  wash_waiting: BoardUnit[];
  /** Brown and soon-brown (washing, not failed) units not in an open furnace run. */
  furnace_waiting: BoardUnit[];
  /**
   * How many wait in all: the lists above hold the most at risk only (BOARD_WAITING_LIMIT each),
   * since a card per unit of thousands helps nobody drag and costs every open board megabytes.
   */
  wash_waiting_total: number;
  furnace_waiting_total: number;
  wash_batches: BoardWashBatch[];
  furnace_runs: BoardFurnaceRun[];
  /** Running washes and runs, and finished runs not unloaded yet. */
  active: BoardActive[];
  stations: BoardStation[];
  furnaces: BoardFurnace[];
  profiles: BoardProfile[];
  materials: BoardMaterial[];
}

/** The run page: the run, its furnace and profile, the temperature curve and what happened. */
export type RunDetail = {
  run: BoardFurnaceRun;
  furnace: BoardFurnace;
  profile: BoardProfile;
  curve: { minute: number; temp_c: number; phase: string }[];
  cycle: { total_minutes: number };
  checklist: Record<string, unknown> | null;
  loaded_at: string | null;
  unloaded_at: string | null;
  outcomes: { unit_id: string; serial: string; state: string; scrap_reason: string | null; scrap_note: string | null }[];
  now: string;
  time_zone: string;
  clearance_mm: number;
  profiles: BoardProfile[];
};
