import { sql, type Transaction } from "kysely";
import type { DB } from "@/db/schema";
import { scheduleAdvance } from "@/db/jobs/advance";
import { AppError } from "@/lib/errors";
import { checkWashAdd, fitsBasket, washMinutesOf } from "@/lib/batches/rules";
import { formatShopTime, isStaffedAt, nextStaffed } from "@/lib/batches/staffed";
import type { BoardUnit, BookingState } from "@/lib/batches/types";
import { massLossCheck } from "@/lib/process/wash";
import { lockRowOrThrow, recordEvents, requireVersion } from "@/db/versioned";
import { listBoardUnits, type Db, type ShopContext } from "@/db/batches/reads";
import { getWash, massResults } from "./reads";

type Trx = Transaction<DB>;
const MIN = 60_000;
// A booking made a moment ago is not "in the past" because the request took a while.
const PAST_SLACK_MS = 2 * MIN;

/** Locks a wash batch; given the version the person saw, a batch that has moved on is a 409. */
export async function lockWashBatch(trx: Trx, id: string, version?: number) {
  const row = await lockRowOrThrow(trx, "wash_batches", id, "That wash batch does not exist.");
  requireVersion(`Wash batch ${row.code}`, row.version, version);
  return row;
}

export async function lockUnit(trx: Trx, id: string, version?: number) {
  const row = await trx.selectFrom("units").select(["id", "serial", "state", "version", "wash_batch_id", "furnace_run_id"]).where("id", "=", id).forUpdate().executeTakeFirst();
  if (!row) throw new AppError("not_found", "That unit does not exist.");
  requireVersion(`Unit ${row.serial}`, row.version, version);
  return row;
}

const refuse = (code: string, reason: string, field = "unit_id") => new AppError("invalid", reason, { [field]: [reason] }, { rule: code });

/** Refuses a start outside staffed hours, in the past, or over a maintenance window. */
export async function checkBookingStart(
  db: Db,
  ctx: ShopContext,
  what: "wash" | "furnace",
  resourceId: string,
  start: Date,
  end: Date,
  opts: { allowPast?: boolean } = {},
) {
  if (!opts.allowPast && start.getTime() < ctx.now.getTime() - PAST_SLACK_MS) {
    throw new AppError("invalid", "A booking cannot start in the past.", { starts_at: ["a booking cannot start in the past"] });
  }
  if (!isStaffedAt(start, ctx.staffing)) {
    const next = nextStaffed(start, ctx.staffing);
    const doing = what === "wash" ? "load the wash" : "load the furnace";
    const msg = `Nobody is on shift at ${formatShopTime(start, ctx.time_zone)} to ${doing}; the next staffed time is ${formatShopTime(next, ctx.time_zone)}.`;
    throw new AppError("invalid", msg, { starts_at: [msg] }, { next_staffed_at: next.toISOString() });
  }
  const col = what === "wash" ? "wash_station_id" : "furnace_id";
  const block = await db
    .selectFrom("maintenance_windows")
    .select(["starts_at", "ends_at", "reason"])
    .where("resource", "=", what === "wash" ? "wash_station" : "furnace")
    .where(col, "=", resourceId)
    .where(sql<boolean>`tstzrange(starts_at, ends_at) && tstzrange(${start}::timestamptz, ${end}::timestamptz)`)
    .executeTakeFirst();
  if (block) {
    throw new AppError(
      "conflict",
      `That slot overlaps maintenance (${block.reason || "maintenance"}, ${formatShopTime(block.starts_at, ctx.time_zone)} – ${formatShopTime(block.ends_at, ctx.time_zone)}).`,
    );
  }
}

async function bumpWash(
  trx: Trx,
  ctx: ShopContext,
  row: { id: string; version: number; state: BookingState; starts_at: Date | null },
  units: BoardUnit[],
  extra: Partial<{ state: BookingState; starts_at: Date | null; ends_at: Date | null; wash_station_id: string; started_at: Date; finished_at: Date }> = {},
) {
  const minutes = washMinutesOf(units);
  const state = extra.state ?? row.state;
  const starts = extra.starts_at !== undefined ? extra.starts_at : row.starts_at;
  const set: Record<string, unknown> = { ...extra, version: row.version + 1, updated_at: new Date() };
  if (minutes !== null) set.est_minutes = Math.ceil(minutes);
  if ((state === "scheduled" || state === "running") && starts && minutes !== null && extra.ends_at === undefined) {
    set.ends_at = new Date(new Date(starts).getTime() + Math.ceil(minutes) * MIN);
  }
  const updated = await trx.updateTable("wash_batches").set(set).where("id", "=", row.id).returning(["id", "version", "state", "ends_at"]).executeTakeFirstOrThrow();
  if (updated.ends_at && ["scheduled", "running", "complete"].includes(updated.state)) {
    // The worker closes an open batch at its end (the job's due_at must be that end) and turns
    // the units of a closed batch brown once the parts have dried.
    const end = new Date(updated.ends_at).getTime();
    const due = new Date(updated.state === "complete" ? end + ctx.drying_minutes * MIN : end);
    await scheduleAdvance(trx, { entity: "wash_batch", id: updated.id, version: updated.version, due_at: due.toISOString() });
  }
  return updated;
}

export async function createWashBatch(trx: Trx, ctx: ShopContext, input: { wash_station_id: string; notes: string }, actorId: string) {
  const station = ctx.stations.find((s) => s.id === input.wash_station_id);
  if (!station) throw refuse("station", "That wash station does not exist or is out of use.", "wash_station_id");
  const row = await trx
    .insertInto("wash_batches")
    .values({ code: sql<string>`'W-' || nextval('wash_batch_code_seq')`, wash_station_id: station.id, notes: input.notes, created_by: actorId })
    .returning(["id", "code"])
    .executeTakeFirstOrThrow();
  await recordEvents(trx, [{ entity: "wash_batch", entity_id: row.id, kind: "state", to_state: "draft", actor_id: actorId, reason: `created on ${station.name}` }]);
  return getWash(trx, ctx, row.id);
}

/** Takes a unit out of whatever open wash batch holds it (when moving it to another). */
async function detachFromOpenWash(trx: Trx, ctx: ShopContext, unit: { id: string; wash_batch_id: string | null }, exceptId: string, actorId: string) {
  if (!unit.wash_batch_id || unit.wash_batch_id === exceptId) return;
  const other = await lockWashBatch(trx, unit.wash_batch_id);
  if (!["draft", "scheduled"].includes(other.state)) return;
  const rest = (await listBoardUnits(trx, ctx, { kind: "wash_batch", ids: [other.id] })).filter((u) => u.id !== unit.id);
  await bumpWash(trx, ctx, other, rest);
  await recordEvents(trx, [{ entity: "wash_batch", entity_id: other.id, kind: "unit_removed", actor_id: actorId, data: { unit_id: unit.id, moved_to: exceptId } }]);
}

export async function addUnitToWash(
  trx: Trx,
  ctx: ShopContext,
  input: { batchId: string; version: number; unitId: string; unitVersion: number },
  actorId: string,
) {
  const row = await lockWashBatch(trx, input.batchId, input.version);
  const unitRow = await lockUnit(trx, input.unitId, input.unitVersion);
  const station = ctx.stations.find((s) => s.id === row.wash_station_id);
  if (!station) throw refuse("station", `Wash batch ${row.code} has no wash station in use.`);
  const batchUnits = await listBoardUnits(trx, ctx, { kind: "wash_batch", ids: [row.id] });
  const [unit] = await listBoardUnits(trx, ctx, { kind: "ids", ids: [unitRow.id] });
  const verdict = checkWashAdd(row, batchUnits, unit, station);
  if (!verdict.ok) throw refuse(verdict.code, verdict.reason);
  await detachFromOpenWash(trx, ctx, unitRow, row.id, actorId);
  await trx.updateTable("units").set({ wash_batch_id: row.id, version: unitRow.version + 1, updated_at: new Date() }).where("id", "=", unitRow.id).execute();
  await bumpWash(trx, ctx, row, [...batchUnits, unit]);
  await recordEvents(trx, [{ entity: "wash_batch", entity_id: row.id, kind: "unit_added", actor_id: actorId, data: { unit_id: unitRow.id, serial: unitRow.serial } }]);
  return getWash(trx, ctx, row.id);
}

export async function removeUnitFromWash(
  trx: Trx,
  ctx: ShopContext,
  input: { batchId: string; version: number; unitId: string; unitVersion?: number },
  actorId: string,
) {
  const row = await lockWashBatch(trx, input.batchId, input.version);
  if (!["draft", "scheduled"].includes(row.state)) throw refuse("state", `Wash batch ${row.code} is ${row.state}; units can only leave a draft or scheduled batch.`);
  const unitRow = await lockUnit(trx, input.unitId, input.unitVersion);
  if (unitRow.wash_batch_id !== row.id) throw new AppError("conflict", `Unit ${unitRow.serial} is no longer in ${row.code}; reload to see where it went.`);
  await trx.updateTable("units").set({ wash_batch_id: null, version: unitRow.version + 1, updated_at: new Date() }).where("id", "=", unitRow.id).execute();
  const rest = await listBoardUnits(trx, ctx, { kind: "wash_batch", ids: [row.id] });
  await bumpWash(trx, ctx, row, rest);
  await recordEvents(trx, [{ entity: "wash_batch", entity_id: row.id, kind: "unit_removed", actor_id: actorId, data: { unit_id: unitRow.id, serial: unitRow.serial } }]);
  return getWash(trx, ctx, row.id);
}

export async function scheduleWash(
  trx: Trx,
  ctx: ShopContext,
  input: { batchId: string; version: number; starts_at: string; wash_station_id?: string },
  actorId: string,
) {
  const row = await lockWashBatch(trx, input.batchId, input.version);
  if (!["draft", "scheduled"].includes(row.state)) throw refuse("state", `Wash batch ${row.code} is ${row.state}; only a draft or scheduled batch can be moved.`, "starts_at");
  const stationId = input.wash_station_id ?? row.wash_station_id;
  const station = ctx.stations.find((s) => s.id === stationId);
  if (!station) throw refuse("station", "That wash station does not exist or is out of use.", "wash_station_id");
  const units = await listBoardUnits(trx, ctx, { kind: "wash_batch", ids: [row.id] });
  if (units.length === 0) throw refuse("empty", `Put units into ${row.code} before booking it: its length comes from its slowest unit.`, "starts_at");
  if (station.id !== row.wash_station_id) {
    if (units.length > station.capacity_units) throw refuse("capacity", `${station.name} holds ${station.capacity_units} units; ${row.code} has ${units.length}.`, "wash_station_id");
    const mass = units.reduce((s, u) => s + u.mass_g, 0);
    if (mass > station.max_load_g) throw refuse("load", `${row.code} weighs ${Math.round(mass)} g; ${station.name} takes ${station.max_load_g} g.`, "wash_station_id");
    const big = units.find((u) => !fitsBasket(u, station));
    if (big) throw refuse("size", `${big.serial} does not fit the basket of ${station.name}.`, "wash_station_id");
  }
  const start = new Date(input.starts_at);
  const minutes = Math.ceil(washMinutesOf(units)!);
  const end = new Date(start.getTime() + minutes * MIN);
  await checkBookingStart(trx, ctx, "wash", station.id, start, end);
  await bumpWash(trx, ctx, row, units, { state: "scheduled", starts_at: start, ends_at: end, wash_station_id: station.id });
  await recordEvents(trx, [
    {
      entity: "wash_batch", entity_id: row.id, kind: "schedule", from_state: row.state, to_state: "scheduled", actor_id: actorId,
      data: { wash_station_id: station.id, starts_at: start.toISOString(), ends_at: end.toISOString(), previous: { wash_station_id: row.wash_station_id, starts_at: row.starts_at } },
    },
  ]);
  return getWash(trx, ctx, row.id);
}

export async function startWash(trx: Trx, ctx: ShopContext, input: { batchId: string; version: number }, actorId: string) {
  const row = await lockWashBatch(trx, input.batchId, input.version);
  if (!["draft", "scheduled"].includes(row.state)) throw refuse("state", `Wash batch ${row.code} is ${row.state}; it cannot start again.`, "state");
  const units = await listBoardUnits(trx, ctx, { kind: "wash_batch", ids: [row.id] });
  if (units.length === 0) throw refuse("empty", `${row.code} is empty.`, "state");
  const notGreen = units.filter((u) => u.state !== "green");
  if (notGreen.length) throw refuse("unit_state", `Only green units can be washed: ${notGreen.map((u) => `${u.serial} is ${u.state}`).join(", ")}.`, "state");
  const now = ctx.now;
  const minutes = Math.ceil(washMinutesOf(units)!);
  const end = new Date(now.getTime() + minutes * MIN);
  await checkBookingStart(trx, ctx, "wash", row.wash_station_id!, now, end);
  await trx
    .updateTable("units")
    .set({ state: "washing", version: sql<number>`version + 1`, state_changed_at: now, updated_at: now })
    .where("id", "in", units.map((u) => u.id))
    .execute();
  await bumpWash(trx, ctx, row, units, { state: "running", starts_at: now, ends_at: end, started_at: now });
  await recordEvents(trx, [
    { entity: "wash_batch", entity_id: row.id, kind: "state", from_state: row.state, to_state: "running", actor_id: actorId, data: { ends_at: end.toISOString() } },
    ...units.map((u) => ({ entity: "unit", entity_id: u.id, kind: "state", from_state: "green", to_state: "washing", actor_id: actorId, reason: `wash ${row.code} started` })),
  ]);
  return getWash(trx, ctx, row.id);
}

function massErrors(units: BoardUnit[], masses: { unit_id: string; green_mass_g?: number; brown_mass_g?: number }[]) {
  const errors: Record<string, string[]> = {};
  masses.forEach((m, i) => {
    const u = units.find((x) => x.id === m.unit_id);
    if (!u) {
      errors[`masses.${i}.unit_id`] = ["that unit is not in this batch"];
      return;
    }
    const green = m.green_mass_g ?? u.green_mass_g;
    const brown = m.brown_mass_g ?? u.brown_mass_g;
    if (green && brown && brown > green) errors[`masses.${i}.brown_mass_g`] = [`${u.serial}: the brown mass ${brown} g exceeds the green mass ${green} g; a wash cannot add mass`];
  });
  if (Object.keys(errors).length) throw new AppError("invalid", Object.values(errors)[0][0], errors);
}

async function writeMasses(trx: Trx, units: BoardUnit[], masses: { unit_id: string; green_mass_g?: number; brown_mass_g?: number }[], brownAllowed: boolean) {
  for (const m of masses) {
    const set: Record<string, unknown> = {};
    if (m.green_mass_g !== undefined) set.green_mass_g = m.green_mass_g;
    if (m.brown_mass_g !== undefined) {
      if (!brownAllowed) throw new AppError("invalid", "Brown masses are weighed after the wash has started.", { brown_mass_g: ["weigh brown masses after the wash"] });
      set.brown_mass_g = m.brown_mass_g;
    }
    if (!Object.keys(set).length) continue;
    await trx.updateTable("units").set({ ...set, version: sql<number>`version + 1`, updated_at: new Date() }).where("id", "=", m.unit_id).execute();
  }
  void units;
}

/** Weighings of a batch's units; no change to the booking, so its version stays. */
export async function recordWashMasses(
  trx: Trx,
  ctx: ShopContext,
  input: { batchId: string; version: number; masses: { unit_id: string; green_mass_g?: number; brown_mass_g?: number }[] },
  actorId: string,
) {
  const row = await lockWashBatch(trx, input.batchId, input.version);
  if (row.state === "cancelled") throw refuse("state", `Wash batch ${row.code} is cancelled.`, "masses");
  const units = await listBoardUnits(trx, ctx, { kind: "wash_batch", ids: [row.id] });
  massErrors(units, input.masses);
  await writeMasses(trx, units, input.masses, row.state === "running" || row.state === "complete");
  await recordEvents(trx, [{ entity: "wash_batch", entity_id: row.id, kind: "masses", actor_id: actorId, data: { masses: input.masses } }]);
  const after = await listBoardUnits(trx, ctx, { kind: "wash_batch", ids: [row.id] });
  return { batch: await getWash(trx, ctx, row.id), masses: massResults(after) };
}

/**
 * The basket is out: every unit has its two weighings, a unit that lost too little binder is
 * held with the reason (it goes back for another wash), the others dry and the worker turns them
 * brown when drying is over.
 */
export async function finishWash(
  trx: Trx,
  ctx: ShopContext,
  input: { batchId: string; version: number; masses: { unit_id: string; green_mass_g?: number; brown_mass_g?: number }[] },
  actorId: string,
) {
  const row = await lockWashBatch(trx, input.batchId, input.version);
  if (row.state !== "running") throw refuse("state", `Wash batch ${row.code} is ${row.state}; only a running wash can be finished.`, "state");
  let units = await listBoardUnits(trx, ctx, { kind: "wash_batch", ids: [row.id] });
  massErrors(units, input.masses);
  await writeMasses(trx, units, input.masses, true);
  units = await listBoardUnits(trx, ctx, { kind: "wash_batch", ids: [row.id] });
  const missing: Record<string, string[]> = {};
  for (const u of units) {
    if (u.state !== "washing") continue;
    if (!u.green_mass_g) missing[`${u.id}.green_mass_g`] = [`enter the green mass of ${u.serial}`];
    if (!u.brown_mass_g) missing[`${u.id}.brown_mass_g`] = [`enter the brown mass of ${u.serial}`];
  }
  if (Object.keys(missing).length) {
    throw new AppError("invalid", `Every unit needs its green and brown mass before the wash is finished (${Object.keys(missing).length} missing).`, missing);
  }
  const now = ctx.now;
  const results = massResults(units);
  const events: Parameters<typeof recordEvents>[1] = [];
  const material = (u: BoardUnit) => u.material_code;
  for (const u of units) {
    if (u.state !== "washing") continue;
    const r = results.find((x) => x.unit_id === u.id)!;
    const pct = (x: number) => `${(x * 100).toFixed(2)} %`;
    if (r.passed) {
      const toBrown = ctx.drying_minutes === 0;
      await trx
        .updateTable("units")
        .set({ wash_passed: true, ...(toBrown ? { state: "brown" as const, state_changed_at: now } : {}), version: sql<number>`version + 1`, updated_at: now })
        .where("id", "=", u.id)
        .execute();
      events.push({ entity: "unit", entity_id: u.id, kind: toBrown ? "state" : "wash_check", from_state: "washing", to_state: toBrown ? "brown" : "washing", actor_id: actorId, reason: `mass loss ${pct(r.loss_fraction!)} ≥ ${pct(r.min_mass_loss)} (${material(u)})`, data: r });
    } else {
      const check = massLossCheck(u.green_mass_g!, u.brown_mass_g!, u.min_mass_loss);
      const reason = `Mass loss ${pct(check.lossFraction)} is below the ${pct(u.min_mass_loss)} minimum for ${material(u)} (${check.shortByG.toFixed(1)} g of binder still to come out) after wash ${row.code}; wash again`;
      await trx
        .updateTable("units")
        .set({ wash_passed: false, state: "on_hold", held_from: "green", hold_reason: reason, state_changed_at: now, version: sql<number>`version + 1`, updated_at: now })
        .where("id", "=", u.id)
        .execute();
      events.push({ entity: "unit", entity_id: u.id, kind: "state", from_state: "washing", to_state: "on_hold", actor_id: actorId, reason, data: r });
    }
  }
  // Finished early frees the lane; finished late keeps the booking as it was, so the late finish
  // never collides with the next batch on the station.
  const endsAt = row.ends_at && now < new Date(row.ends_at) ? new Date(Math.max(now.getTime(), new Date(row.starts_at!).getTime() + MIN)) : row.ends_at;
  await bumpWash(trx, ctx, row, units, { state: "complete", finished_at: now, ends_at: endsAt });
  events.push({ entity: "wash_batch", entity_id: row.id, kind: "state", from_state: "running", to_state: "complete", actor_id: actorId, data: { passed: results.filter((r) => r.passed).length, held: results.filter((r) => r.passed === false).length } });
  await recordEvents(trx, events);
  return { batch: await getWash(trx, ctx, row.id), masses: results };
}

export async function cancelWash(trx: Trx, ctx: ShopContext, input: { batchId: string; version: number; reason: string }, actorId: string) {
  const row = await lockWashBatch(trx, input.batchId, input.version);
  if (!["draft", "scheduled"].includes(row.state)) throw refuse("state", `Wash batch ${row.code} is ${row.state}; only a draft or scheduled batch can be cancelled.`, "state");
  await trx.updateTable("units").set({ wash_batch_id: null, version: sql<number>`version + 1`, updated_at: new Date() }).where("wash_batch_id", "=", row.id).execute();
  await trx.updateTable("wash_batches").set({ state: "cancelled", version: row.version + 1, updated_at: new Date() }).where("id", "=", row.id).execute();
  await recordEvents(trx, [{ entity: "wash_batch", entity_id: row.id, kind: "state", from_state: row.state, to_state: "cancelled", actor_id: actorId, reason: input.reason || null }]);
  return getWash(trx, ctx, row.id);
}
