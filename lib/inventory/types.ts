import type { LotState } from "./lots";
import type { Projection } from "./projection";

export type RecallResult = {
  held: Array<{ unit_id: string; serial: string; from: string }>;
  beyond_reach: Array<{ unit_id: string; serial: string; state: string; order_code: string; customer: string }>;
};

/** A lot as lists and pages show it. */
export type LotRow = {
  id: string; code: string; material_id: string; material_code: string; material_name: string; supplier: string; supplier_lot: string;
  form: string | null; form_id: string | null; received_on: string; expires_on: string | null; quantity_g: number; remaining_g: number; storage_notes: string;
  certificate_file_id: string | null; state: LotState; state_reason: string | null; recalled_at: Date | null; recall_reason: string | null; version: number; builds: number;
};

export type MaterialStock = {
  id: string; code: string; name: string; version: number; support_allowance: number; purge_g: number; reorder_point_g: number; lead_time_days: number;
  feedstock_density_g_cm3: number; reorder_alerted_at: Date | null;
};

/** tracked: a lot was ever received for the material (else its builds draw nothing). */
export type MaterialProjection = MaterialStock & { tracked: boolean; quarantine_g: number; projection: Projection };
