import type { Database } from "@/db/client";
import { unitsWithPart } from "@/db/units/joins";
import { isUuid } from "@/lib/ids";
import { AppError } from "@/lib/errors";
import { massLossCheck } from "@/lib/process/wash";
import { furnaceCycle } from "@/lib/process/furnace-profile";
import type { TimelineEntry, UnitTrace } from "@/lib/finishing/types";
import { listInspectionsForUnit } from "@/db/inspections/reads";
import { WindowBody } from "@/lib/floor/window-body";
import { sharedReadCache } from "@/lib/floor/window-cache";

// A unit's whole history in one place: the material lot and build it was printed in, the
// wash batch and its masses, the furnace run and profile, its inspections, and every event of
// the unit and of the bookings it passed through, as one timeline.

const num = (v: unknown) => (v === null || v === undefined ? null : Number(v));
const iso = (d: Date | string | null | undefined) => (d ? new Date(d).toISOString() : null);

export async function loadUnitTrace(db: Database, unitId: string): Promise<UnitTrace> {
  if (!isUuid(unitId)) throw new AppError("not_found", "Unit not found.");
  const u = await unitsWithPart(db)
    .select([
      "u.id", "u.serial", "u.state", "u.version", "u.held_from", "u.hold_reason", "u.scrap_reason", "u.scrap_note", "u.state_changed_at", "u.created_at",
      "u.green_mass_g", "u.brown_mass_g", "u.sintered_mass_g", "u.wash_passed", "u.build_id", "u.wash_batch_id", "u.furnace_run_id",
      "p.id as part_id", "p.part_number", "p.revision", "p.name as part_name",
      "p.nominal_x_mm", "p.nominal_y_mm", "p.nominal_z_mm", "p.green_x_mm", "p.green_y_mm", "p.green_z_mm", "p.scale_factors",
      "o.id as order_id", "o.code as order_code", "o.customer", "o.due_at",
      "m.id as material_id", "m.code as material_code", "m.name as material_name", "m.min_mass_loss", "m.shrink_xy", "m.shrink_z",
    ])
    .where("u.id", "=", unitId)
    .executeTakeFirst();
  if (!u) throw new AppError("not_found", "Unit not found.");

  const entityIds = [u.id, u.build_id, u.wash_batch_id, u.furnace_run_id].filter((x): x is string => !!x);
  // Everything else hangs off the unit's row alone, so it is asked for at once: one round trip
  // after the unit's (a unit page asks again after each change to anything it shows).
  const [build, wash, run, inspections, lots, segments, events] = await Promise.all([
    u.build_id
      ? db
          .selectFrom("builds as b")
          .leftJoin("printers as pr", "pr.id", "b.printer_id")
          .select([
            "b.id", "b.code", "b.state", "b.material_lot", "b.starts_at", "b.ends_at", "b.started_at", "b.finished_at",
            "b.failed", "b.failure_reason", "b.scale_snapshot", "b.est_minutes", "pr.id as printer_id", "pr.name as printer_name",
          ])
          .where("b.id", "=", u.build_id)
          .executeTakeFirst()
      : undefined,
    u.wash_batch_id
      ? db
          .selectFrom("wash_batches as w")
          .leftJoin("wash_stations as ws", "ws.id", "w.wash_station_id")
          .select(["w.id", "w.code", "w.state", "w.starts_at", "w.ends_at", "w.started_at", "w.finished_at", "w.est_minutes", "ws.name as station_name", "ws.solvent"])
          .where("w.id", "=", u.wash_batch_id)
          .executeTakeFirst()
      : undefined,
    u.furnace_run_id
      ? db
          .selectFrom("furnace_runs as r")
          .innerJoin("sinter_profiles as sp", "sp.id", "r.profile_id")
          .leftJoin("furnaces as f", "f.id", "r.furnace_id")
          .select([
            "r.id", "r.code", "r.state", "r.starts_at", "r.ends_at", "r.loaded_at", "r.unloaded_at", "r.cycle_minutes", "r.checklist",
            "f.name as furnace_name", "f.max_cool_rate_c_per_min",
            "sp.id as profile_id", "sp.code as profile_code", "sp.name as profile_name", "sp.revision as profile_revision", "sp.atmosphere",
            "sp.start_temp_c", "sp.cool_rate_c_per_min", "sp.cool_to_c",
          ])
          .where("r.id", "=", u.furnace_run_id)
          .executeTakeFirst()
      : undefined,
    listInspectionsForUnit(db, unitId),
    u.build_id
      ? db
          .selectFrom("feedstock_draws as d")
          .innerJoin("feedstock_lots as l", "l.id", "d.lot_id")
          .select(["l.id", "l.code", "l.supplier", "l.supplier_lot", "d.drawn_g"])
          .where("d.build_id", "=", u.build_id)
          .orderBy("l.code")
          .execute()
      : [],
    // The run's profile's segments, through the run (the run's row comes in the same round trip).
    u.furnace_run_id
      ? db
          .selectFrom("sinter_profile_segments")
          .select(["position", "rate_c_per_min", "setpoint_c", "hold_min"])
          .where("profile_id", "=", (eb) => eb.selectFrom("furnace_runs").select("profile_id").where("id", "=", u.furnace_run_id!))
          .orderBy("position")
          .execute()
      : [],
    db
      .selectFrom("events as e")
      .leftJoin("users as us", "us.id", "e.actor_id")
      .select(["e.id", "e.entity", "e.entity_id", "e.kind", "e.from_state", "e.to_state", "e.reason", "e.data", "e.created_at", "e.actor_id", "us.name as actor_name"])
      .where((eb) =>
        eb.or([
          eb.and([eb("e.entity", "=", "unit"), eb("e.entity_id", "=", u.id)]),
          ...(u.build_id ? [eb.and([eb("e.entity", "=", "build"), eb("e.entity_id", "=", u.build_id)])] : []),
          ...(u.wash_batch_id ? [eb.and([eb("e.entity", "=", "wash_batch"), eb("e.entity_id", "=", u.wash_batch_id)])] : []),
          ...(u.furnace_run_id ? [eb.and([eb("e.entity", "=", "furnace_run"), eb("e.entity_id", "=", u.furnace_run_id)])] : []),
        ]),
      )
      .orderBy("e.created_at")
      .orderBy("e.id")
      .execute(),
  ]);

  let massLoss = null;
  const green = num(u.green_mass_g);
  const brown = num(u.brown_mass_g);
  if (green !== null && brown !== null) {
    try {
      massLoss = massLossCheck(green, brown, Number(u.min_mass_loss));
    } catch {
      massLoss = null;
    }
  }
  let cycle = null;
  if (run && segments.length) {
    try {
      cycle = furnaceCycle(
        {
          startTempC: Number(run.start_temp_c),
          coolRateCPerMin: Number(run.cool_rate_c_per_min),
          coolToC: Number(run.cool_to_c),
          segments: segments.map((s) => ({ rateCPerMin: Number(s.rate_c_per_min), setpointC: Number(s.setpoint_c), holdMin: Number(s.hold_min) })),
        },
        run.max_cool_rate_c_per_min ? { maxCoolRateCPerMin: Number(run.max_cool_rate_c_per_min) } : undefined,
      );
    } catch {
      cycle = null;
    }
  }

  type Entry = TimelineEntry;
  const timeline: Entry[] = events.map((e) => ({
    at: iso(e.created_at)!,
    source: (entityIds.includes(e.entity_id ?? "") ? e.entity : "unit") as Entry["source"],
    kind: e.kind,
    title:
      e.kind === "state" && e.to_state
        ? `${e.from_state ? `${e.from_state.replaceAll("_", " ")} → ` : ""}${e.to_state.replaceAll("_", " ")}`
        : e.kind.replaceAll("_", " "),
    detail: e.reason,
    // The events table records the worker as a null actor.
    actor: e.actor_name ?? (e.actor_id ? null : "worker"),
    ref: e.entity_id,
  }));
  // An inspection recorded through the app has its own event; older records only their row.
  const logged = new Set<string>();
  for (const [k, e] of events.entries()) {
    const inspectionId = (e.data as { inspection_id?: string } | null)?.inspection_id;
    if (e.kind === "inspection" && inspectionId) {
      logged.add(inspectionId);
      const passed = (e.data as { passed?: boolean }).passed;
      timeline[k] = { ...timeline[k], source: "inspection", title: passed ? "inspection passed" : "inspection failed", detail: passed ? null : timeline[k].detail };
    }
  }
  for (const i of inspections) {
    if (logged.has(i.id)) continue;
    timeline.push({
      at: i.created_at,
      source: "inspection",
      kind: "inspection_record",
      title: i.passed ? "inspection passed" : "inspection failed",
      detail: i.reason ?? (i.notes || null),
      actor: i.inspector_name,
      ref: i.id,
    });
  }
  // Bookings also show their planned and actual moments, so the timeline reads without events.
  const moment = (at: Date | string | null, source: Entry["source"], title: string, ref: string | null) => {
    if (at) timeline.push({ at: iso(at)!, source, kind: "moment", title, detail: null, actor: null, ref });
  };
  if (build) {
    moment(build.started_at, "build", `build ${build.code} started`, build.id);
    moment(build.finished_at, "build", `build ${build.code} finished`, build.id);
  }
  if (wash) {
    moment(wash.started_at, "wash_batch", `wash ${wash.code} started`, wash.id);
    moment(wash.finished_at, "wash_batch", `wash ${wash.code} finished`, wash.id);
  }
  if (run) {
    moment(run.loaded_at, "furnace_run", `furnace run ${run.code} loaded`, run.id);
    moment(run.unloaded_at, "furnace_run", `furnace run ${run.code} unloaded`, run.id);
  }
  timeline.sort((a, b) => a.at.localeCompare(b.at));

  return {
    unit: {
      id: u.id, serial: u.serial, state: u.state, version: u.version, held_from: u.held_from, hold_reason: u.hold_reason,
      scrap_reason: u.scrap_reason, scrap_note: u.scrap_note, state_changed_at: iso(u.state_changed_at)!, created_at: iso(u.created_at)!,
      green_mass_g: green, brown_mass_g: brown, sintered_mass_g: num(u.sintered_mass_g), wash_passed: u.wash_passed,
    },
    part: {
      id: u.part_id, part_number: u.part_number, revision: u.revision, name: u.part_name,
      nominal: { x: Number(u.nominal_x_mm), y: Number(u.nominal_y_mm), z: Number(u.nominal_z_mm) },
      green: { x: num(u.green_x_mm), y: num(u.green_y_mm), z: num(u.green_z_mm) },
      scale_factors: u.scale_factors,
    },
    order: { id: u.order_id, code: u.order_code, customer: u.customer, due_at: iso(u.due_at)! },
    material: { id: u.material_id, code: u.material_code, name: u.material_name, shrink_xy: Number(u.shrink_xy), shrink_z: Number(u.shrink_z), min_mass_loss: Number(u.min_mass_loss) },
    build: build
      ? {
          id: build.id, code: build.code, state: build.state, material_lot: build.material_lot, printer_id: build.printer_id, printer_name: build.printer_name,
          feedstock_lots: lots.map((l) => ({ id: l.id, code: l.code, supplier: l.supplier, supplier_lot: l.supplier_lot, drawn_g: Number(l.drawn_g) })),
          starts_at: iso(build.starts_at), ends_at: iso(build.ends_at), started_at: iso(build.started_at), finished_at: iso(build.finished_at),
          failed: build.failed, failure_reason: build.failure_reason, scale_snapshot: build.scale_snapshot, est_minutes: num(build.est_minutes),
        }
      : null,
    wash: wash
      ? {
          id: wash.id, code: wash.code, state: wash.state, station_name: wash.station_name, solvent: wash.solvent,
          starts_at: iso(wash.starts_at), ends_at: iso(wash.ends_at), started_at: iso(wash.started_at), finished_at: iso(wash.finished_at),
          est_minutes: num(wash.est_minutes), mass_loss: massLoss,
        }
      : null,
    furnace_run: run
      ? {
          id: run.id, code: run.code, state: run.state, furnace_name: run.furnace_name,
          starts_at: iso(run.starts_at), ends_at: iso(run.ends_at), loaded_at: iso(run.loaded_at), unloaded_at: iso(run.unloaded_at),
          cycle_minutes: num(run.cycle_minutes), checklist: run.checklist,
          profile: {
            id: run.profile_id, code: run.profile_code, name: run.profile_name, revision: run.profile_revision, atmosphere: run.atmosphere,
            segments: segments.map((s) => ({ rate_c_per_min: Number(s.rate_c_per_min), setpoint_c: Number(s.setpoint_c), hold_min: Number(s.hold_min) })),
            cycle: cycle ? { total_minutes: cycle.totalMinutes, peak_c: cycle.peakC } : null,
          },
        }
      : null,
    inspections,
    timeline,
  };
}

/**
 * A unit's trace as an encoded body, from the process-wide cache while the "shop" stamp holds
 * (db/live/stamps.ts): an open unit page asks again after each change to anything it shows.
 * The answer depends on the unit alone (not on who asks), so the unit is the whole key.
 */
export function unitTraceBody(db: Database, unitId: string, stamp: string): Promise<WindowBody> {
  return sharedReadCache().get(`trace:${unitId.toLowerCase()}`, stamp, async () => WindowBody.ready(JSON.stringify(await loadUnitTrace(db, unitId))));
}
