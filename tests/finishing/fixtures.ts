// Rows of a test's own, with unique names, for the finishing, calibration and capacity tests.
// Nothing here wipes or edits the demo shop's rows.
import { randomUUID } from "node:crypto";
import type { Database } from "@/db/client";

export const tag = () => randomUUID().slice(0, 8).toUpperCase();

export async function makeMaterial(db: Database, code: string, shrink = { xy: 0.15, z: 0.17 }) {
  return db
    .insertInto("materials")
    .values({
      code,
      name: `Test alloy ${code}`,
      alloy_family: "test stainless",
      shrink_xy: shrink.xy,
      shrink_z: shrink.z,
      green_density_g_cm3: 5.05,
      sintered_density_g_cm3: 7.55,
      theoretical_density_g_cm3: 7.78,
      solids_loading: 0.6,
      wash_k_min_per_mm2: 30,
      wash_min_minutes: 60,
      min_mass_loss: 0.035,
    })
    .returning(["id", "code", "version"])
    .executeTakeFirstOrThrow();
}

export async function makeOrder(db: Database, code: string, dueAt: Date, customer = "Test customer") {
  return db.insertInto("orders").values({ code, customer, due_at: dueAt, priority: 2 }).returning(["id", "code"]).executeTakeFirstOrThrow();
}

export type PartOptions = {
  nominal?: [number, number, number];
  green?: [number, number, number];
  stock?: number;
  tolerance_grade?: string | null;
  tolerance_um?: number | null;
};

export async function makePart(db: Database, orderId: string, materialId: string, partNumber: string, o: PartOptions = {}) {
  const [nx, ny, nz] = o.nominal ?? [25, 40, 12];
  const stock = o.stock ?? 0.25;
  const [gx, gy, gz] = o.green ?? [(nx + 2 * stock) / 0.85, (ny + 2 * stock) / 0.85, (nz + stock) / 0.83];
  return db
    .insertInto("parts")
    .values({
      order_id: orderId, part_number: partNumber, name: "test bracket", material_id: materialId, quantity: 1,
      nominal_x_mm: nx, nominal_y_mm: ny, nominal_z_mm: nz, thickest_wall_mm: 4, volume_mm3: nx * ny * nz * 0.5,
      stock_x_neg_mm: stock, stock_x_pos_mm: stock, stock_y_neg_mm: stock, stock_y_pos_mm: stock, stock_z_neg_mm: 0, stock_z_pos_mm: stock,
      finishing_notes: "Grind X faces to size; deburr.", target_ra_um: 0.8,
      tolerance_grade: o.tolerance_grade === undefined ? "IT7" : o.tolerance_grade, tolerance_um: o.tolerance_um ?? null,
      green_x_mm: gx, green_y_mm: gy, green_z_mm: gz,
    })
    .returning(["id", "part_number"])
    .executeTakeFirstOrThrow();
}

type UnitState = "planned" | "printing" | "green" | "washing" | "brown" | "sintering" | "sintered" | "ready_for_finishing" | "finishing" | "done" | "on_hold" | "scrapped";

export async function makeUnit(db: Database, partId: string, serial: string, state: UnitState, extra: { build_id?: string; wash_batch_id?: string; furnace_run_id?: string; green_mass_g?: number; brown_mass_g?: number; sintered_mass_g?: number } = {}) {
  return db
    .insertInto("units")
    .values({ part_id: partId, serial, state, ...extra })
    .returning(["id", "serial", "version"])
    .executeTakeFirstOrThrow();
}

/** A unit ready for finishing on a fresh order and part; returns everything a test needs. */
export async function readyUnit(db: Database, opts: { materialId?: string; dueAt?: Date; part?: PartOptions } = {}) {
  const t = tag();
  const materialId =
    opts.materialId ?? (await db.selectFrom("materials").select("id").where("code", "=", "17-4PH").executeTakeFirstOrThrow()).id;
  const order = await makeOrder(db, `WO-T${t}`, opts.dueAt ?? new Date(Date.now() + 10 * 86_400_000));
  const part = await makePart(db, order.id, materialId, `TP-${t}`, opts.part);
  const unit = await makeUnit(db, part.id, `${order.code}-TP-01`, "ready_for_finishing");
  return { t, order, part, unit, materialId };
}

/** A small valid PNG (1×1, grey) and a one-page PDF header, for attachment tests. */
export const PNG_1X1 = Buffer.from(
  "89504e470d0a1a0a0000000d4948445200000001000000010806000000" + "1f15c4890000000d49444154789c6360606060000000050001a5f645400000000049454e44ae426082",
  "hex",
);
export const PDF_MIN = Buffer.from("%PDF-1.4\n1 0 obj<<>>endobj\ntrailer<<>>\n%%EOF\n", "latin1");
