import { sql, type Transaction } from "kysely";
import type { DB } from "@/db/schema";
import { scheduleAdvance } from "@/db/jobs/advance";
import { AppError } from "@/lib/errors";
import { checkFurnaceAdd, currentLayout, emptyLayout, layoutWithout, packFurnace, profileLabel } from "@/lib/batches/rules";
import type { BookingState } from "@/lib/batches/types";
import type { TrayRun } from "@/lib/packing/types";
import { listBoardUnits, type Db, type ShopContext } from "@/db/batches/reads";
import { cycleMinutesFor } from "@/lib/batches/board-unit";
import { lockRowOrThrow, recordEvents, requireVersion, type EventRow } from "@/db/versioned";
import { checkBookingStart, lockUnit } from "@/db/wash-batches/commands";
import { refuse, getRun, profileOf, furnaceOf } from "./reads";

type Trx = Transaction<DB>;
const MIN = 60_000;

/** Locks a furnace run; given the version the person saw, a run that has moved on is a 409. */
export async function lockFurnaceRun(trx: Trx, id: string, version?: number) {
  const row = await lockRowOrThrow(trx, "furnace_runs", id, "That furnace run does not exist.");
  requireVersion(`Furnace run ${row.code}`, row.version, version);
  return row;
}

async function bumpRun(
  trx: Trx,
  row: { id: string; version: number },
  set: Partial<{
    state: BookingState; starts_at: Date | null; ends_at: Date | null; furnace_id: string; cycle_minutes: number; tray_layout: TrayRun;
    loaded_at: Date; unloaded_at: Date; started_by: string; unloaded_by: string; checklist: unknown;
  }>,
) {
  const values: Record<string, unknown> = { ...set, version: row.version + 1, updated_at: new Date() };
  if (set.tray_layout) values.tray_layout = JSON.stringify(set.tray_layout);
  if (set.checklist !== undefined) values.checklist = JSON.stringify(set.checklist);
  const updated = await trx.updateTable("furnace_runs").set(values).where("id", "=", row.id).returning(["id", "version", "state", "ends_at"]).executeTakeFirstOrThrow();
  if (updated.ends_at && ["scheduled", "running", "complete"].includes(updated.state)) {
    await scheduleAdvance(trx, { entity: "furnace_run", id: updated.id, version: updated.version, due_at: new Date(updated.ends_at).toISOString() });
  }
  return updated;
}

export async function createFurnaceRun(trx: Trx, ctx: ShopContext, input: { furnace_id: string; profile_id: string; notes: string }, actorId: string) {
  const furnace = await furnaceOf(trx, ctx, input.furnace_id);
  const profile = await profileOf(trx, ctx, input.profile_id);
  const retired = await trx.selectFrom("sinter_profiles").select("retired").where("id", "=", profile.id).executeTakeFirstOrThrow();
  if (retired.retired) throw refuse("profile", `Profile ${profile.label} has been replaced by a newer revision; plan with that one.`, "profile_id");
  if (!furnace.profile_ids.includes(profile.id)) throw refuse("profile", `${furnace.name} does not run profile ${profile.label}.`, "profile_id");
  const layout = emptyLayout(packFurnace(furnace, ctx.profiles), profileLabel(profile));
  const row = await trx
    .insertInto("furnace_runs")
    .values({
      code: sql<string>`'R-' || nextval('furnace_run_code_seq')`,
      furnace_id: furnace.id,
      profile_id: profile.id,
      cycle_minutes: cycleMinutesFor(profile, furnace),
      tray_layout: JSON.stringify(layout),
      notes: input.notes,
      created_by: actorId,
    })
    .returning(["id"])
    .executeTakeFirstOrThrow();
  await recordEvents(trx, [{ entity: "furnace_run", entity_id: row.id, kind: "state", to_state: "draft", actor_id: actorId, reason: `created on ${furnace.name} with ${profile.label}` }]);
  return getRun(trx, ctx, row.id);
}

async function detachFromOpenRun(trx: Trx, ctx: ShopContext, unit: { id: string; furnace_run_id: string | null }, exceptId: string, actorId: string) {
  if (!unit.furnace_run_id || unit.furnace_run_id === exceptId) return;
  const other = await lockFurnaceRun(trx, unit.furnace_run_id);
  if (!["draft", "scheduled"].includes(other.state)) return;
  const furnace = await furnaceOf(trx, ctx, other.furnace_id);
  const profile = await profileOf(trx, ctx, other.profile_id);
  const rest = (await listBoardUnits(trx, ctx, { kind: "furnace_run", ids: [other.id] })).filter((u) => u.id !== unit.id);
  const stored = (other.tray_layout as TrayRun | null) ?? emptyLayout(packFurnace(furnace, ctx.profiles), profile.label);
  await bumpRun(trx, other, { tray_layout: layoutWithout(stored, unit.id, rest, furnace, profile, ctx.profiles) });
  await recordEvents(trx, [{ entity: "furnace_run", entity_id: other.id, kind: "unit_removed", actor_id: actorId, data: { unit_id: unit.id, moved_to: exceptId } }]);
}

export async function addUnitToRun(
  trx: Trx,
  ctx: ShopContext,
  input: { runId: string; version: number; unitId: string; unitVersion: number },
  actorId: string,
) {
  const row = await lockFurnaceRun(trx, input.runId, input.version);
  const unitRow = await lockUnit(trx, input.unitId, input.unitVersion);
  const furnace = await furnaceOf(trx, ctx, row.furnace_id);
  await profileOf(trx, ctx, row.profile_id);
  const runUnits = await listBoardUnits(trx, ctx, { kind: "furnace_run", ids: [row.id] });
  const [unit] = await listBoardUnits(trx, ctx, { kind: "ids", ids: [unitRow.id] });
  const verdict = checkFurnaceAdd(
    { state: row.state, tray_layout: row.tray_layout as TrayRun | null, profile_id: row.profile_id, code: row.code, starts_at: row.starts_at ? new Date(row.starts_at).toISOString() : null },
    runUnits,
    unit,
    furnace,
    ctx.profiles,
    ctx.clearance_mm,
  );
  if (!verdict.ok) throw refuse(verdict.code, verdict.reason);
  await detachFromOpenRun(trx, ctx, unitRow, row.id, actorId);
  await trx.updateTable("units").set({ furnace_run_id: row.id, version: unitRow.version + 1, updated_at: new Date() }).where("id", "=", unitRow.id).execute();
  await bumpRun(trx, row, { tray_layout: verdict.layout });
  await recordEvents(trx, [{ entity: "furnace_run", entity_id: row.id, kind: "unit_added", actor_id: actorId, data: { unit_id: unitRow.id, serial: unitRow.serial, repacked: verdict.repacked } }]);
  return getRun(trx, ctx, row.id);
}

export async function removeUnitFromRun(
  trx: Trx,
  ctx: ShopContext,
  input: { runId: string; version: number; unitId: string; unitVersion?: number },
  actorId: string,
) {
  const row = await lockFurnaceRun(trx, input.runId, input.version);
  if (!["draft", "scheduled"].includes(row.state)) throw refuse("state", `Run ${row.code} is ${row.state}; units can only leave a draft or scheduled run.`);
  const unitRow = await lockUnit(trx, input.unitId, input.unitVersion);
  if (unitRow.furnace_run_id !== row.id) throw new AppError("conflict", `Unit ${unitRow.serial} is no longer in ${row.code}; reload to see where it went.`);
  const furnace = await furnaceOf(trx, ctx, row.furnace_id);
  const profile = await profileOf(trx, ctx, row.profile_id);
  await trx.updateTable("units").set({ furnace_run_id: null, version: unitRow.version + 1, updated_at: new Date() }).where("id", "=", unitRow.id).execute();
  const rest = await listBoardUnits(trx, ctx, { kind: "furnace_run", ids: [row.id] });
  const stored = (row.tray_layout as TrayRun | null) ?? emptyLayout(packFurnace(furnace, ctx.profiles), profile.label);
  await bumpRun(trx, row, { tray_layout: layoutWithout(stored, unitRow.id, rest, furnace, profile, ctx.profiles) });
  await recordEvents(trx, [{ entity: "furnace_run", entity_id: row.id, kind: "unit_removed", actor_id: actorId, data: { unit_id: unitRow.id, serial: unitRow.serial } }]);
  return getRun(trx, ctx, row.id);
}

/** Books (or moves) a run: its length is its profile's cycle on that furnace, never a resize. */
export async function scheduleRun(
  trx: Trx,
  ctx: ShopContext,
  input: { runId: string; version: number; starts_at: string; furnace_id?: string; ends_at?: string },
  actorId: string,
) {
  const row = await lockFurnaceRun(trx, input.runId, input.version);
  if (!["draft", "scheduled"].includes(row.state)) throw refuse("state", `Run ${row.code} is ${row.state}; only a draft or scheduled run can be moved.`, "starts_at");
  const furnace = await furnaceOf(trx, ctx, input.furnace_id ?? row.furnace_id);
  const profile = await profileOf(trx, ctx, row.profile_id);
  if (!furnace.profile_ids.includes(profile.id)) throw refuse("profile", `${furnace.name} does not run profile ${profile.label}.`, "furnace_id");
  const cycle = cycleMinutesFor(profile, furnace);
  const start = new Date(input.starts_at);
  const end = new Date(start.getTime() + cycle * MIN);
  if (input.ends_at && Math.abs(new Date(input.ends_at).getTime() - end.getTime()) > MIN) {
    throw refuse("resize", `A run lasts as long as its profile's cycle on ${furnace.name} (${cycle} min); it cannot be stretched or shortened.`, "ends_at");
  }
  const units = await listBoardUnits(trx, ctx, { kind: "furnace_run", ids: [row.id] });
  const late = units.find((u) => u.state === "washing" && u.ready_at && new Date(u.ready_at) > start);
  if (late) throw refuse("timing", `${late.serial} is still washing and drying until ${new Date(late.ready_at!).toISOString()}; the run cannot load before then.`, "starts_at");
  // Another furnace has other trays: the units are packed afresh there.
  const layout = currentLayout(furnace.id === row.furnace_id ? (row.tray_layout as TrayRun | null) : null, units, furnace, profile, ctx.profiles, ctx.clearance_mm);
  if (!layout.ok) throw refuse(layout.code, `${row.code} does not fit ${furnace.name}: ${layout.reason}`, "furnace_id");
  await checkBookingStart(trx, ctx, "furnace", furnace.id, start, end);
  await bumpRun(trx, row, { state: "scheduled", furnace_id: furnace.id, starts_at: start, ends_at: end, cycle_minutes: cycle, tray_layout: layout.layout });
  await recordEvents(trx, [
    {
      entity: "furnace_run", entity_id: row.id, kind: "schedule", from_state: row.state, to_state: "scheduled", actor_id: actorId,
      data: { furnace_id: furnace.id, starts_at: start.toISOString(), ends_at: end.toISOString(), previous: { furnace_id: row.furnace_id, starts_at: row.starts_at } },
    },
  ]);
  return getRun(trx, ctx, row.id);
}

export async function startRun(trx: Trx, ctx: ShopContext, input: { runId: string; version: number; checklist: Record<string, boolean> }, actorId: string) {
  const row = await lockFurnaceRun(trx, input.runId, input.version);
  if (!["draft", "scheduled"].includes(row.state)) throw refuse("state", `Run ${row.code} is ${row.state}; it cannot start again.`, "state");
  const furnace = await furnaceOf(trx, ctx, row.furnace_id);
  const profile = await profileOf(trx, ctx, row.profile_id);
  const units = await listBoardUnits(trx, ctx, { kind: "furnace_run", ids: [row.id] });
  if (units.length === 0) throw refuse("empty", `${row.code} is empty; load brown units first.`, "state");
  const notBrown = units.filter((u) => u.state !== "brown");
  if (notBrown.length) throw refuse("unit_state", `Only brown units go into the furnace: ${notBrown.map((u) => `${u.serial} is ${u.state.replace(/_/g, " ")}`).join(", ")}.`, "state");
  const layout = currentLayout(row.tray_layout as TrayRun | null, units, furnace, profile, ctx.profiles, ctx.clearance_mm);
  if (!layout.ok) throw refuse(layout.code, layout.reason, "state");
  const now = ctx.now;
  const cycle = cycleMinutesFor(profile, furnace);
  const end = new Date(now.getTime() + cycle * MIN);
  await checkBookingStart(trx, ctx, "furnace", furnace.id, now, end);
  await trx
    .updateTable("units")
    .set({ state: "sintering", version: sql<number>`version + 1`, state_changed_at: now, updated_at: now })
    .where("id", "in", units.map((u) => u.id))
    .execute();
  await bumpRun(trx, row, {
    state: "running", starts_at: now, ends_at: end, cycle_minutes: cycle, loaded_at: now, started_by: actorId,
    checklist: { ...input.checklist, confirmed_at: now.toISOString(), confirmed_by: actorId }, tray_layout: layout.layout,
  });
  await recordEvents(trx, [
    { entity: "furnace_run", entity_id: row.id, kind: "state", from_state: row.state, to_state: "running", actor_id: actorId, data: { ends_at: end.toISOString(), checklist: input.checklist } },
    ...units.map((u) => ({ entity: "unit", entity_id: u.id, kind: "state", from_state: "brown", to_state: "sintering", actor_id: actorId, reason: `furnace run ${row.code} started` })),
  ]);
  return getRun(trx, ctx, row.id);
}

const OUT_OF_FURNACE = ["sintering", "sintered", "ready_for_finishing"] as const;

/**
 * The furnace is open: each unit is sintered or scrapped with a reason. The worker normally
 * completed the run at its end already; when it has not, the unload completes it.
 */
export async function unloadRun(
  trx: Trx,
  ctx: ShopContext,
  input: { runId: string; version: number; outcomes: { unit_id: string; outcome: "sintered" | "scrapped"; scrap_reason?: string; scrap_note?: string }[] },
  actorId: string,
) {
  const row = await lockFurnaceRun(trx, input.runId, input.version);
  if (row.unloaded_at) throw refuse("state", `Run ${row.code} was unloaded already.`, "state");
  if (!(row.state === "complete" || row.state === "running")) throw refuse("state", `Run ${row.code} is ${row.state}; only a run that has been in the furnace can be unloaded.`, "state");
  const now = ctx.now;
  if (row.state === "running" && row.ends_at && now < new Date(row.ends_at)) {
    throw refuse("early", `Run ${row.code} is still in its cycle until ${new Date(row.ends_at).toISOString()}; unload after the cool-down.`, "state");
  }
  const units = await listBoardUnits(trx, ctx, { kind: "furnace_run", ids: [row.id] });
  const present = units.filter((u) => (OUT_OF_FURNACE as readonly string[]).includes(u.state));
  const errors: Record<string, string[]> = {};
  for (const u of present) if (!input.outcomes.some((o) => o.unit_id === u.id)) errors[`${u.id}.outcome`] = [`give an outcome for ${u.serial}`];
  input.outcomes.forEach((o, i) => {
    if (!present.some((u) => u.id === o.unit_id)) errors[`outcomes.${i}.unit_id`] = ["that unit is not waiting to be unloaded from this run"];
  });
  if (Object.keys(errors).length) throw new AppError("invalid", Object.values(errors)[0][0], errors);
  const events: EventRow[] = [];
  for (const o of input.outcomes) {
    const u = present.find((x) => x.id === o.unit_id)!;
    const unit = await lockUnit(trx, u.id);
    if (o.outcome === "scrapped") {
      await trx
        .updateTable("units")
        .set({ state: "scrapped", scrap_reason: o.scrap_reason as never, scrap_note: o.scrap_note ?? null, state_changed_at: now, version: unit.version + 1, updated_at: now })
        .where("id", "=", u.id)
        .execute();
      events.push({ entity: "unit", entity_id: u.id, kind: "state", from_state: unit.state, to_state: "scrapped", actor_id: actorId, reason: `${o.scrap_reason}${o.scrap_note ? `: ${o.scrap_note}` : ""} (unload of ${row.code})` });
    } else if (unit.state === "sintering") {
      // The worker's job did not get there first: move the unit on as it would have.
      await trx.updateTable("units").set({ state: "sintered", state_changed_at: now, version: unit.version + 1, updated_at: now }).where("id", "=", u.id).execute();
      events.push({ entity: "unit", entity_id: u.id, kind: "state", from_state: "sintering", to_state: "sintered", actor_id: actorId, reason: `unloaded from ${row.code}` });
    } else {
      events.push({ entity: "unit", entity_id: u.id, kind: "unload", from_state: unit.state, to_state: unit.state, actor_id: actorId, reason: `sintered; unloaded from ${row.code}` });
    }
  }
  await bumpRun(trx, row, { state: "complete", unloaded_at: now, unloaded_by: actorId });
  events.push({
    entity: "furnace_run", entity_id: row.id, kind: row.state === "running" ? "state" : "unload", from_state: row.state, to_state: "complete", actor_id: actorId,
    data: { sintered: input.outcomes.filter((o) => o.outcome === "sintered").length, scrapped: input.outcomes.filter((o) => o.outcome === "scrapped").length },
  });
  await recordEvents(trx, events);
  return getRun(trx, ctx, row.id);
}

export async function cancelRun(trx: Trx, ctx: ShopContext, input: { runId: string; version: number; reason: string }, actorId: string) {
  const row = await lockFurnaceRun(trx, input.runId, input.version);
  if (!["draft", "scheduled"].includes(row.state)) throw refuse("state", `Run ${row.code} is ${row.state}; only a draft or scheduled run can be cancelled.`, "state");
  await trx.updateTable("units").set({ furnace_run_id: null, version: sql<number>`version + 1`, updated_at: new Date() }).where("furnace_run_id", "=", row.id).execute();
  await trx.updateTable("furnace_runs").set({ state: "cancelled", version: row.version + 1, updated_at: new Date() }).where("id", "=", row.id).execute();
  await recordEvents(trx, [{ entity: "furnace_run", entity_id: row.id, kind: "state", from_state: row.state, to_state: "cancelled", actor_id: actorId, reason: input.reason || null }]);
  return getRun(trx, ctx, row.id);
}

// Applying a proposal -------------------------------------------------------------------------------

type ProposalUnits = { id: string; version: number; serial: string }[];

/**
 * Books a stored proposal exactly as it was shown, in one transaction: every unit must still be
 * the version the planner saw and still be waiting, or nothing is booked (409).
 */
export async function applyProposal(trx: Trx, ctx: ShopContext, proposalId: string, actorId: string) {
  const p = await trx.selectFrom("batch_proposals").selectAll().where("id", "=", proposalId).forUpdate().executeTakeFirst();
  if (!p) throw new AppError("not_found", "That proposal does not exist.");
  if (p.status !== "open") throw new AppError("conflict", `That proposal was ${p.status} already.`);
  const wash = p.wash as unknown as { wash_station_id: string; starts_at: string; ends_at: string; est_minutes: number; units: ProposalUnits }[];
  const runs = p.furnace as unknown as { furnace_id: string; profile_id: string; starts_at: string; ends_at: string; cycle_minutes: number; tray_layout: TrayRun; units: ProposalUnits }[];
  const all = [...wash.flatMap((w) => w.units), ...runs.flatMap((r) => r.units)];
  if (!all.length) throw new AppError("invalid", "That proposal books nothing.");
  const rows = await trx.selectFrom("units").select(["id", "serial", "version"]).where("id", "in", all.map((u) => u.id)).forUpdate().execute();
  const changed = all.filter((u) => rows.find((r) => r.id === u.id)?.version !== u.version);
  if (changed.length) {
    throw new AppError("conflict", `The proposal is out of date: ${changed.slice(0, 5).map((u) => u.serial).join(", ")}${changed.length > 5 ? ` and ${changed.length - 5} more` : ""} changed since it was made. Suggest again.`, undefined, {
      changed: changed.map((u) => u.id),
    });
  }
  const stale = (err: unknown) => {
    if (err instanceof AppError && err.code === "invalid") return new AppError("conflict", `The proposal is out of date: ${err.message} Suggest again.`);
    return err;
  };
  const waitingWash = new Set((await listBoardUnits(trx, ctx, { kind: "waiting_wash" })).map((u) => u.id));
  const waitingFurnaceUnits = await listBoardUnits(trx, ctx, { kind: "waiting_furnace", horizon: new Date(8.64e15) });
  const waitingFurnace = new Map(waitingFurnaceUnits.map((u) => [u.id, u]));
  const created = { wash_batches: [] as string[], furnace_runs: [] as string[] };
  for (const w of wash) {
    const gone = w.units.find((u) => !waitingWash.has(u.id));
    if (gone) throw new AppError("conflict", `The proposal is out of date: ${gone.serial} is no longer waiting for a wash. Suggest again.`);
    const start = new Date(w.starts_at);
    const end = new Date(w.ends_at);
    try {
      await checkBookingStart(trx, ctx, "wash", w.wash_station_id, start, end);
    } catch (err) {
      throw stale(err);
    }
    const row = await trx
      .insertInto("wash_batches")
      .values({ code: sql<string>`'W-' || nextval('wash_batch_code_seq')`, wash_station_id: w.wash_station_id, state: "scheduled", starts_at: start, ends_at: end, est_minutes: w.est_minutes, created_by: actorId })
      .returning(["id", "version", "ends_at"])
      .executeTakeFirstOrThrow();
    await trx.updateTable("units").set({ wash_batch_id: row.id, version: sql<number>`version + 1`, updated_at: new Date() }).where("id", "in", w.units.map((u) => u.id)).execute();
    await scheduleAdvance(trx, { entity: "wash_batch", id: row.id, version: row.version, due_at: end.toISOString() });
    await recordEvents(trx, [{ entity: "wash_batch", entity_id: row.id, kind: "schedule", to_state: "scheduled", actor_id: actorId, reason: "accepted proposal", data: { proposal_id: p.id, units: w.units.length } }]);
    created.wash_batches.push(row.id);
  }
  for (const r of runs) {
    const gone = r.units.find((u) => !waitingFurnace.has(u.id));
    if (gone) throw new AppError("conflict", `The proposal is out of date: ${gone.serial} is no longer waiting for a furnace. Suggest again.`);
    const furnace = await furnaceOf(trx, ctx, r.furnace_id);
    const profile = await profileOf(trx, ctx, r.profile_id);
    const members = r.units.map((u) => waitingFurnace.get(u.id)!);
    const layout = currentLayout(r.tray_layout, members, furnace, profile, ctx.profiles, ctx.clearance_mm);
    if (!layout.ok) throw new AppError("conflict", `The proposal is out of date: ${layout.reason}. Suggest again.`);
    const start = new Date(r.starts_at);
    const end = new Date(start.getTime() + cycleMinutesFor(profile, furnace) * MIN);
    try {
      await checkBookingStart(trx, ctx, "furnace", furnace.id, start, end);
    } catch (err) {
      throw stale(err);
    }
    const row = await trx
      .insertInto("furnace_runs")
      .values({
        code: sql<string>`'R-' || nextval('furnace_run_code_seq')`, furnace_id: furnace.id, profile_id: profile.id, state: "scheduled",
        starts_at: start, ends_at: end, cycle_minutes: cycleMinutesFor(profile, furnace), tray_layout: JSON.stringify(layout.layout), created_by: actorId,
      })
      .returning(["id", "version"])
      .executeTakeFirstOrThrow();
    await trx.updateTable("units").set({ furnace_run_id: row.id, version: sql<number>`version + 1`, updated_at: new Date() }).where("id", "in", r.units.map((u) => u.id)).execute();
    await scheduleAdvance(trx, { entity: "furnace_run", id: row.id, version: row.version, due_at: end.toISOString() });
    await recordEvents(trx, [{ entity: "furnace_run", entity_id: row.id, kind: "schedule", to_state: "scheduled", actor_id: actorId, reason: "accepted proposal", data: { proposal_id: p.id, units: r.units.length } }]);
    created.furnace_runs.push(row.id);
  }
  await trx.updateTable("batch_proposals").set({ status: "applied", decided_by: actorId, decided_at: new Date() }).where("id", "=", p.id).execute();
  return created;
}

export async function refuseProposal(db: Db, proposalId: string, reason: string, actorId: string) {
  const res = await db
    .updateTable("batch_proposals")
    .set({ status: "refused", decided_by: actorId, decided_at: new Date(), refusal: reason || null })
    .where("id", "=", proposalId)
    .where("status", "=", "open")
    .executeTakeFirst();
  if (Number(res.numUpdatedRows) === 0) throw new AppError("conflict", "That proposal was decided already or does not exist.");
}
