import type { MaterialCalibration, ShrinkageSuggestion } from "@/lib/process/calibration";
import type { MassLossCheck } from "@/lib/process/wash";
import type { CalibrationPoint, RejectedReading } from "./calibration";
import type { PartForFinishing, StockCheck, ToleranceSummary } from "./inspection";
import type { FinishingAction } from "./schemas";
import type { UnitState } from "./transitions";

// The shapes the finishing, calibration and unit APIs answer with, shared by the queries that
// build them and the pages that show them.

export type LatestInspectionRef = { id: string; passed: boolean; reason: string | null; created_at: string };

export type FinishingCard = {
  id: string;
  serial: string;
  state: UnitState;
  version: number;
  held_from: UnitState | null;
  hold_reason: string | null;
  scrap_reason: string | null;
  scrap_note: string | null;
  state_changed_at: string;
  sintered_mass_g: number | null;
  part: PartForFinishing & {
    id: string;
    part_number: string;
    revision: string;
    name: string;
    finishing_notes: string;
    green_x_mm: number | null;
    green_y_mm: number | null;
    green_z_mm: number | null;
  };
  tolerance: ToleranceSummary;
  material: { id: string; code: string; name: string };
  order: { id: string; code: string; customer: string; due_at: string; priority: number };
  build: { id: string; code: string; scale_snapshot: unknown } | null;
  furnace_run: { id: string; code: string; state: string; starts_at: string | null; ends_at: string | null; furnace_name: string | null } | null;
  /** When the unit comes out of its furnace run (for units still on their way). */
  projected_arrival: string | null;
  latest_inspection: LatestInspectionRef | null;
  inspection_count: number;
  actions: FinishingAction[];
};

export type FinishingQueue = {
  now: string;
  arriving: FinishingCard[];
  ready: FinishingCard[];
  finishing: FinishingCard[];
  held: FinishingCard[];
  recent: FinishingCard[];
};

type Axes = { x: number | null; y: number | null; z: number | null };

export type InspectionView = {
  id: string;
  created_at: string;
  inspector_name: string | null;
  passed: boolean;
  reason: string | null;
  notes: string;
  green: Axes;
  green_source: "measured" | "planned";
  sintered: Axes;
  finished: Axes;
  ra_um: number | null;
  runout_mm: number | null;
  runout_axis: "x" | "y" | "z" | null;
  stock_check: StockCheck | null;
  entered_units: "mm" | "in";
  excluded_from_calibration: boolean;
  exclusion_reason: string | null;
  files: Array<{ id: string; filename: string; content_type: string; size_bytes: number; url: string }>;
};

export type CalibrationMaterialRow = {
  id: string;
  code: string;
  name: string;
  shrink_xy: number;
  shrink_z: number;
  version: number;
  active: boolean;
  inspections: number;
};

export type CalibrationHistoryEntry = {
  id: number;
  kind: string;
  created_at: string;
  data: unknown;
  reason: string | null;
  actor_name: string | null;
};

export type MaterialCalibrationView = {
  material: { id: string; code: string; name: string; shrink_xy: number; shrink_z: number; version: number; updated_at: string };
  min_samples: number;
  points: CalibrationPoint[];
  rejected: RejectedReading[];
  calibration: MaterialCalibration;
  suggestions: ShrinkageSuggestion[];
  inspections: { xy: number; z: number };
  applicable: { xy?: number; z?: number };
  history: CalibrationHistoryEntry[];
  excluded: Array<{ id: string; serial: string; unit_id: string; created_at: string; exclusion_reason: string | null }>;
};

export type TimelineEntry = {
  at: string;
  source: "unit" | "build" | "wash_batch" | "furnace_run" | "inspection";
  kind: string;
  title: string;
  detail: string | null;
  actor: string | null;
  ref: string | null;
};

export type UnitTrace = {
  unit: {
    id: string; serial: string; state: string; version: number; held_from: string | null; hold_reason: string | null;
    scrap_reason: string | null; scrap_note: string | null; state_changed_at: string; created_at: string;
    green_mass_g: number | null; brown_mass_g: number | null; sintered_mass_g: number | null; wash_passed: boolean | null;
  };
  part: { id: string; part_number: string; revision: string; name: string; nominal: { x: number; y: number; z: number }; green: Axes; scale_factors: unknown };
  order: { id: string; code: string; customer: string; due_at: string };
  material: { id: string; code: string; name: string; shrink_xy: number; shrink_z: number; min_mass_loss: number };
  build: {
    id: string; code: string; state: string; material_lot: string; printer_id: string | null; printer_name: string | null;
    /** The feedstock lots the build drew from (several when one ran out). */
    feedstock_lots: Array<{ id: string; code: string; supplier: string; supplier_lot: string; drawn_g: number }>;
    starts_at: string | null; ends_at: string | null; started_at: string | null; finished_at: string | null;
    failed: boolean; failure_reason: string | null; scale_snapshot: unknown; est_minutes: number | null;
  } | null;
  wash: {
    id: string; code: string; state: string; station_name: string | null; solvent: string | null;
    starts_at: string | null; ends_at: string | null; started_at: string | null; finished_at: string | null;
    est_minutes: number | null; mass_loss: MassLossCheck | null;
  } | null;
  furnace_run: {
    id: string; code: string; state: string; furnace_name: string | null;
    starts_at: string | null; ends_at: string | null; loaded_at: string | null; unloaded_at: string | null;
    cycle_minutes: number | null; checklist: unknown;
    profile: {
      id: string; code: string; name: string; revision: number; atmosphere: string;
      segments: Array<{ rate_c_per_min: number; setpoint_c: number; hold_min: number }>;
      cycle: { total_minutes: number; peak_c: number } | null;
    };
  } | null;
  inspections: InspectionView[];
  timeline: TimelineEntry[];
};
