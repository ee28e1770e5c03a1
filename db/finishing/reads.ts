import { sql, type Transaction } from "kysely";
import { isUuid } from "@/lib/ids";
import type { Database } from "@/db/client";
import type { DB } from "@/db/schema";
import { AppError } from "@/lib/errors";
import { availableActions, type UnitState } from "@/lib/finishing/transitions";
import { toleranceSummary, type PartForFinishing } from "@/lib/finishing/inspection";
import type { FinishingCard, FinishingQueue } from "@/lib/finishing/types";

// The machinist's queue: units on their way out of a furnace, ready for finishing, being
// finished, held, and lately done; and the state changes a machinist makes.

export type Trx = Transaction<DB>;
const num = (v: unknown) => (v === null || v === undefined ? null : Number(v));
const iso = (d: Date | string | null) => (d === null ? null : new Date(d).toISOString());

function cardQuery(db: Database | Trx) {
  return db
    .selectFrom("units as u")
    .innerJoin("parts as p", "p.id", "u.part_id")
    .innerJoin("orders as o", "o.id", "p.order_id")
    .innerJoin("materials as m", "m.id", "p.material_id")
    .leftJoin("builds as b", "b.id", "u.build_id")
    .leftJoin("furnace_runs as r", "r.id", "u.furnace_run_id")
    .leftJoin("furnaces as f", "f.id", "r.furnace_id")
    .select((eb) => [
      "u.id", "u.serial", "u.state", "u.version", "u.held_from", "u.hold_reason", "u.scrap_reason", "u.scrap_note", "u.state_changed_at",
      "u.sintered_mass_g",
      "p.id as part_id", "p.part_number", "p.revision", "p.name as part_name", "p.finishing_notes", "p.target_ra_um", "p.tolerance_um", "p.tolerance_grade",
      "p.nominal_x_mm", "p.nominal_y_mm", "p.nominal_z_mm", "p.green_x_mm", "p.green_y_mm", "p.green_z_mm",
      "p.stock_x_neg_mm", "p.stock_x_pos_mm", "p.stock_y_neg_mm", "p.stock_y_pos_mm", "p.stock_z_neg_mm", "p.stock_z_pos_mm",
      "m.id as material_id", "m.code as material_code", "m.name as material_name",
      "o.id as order_id", "o.code as order_code", "o.customer", "o.due_at", "o.priority",
      "b.id as build_id", "b.code as build_code", "b.scale_snapshot",
      "r.id as run_id", "r.code as run_code", "r.state as run_state", "r.starts_at as run_starts_at", "r.ends_at as run_ends_at", "r.unloaded_at as run_unloaded_at",
      "f.name as furnace_name",
      eb
        .selectFrom("inspections as i")
        .select(sql<{ id: string; passed: boolean; reason: string | null; created_at: string }>`json_build_object('id', i.id, 'passed', i.passed, 'reason', i.reason, 'created_at', i.created_at)`.as("j"))
        .whereRef("i.unit_id", "=", "u.id")
        .orderBy("i.created_at", "desc")
        .limit(1)
        .as("latest_inspection"),
      eb.selectFrom("inspections as i").select((e) => e.fn.countAll<number>().as("n")).whereRef("i.unit_id", "=", "u.id").as("inspection_count"),
    ]);
}

type CardRow = Awaited<ReturnType<ReturnType<typeof cardQuery>["execute"]>>[number];

function toCard(r: CardRow): FinishingCard {
  const part: PartForFinishing = {
    nominal_x_mm: Number(r.nominal_x_mm), nominal_y_mm: Number(r.nominal_y_mm), nominal_z_mm: Number(r.nominal_z_mm),
    stock_x_neg_mm: Number(r.stock_x_neg_mm), stock_x_pos_mm: Number(r.stock_x_pos_mm),
    stock_y_neg_mm: Number(r.stock_y_neg_mm), stock_y_pos_mm: Number(r.stock_y_pos_mm),
    stock_z_neg_mm: Number(r.stock_z_neg_mm), stock_z_pos_mm: Number(r.stock_z_pos_mm),
    tolerance_um: num(r.tolerance_um), tolerance_grade: r.tolerance_grade, target_ra_um: num(r.target_ra_um),
  };
  const latest = r.latest_inspection ? { ...r.latest_inspection, created_at: iso(r.latest_inspection.created_at)! } : null;
  let tolerance: FinishingCard["tolerance"];
  try {
    tolerance = toleranceSummary(part);
  } catch {
    tolerance = { kind: "none" };
  }
  // The furnace run's end is when the unit comes out; the worker releases it for finishing then.
  const arrival = r.run_unloaded_at ?? r.run_ends_at;
  return {
    id: r.id,
    serial: r.serial,
    state: r.state as UnitState,
    version: r.version,
    held_from: r.held_from as UnitState | null,
    hold_reason: r.hold_reason,
    scrap_reason: r.scrap_reason,
    scrap_note: r.scrap_note,
    state_changed_at: iso(r.state_changed_at)!,
    sintered_mass_g: num(r.sintered_mass_g),
    part: {
      id: r.part_id, part_number: r.part_number, revision: r.revision, name: r.part_name, finishing_notes: r.finishing_notes,
      ...part,
      green_x_mm: num(r.green_x_mm), green_y_mm: num(r.green_y_mm), green_z_mm: num(r.green_z_mm),
    },
    tolerance,
    material: { id: r.material_id, code: r.material_code, name: r.material_name },
    order: { id: r.order_id, code: r.order_code, customer: r.customer, due_at: iso(r.due_at)!, priority: r.priority },
    build: r.build_id ? { id: r.build_id, code: r.build_code!, scale_snapshot: r.scale_snapshot } : null,
    furnace_run: r.run_id
      ? { id: r.run_id, code: r.run_code!, state: r.run_state!, starts_at: iso(r.run_starts_at), ends_at: iso(r.run_ends_at), furnace_name: r.furnace_name }
      : null,
    projected_arrival: r.state === "brown" || r.state === "sintering" || r.state === "sintered" ? iso(arrival) : null,
    latest_inspection: latest,
    inspection_count: Number(r.inspection_count ?? 0),
    actions: availableActions({ state: r.state as UnitState, held_from: r.held_from as UnitState | null }, latest),
  };
}

export async function listFinishingQueue(db: Database, now = new Date()): Promise<FinishingQueue> {
  const rows = await cardQuery(db)
    .where((eb) =>
      eb.or([
        eb("u.state", "in", ["ready_for_finishing", "finishing"]),
        eb.and([eb("u.state", "=", "on_hold"), eb("u.held_from", "in", ["ready_for_finishing", "finishing"])]),
        eb.and([eb("u.state", "in", ["brown", "sintering", "sintered"]), eb("r.state", "in", ["scheduled", "running", "complete"])]),
        eb.and([eb("u.state", "in", ["done", "scrapped"]), eb("u.state_changed_at", ">", new Date(now.getTime() - 7 * 86_400_000)), eb("u.furnace_run_id", "is not", null)]),
      ]),
    )
    .orderBy("o.due_at")
    .orderBy("u.serial")
    .execute();
  const cards = rows.map(toCard);
  const byArrival = (a: FinishingCard, b: FinishingCard) => (a.projected_arrival ?? "").localeCompare(b.projected_arrival ?? "");
  return {
    now: now.toISOString(),
    arriving: cards.filter((c) => ["brown", "sintering", "sintered"].includes(c.state)).sort(byArrival),
    ready: cards.filter((c) => c.state === "ready_for_finishing"),
    finishing: cards.filter((c) => c.state === "finishing"),
    held: cards.filter((c) => c.state === "on_hold"),
    recent: cards
      .filter((c) => c.state === "done" || c.state === "scrapped")
      .sort((a, b) => b.state_changed_at.localeCompare(a.state_changed_at))
      .slice(0, 20),
  };
}

export async function getFinishingCard(db: Database | Trx, unitId: string): Promise<FinishingCard> {
  if (!isUuid(unitId)) throw new AppError("not_found", "Unit not found.");
  const row = await cardQuery(db).where("u.id", "=", unitId).executeTakeFirst();
  if (!row) throw new AppError("not_found", "Unit not found.");
  return toCard(row);
}

export async function latestInspection(db: Database | Trx, unitId: string) {
  return db
    .selectFrom("inspections")
    .select(["id", "passed", "reason"])
    .where("unit_id", "=", unitId)
    .orderBy("created_at", "desc")
    .limit(1)
    .executeTakeFirst();
}
