import { sql, type Transaction } from "kysely";
import type { Database } from "@/db/client";
import type { DB } from "@/db/schema";
import { AppError } from "@/lib/errors";
import { judgePrinter, type PrinterSpec, type PrinterVerdict } from "@/lib/builds/estimate";
import type { BuildAction, CreateBuild, ScheduleBuild, UpdateBuild } from "@/lib/builds/schemas";
import { scheduleAdvance } from "@/db/jobs/advance";
import { staffedHoursFor } from "@/lib/floor/plan";
import { runSearch } from "@/db/compute/run";
import { getShopPlanning, listPrinterSpecs, listUnscheduledBuilds, printerBlockedFrom, unitSpecsForBuilds } from "@/db/floor/reads";
import { verdictsForBuilds } from "./reads";
import { assertLotFitsBuild, correctDraws, drawForBuild } from "@/db/inventory/commands";
import { shortAmongProposed } from "@/db/inventory/reads";
import { lockRowOrThrow, recordEvents, requireVersion, type EventRow } from "@/db/versioned";

type Trx = Transaction<DB>;
const fmt = (d: Date) => d.toISOString().slice(0, 16).replace("T", " ") + " UTC";

export async function lockBuildOrThrow(trx: Trx, id: string) {
  return lockRowOrThrow(trx, "builds", id, "That build does not exist (it may have been deleted).");
}

const checkVersion = (row: { version: number; code: string }, version: number) => requireVersion(row.code, row.version, version);

const writeEvent = (trx: Trx, e: Omit<EventRow, "entity"> & { entity?: string }) => recordEvents(trx, [{ ...e, entity: e.entity ?? "build" }]);

/** Locks the units chosen for a build, in id order (two edits of overlapping units cannot deadlock). */
function lockUnitsForBuild(trx: Trx, ids: string[]) {
  return trx
    .selectFrom("units as u")
    .innerJoin("parts as p", "p.id", "u.part_id")
    .select(["u.id", "u.serial", "u.state", "u.build_id", "p.material_id"])
    .where("u.id", "in", ids)
    .orderBy("u.id")
    .forUpdate("u")
    .execute();
}

/** Units become a build: all planned, none on another build, one material. */
export async function insertBuild(trx: Trx, input: CreateBuild, actorId: string) {
  const ids = [...new Set(input.unit_ids)];
  const units = await lockUnitsForBuild(trx, ids);
  const problems: string[] = [];
  if (units.length !== ids.length) problems.push(`${ids.length - units.length} of the chosen units no longer exist`);
  for (const u of units) {
    if (u.state !== "planned") problems.push(`${u.serial} is ${u.state.replaceAll("_", " ")}, not planned`);
    else if (u.build_id) problems.push(`${u.serial} is already on a build`);
  }
  const materials = new Set(units.map((u) => u.material_id));
  if (materials.size > 1) problems.push("the units are of more than one material; a build prints one material");
  if (problems.length) throw new AppError("invalid", problems[0], { unit_ids: problems });
  const code = await sql<{ code: string }>`select 'B-' || nextval('build_code_seq') as code`.execute(trx);
  const build = await trx
    .insertInto("builds")
    .values({
      code: code.rows[0].code,
      material_id: units[0].material_id,
      material_lot: input.material_lot,
      notes: input.notes,
      state: "draft",
      created_by: actorId,
    })
    .returningAll()
    .executeTakeFirstOrThrow();
  await trx.updateTable("units").set({ build_id: build.id, updated_at: sql`now()`, version: sql`version + 1` }).where("id", "in", ids).execute();
  await writeEvent(trx, { entity_id: build.id, kind: "state", from_state: null, to_state: "draft", actor_id: actorId, data: { unit_ids: ids } });
  return build;
}

export async function updateBuild(trx: Trx, id: string, input: UpdateBuild, actorId: string) {
  const build = await lockBuildOrThrow(trx, id);
  checkVersion(build, input.version);
  if (input.feedstock_lot_id !== undefined) {
    if (build.state !== "draft" && build.state !== "scheduled") {
      throw new AppError("invalid", `${build.code} is ${build.state}; its feedstock was drawn when it started.`, { feedstock_lot_id: ["only before the build starts"] });
    }
    await assertLotFitsBuild(trx, build, input.feedstock_lot_id);
  }
  if (input.unit_ids) {
    if (build.state !== "draft") {
      throw new AppError("invalid", `${build.code} is ${build.state}; take it off the floor before changing its units.`, { unit_ids: ["only a draft build's units can change"] });
    }
    const ids = [...new Set(input.unit_ids)];
    const units = await lockUnitsForBuild(trx, ids);
    const bad = units.filter((u) => u.material_id !== build.material_id || u.state !== "planned" || (u.build_id && u.build_id !== id));
    if (units.length !== ids.length || bad.length) {
      throw new AppError("invalid", "Every unit must be planned, of the build's material and on no other build.", { unit_ids: bad.map((u) => u.serial) });
    }
    await trx.updateTable("units").set({ build_id: null, updated_at: sql`now()`, version: sql`version + 1` }).where("build_id", "=", id).where("id", "not in", ids).execute();
    await trx.updateTable("units").set({ build_id: id, updated_at: sql`now()`, version: sql`version + 1` }).where("id", "in", ids).execute();
  }
  const row = await trx
    .updateTable("builds")
    .set({
      ...(input.material_lot !== undefined ? { material_lot: input.material_lot } : {}),
      ...(input.feedstock_lot_id !== undefined ? { feedstock_lot_id: input.feedstock_lot_id } : {}),
      ...(input.notes !== undefined ? { notes: input.notes } : {}),
      version: sql`version + 1`,
      updated_at: sql`now()`,
    })
    .where("id", "=", id)
    .returningAll()
    .executeTakeFirstOrThrow();
  await writeEvent(trx, { entity_id: id, kind: "edit", actor_id: actorId, data: input });
  return row;
}

export type ScheduleContext = { printers?: PrinterSpec[]; clearanceMm?: number };

/** The printers and the plate clearance a move is judged against, read side by side. */
export async function scheduleContext(db: Database): Promise<ScheduleContext> {
  const [printers, shop] = await Promise.all([listPrinterSpecs(db), getShopPlanning(db)]);
  return { printers, clearanceMm: shop.plate_clearance_mm };
}

/**
 * Puts a draft or scheduled build on a printer, or takes it off. The printer row is locked so
 * that bookings of one printer are made one at a time: the second of two overlapping moves
 * sees the first and is refused with the reason; the exclusion constraint stays the last guard.
 */
export async function scheduleBuild(trx: Trx, id: string, input: ScheduleBuild, actorId: string, ctx: ScheduleContext = {}) {
  const build = await lockBuildOrThrow(trx, id);
  checkVersion(build, input.version);
  if (build.state !== "draft" && build.state !== "scheduled") {
    throw new AppError("conflict", `${build.code} is ${build.state}; only draft and scheduled builds can be moved.`, undefined, { current_version: build.version });
  }
  const from = { printer_id: build.printer_id, starts_at: build.starts_at, ends_at: build.ends_at, state: build.state };
  if (input.printer_id === null) {
    const row = await trx
      .updateTable("builds")
      .set({ state: "draft", printer_id: null, starts_at: null, ends_at: null, plate_layout: null, version: sql`version + 1`, updated_at: sql`now()` })
      .where("id", "=", id)
      .where("version", "=", input.version)
      .returningAll()
      .executeTakeFirstOrThrow();
    await writeEvent(trx, { entity_id: id, kind: "schedule", from_state: build.state, to_state: "draft", actor_id: actorId, data: { from, to: null } });
    return { build: row, verdict: null as PrinterVerdict | null };
  }
  const printers = ctx.printers ?? (await listPrinterSpecs(trx));
  const printer = printers.find((p) => p.id === input.printer_id);
  if (!printer) throw new AppError("invalid", "That printer does not exist.", { printer_id: ["no such printer"] });
  const clearance = ctx.clearanceMm ?? (await getShopPlanning(trx)).plate_clearance_mm;
  const units = (await unitSpecsForBuilds(trx, [id])).get(id) ?? [];
  const verdict = judgePrinter(units, build.material_id, printer, clearance);
  if (!verdict.ok || verdict.est_minutes === null) {
    throw new AppError("invalid", `${build.code} cannot go on ${printer.name}: ${verdict.reason}.`, { printer_id: [verdict.reason ?? "incompatible"] });
  }
  const start = new Date(input.starts_at!);
  const end = new Date(start.getTime() + verdict.est_minutes * 60_000);

  await trx.selectFrom("printers").select("id").where("id", "=", printer.id).forUpdate().execute();
  const maintenance = await trx
    .selectFrom("maintenance_windows")
    .select(["starts_at", "ends_at", "reason"])
    .where("printer_id", "=", printer.id)
    .where(sql<boolean>`tstzrange(starts_at, ends_at) && tstzrange(${start}::timestamptz, ${end}::timestamptz)`)
    .executeTakeFirst();
  if (maintenance) {
    throw new AppError(
      "conflict",
      `${build.code} (${fmt(start)} to ${fmt(end)}) would run into ${printer.name}'s maintenance window${maintenance.reason ? ` "${maintenance.reason}"` : ""} from ${fmt(maintenance.starts_at)} to ${fmt(maintenance.ends_at)}.`,
      undefined,
      { current_version: build.version, reason: "maintenance" },
    );
  }
  const clash = await trx
    .selectFrom("builds")
    .select(["code", "starts_at", "ends_at"])
    .where("printer_id", "=", printer.id)
    .where("id", "<>", id)
    .where("state", "in", ["scheduled", "running", "complete"])
    .where(sql<boolean>`tstzrange(starts_at, ends_at) && tstzrange(${start}::timestamptz, ${end}::timestamptz)`)
    .executeTakeFirst();
  if (clash) {
    throw new AppError(
      "conflict",
      `${build.code} needs ${printer.name} from ${fmt(start)} to ${fmt(end)}, but ${clash.code} is booked there from ${fmt(clash.starts_at!)} to ${fmt(clash.ends_at!)}.`,
      undefined,
      { current_version: build.version, reason: "overlap", with: clash.code },
    );
  }
  const row = await trx
    .updateTable("builds")
    .set({
      state: "scheduled",
      printer_id: printer.id,
      starts_at: start,
      ends_at: end,
      est_minutes: verdict.est_minutes,
      plate_layout: JSON.stringify(verdict.layout),
      version: sql`version + 1`,
      updated_at: sql`now()`,
    })
    .where("id", "=", id)
    .where("version", "=", input.version)
    .returningAll()
    .executeTakeFirstOrThrow();
  await writeEvent(trx, {
    entity_id: id,
    kind: "schedule",
    from_state: build.state,
    to_state: "scheduled",
    actor_id: actorId,
    data: { from, to: { printer_id: printer.id, starts_at: start, ends_at: end } },
  });
  await scheduleAdvance(trx, { entity: "build", id, version: row.version, due_at: end.toISOString() });
  return { build: row, verdict };
}

/** Start, complete, fail or cancel a build; units follow (printing, green, scrapped). */
export async function applyBuildAction(trx: Trx, id: string, input: BuildAction, actorId: string) {
  const build = await lockBuildOrThrow(trx, id);
  checkVersion(build, input.version);
  const now = new Date();
  const refuse = (what: string) => {
    throw new AppError("conflict", `${build.code} is ${build.state}; it cannot be ${what}.`, undefined, { current_version: build.version });
  };
  const unitEvents = async (ids: { id: string; state: string }[], to: string, reason: string | null) => {
    if (!ids.length) return;
    await trx
      .insertInto("events")
      .values(ids.map((u) => ({ entity: "unit", entity_id: u.id, kind: "state", from_state: u.state, to_state: to, actor_id: actorId, reason, data: JSON.stringify({ build_id: id }) })))
      .execute();
  };
  const unitsOf = (states: Array<"planned" | "printing">) =>
    trx.selectFrom("units").select(["id", "state", "serial", "part_id"]).where("build_id", "=", id).where("state", "in", states).forUpdate().execute();

  let set: Record<string, unknown> = {};
  let toState: string = build.state;
  let newEnd: Date | null = null;
  if (input.action === "start") {
    if (build.state !== "scheduled") refuse("started");
    const units = await unitsOf(["planned"]);
    if (!units.length) throw new AppError("invalid", `${build.code} has no units to print.`);
    await trx.updateTable("units").set({ state: "printing", state_changed_at: now, updated_at: now, version: sql`version + 1` }).where("id", "in", units.map((u) => u.id)).execute();
    await unitEvents(units, "printing", "build started");
    // The factors the build is printed with: a later calibration changes new scale-ups, not this build.
    const material = await trx.selectFrom("materials").select(["code", "shrink_xy", "shrink_z", "version"]).where("id", "=", build.material_id).executeTakeFirstOrThrow();
    const scale_snapshot = JSON.stringify({
      material: material.code, material_version: material.version, shrink_xy: material.shrink_xy, shrink_z: material.shrink_z,
      xy: 1 / (1 - material.shrink_xy), z: 1 / (1 - material.shrink_z), taken_at: now.toISOString(),
    });
    await drawForBuild(trx, build, actorId, now);
    set = { state: "running", started_at: now, scale_snapshot };
    toState = "running";
  } else if (input.action === "complete") {
    if (build.state !== "running") refuse("completed");
    const units = await unitsOf(["printing"]);
    if (units.length) {
      await trx.updateTable("units").set({ state: "green", state_changed_at: now, updated_at: now, version: sql`version + 1` }).where("id", "in", units.map((u) => u.id)).execute();
      await unitEvents(units, "green", "build complete");
    }
    // Finishing early frees the rest of the slot for the next build.
    if (build.ends_at && build.starts_at && now < build.ends_at && now > build.starts_at) newEnd = now;
    set = { state: "complete", finished_at: now, ...(newEnd ? { ends_at: newEnd } : {}) };
    toState = "complete";
    await correctDraws(trx, build, input.feedstock_used_kg, actorId, "weighed at completion");
  } else if (input.action === "fail") {
    if (build.state !== "running" && build.state !== "scheduled") refuse("marked failed");
    const units = await unitsOf(["planned", "printing"]);
    if (units.length) {
      await trx
        .updateTable("units")
        .set({ state: "scrapped", scrap_reason: "print_failure", scrap_note: input.reason, state_changed_at: now, updated_at: now, version: sql`version + 1` })
        .where("id", "in", units.map((u) => u.id))
        .execute();
      await unitEvents(units, "scrapped", `print failure: ${input.reason}`);
      // Each scrapped unit is replaced by a planned one, so the order still gets its quantity.
      const replacements = await trx
        .insertInto("units")
        .values(units.map((u) => ({ part_id: u.part_id, serial: `${u.serial}-R${Date.now().toString(36).slice(-4)}`, state: "planned" as const })))
        .returning(["id", "serial"])
        .execute();
      await trx
        .insertInto("events")
        .values(replacements.map((r) => ({ entity: "unit", entity_id: r.id, kind: "state", from_state: null, to_state: "planned", actor_id: actorId, reason: `replaces a unit lost in ${build.code}` })))
        .execute();
    }
    if (build.state === "running") {
      await correctDraws(trx, build, input.feedstock_used_kg, actorId, `weighed after the failure: ${input.reason}`);
      if (build.ends_at && build.starts_at && now < build.ends_at && now > build.starts_at) newEnd = now;
      set = { state: "complete", failed: true, failure_reason: input.reason, finished_at: now, ...(newEnd ? { ends_at: newEnd } : {}) };
      toState = "complete";
    } else {
      set = { state: "cancelled", failed: true, failure_reason: input.reason };
      toState = "cancelled";
    }
  } else {
    if (build.state !== "draft" && build.state !== "scheduled") refuse("cancelled");
    await trx.updateTable("units").set({ build_id: null, updated_at: now, version: sql`version + 1` }).where("build_id", "=", id).where("state", "=", "planned").execute();
    set = { state: "cancelled" };
    toState = "cancelled";
  }
  const row = await trx
    .updateTable("builds")
    .set({ ...set, version: sql`version + 1`, updated_at: now })
    .where("id", "=", id)
    .where("version", "=", input.version)
    .returningAll()
    .executeTakeFirstOrThrow();
  await writeEvent(trx, { entity_id: id, kind: "state", from_state: build.state, to_state: toState, actor_id: actorId, reason: input.action === "fail" ? input.reason : null });
  if (row.ends_at && (row.state === "scheduled" || row.state === "running" || (row.state === "complete" && newEnd))) {
    await scheduleAdvance(trx, { entity: "build", id, version: row.version, due_at: new Date(row.ends_at).toISOString() });
  }
  return row;
}

// Printer-plan proposals ------------------------------------------------------------------------

export type PlanProposalItem = {
  /** Set when the build's material will not be on the shelf on its proposed day. */
  feedstock_short?: string;
  build_id: string;
  build_version: number;
  code: string;
  material_code: string;
  printer_id: string;
  printer_name: string;
  starts_at: string;
  ends_at: string;
  due_at: string | null;
  lateness_min: number;
};

/** Runs the planner over the draft builds and keeps the proposal so it can be applied as shown. */
export async function proposePrinterPlan(db: Database, opts: { build_ids?: string[]; from?: string; budget_ms?: number }, actorId: string) {
  const now = opts.from ? new Date(opts.from) : new Date();
  // Plans start on the next whole five minutes: a slot that begins 14:03:27 reads badly on a traveler.
  now.setUTCSeconds(0, 0);
  now.setUTCMinutes(Math.ceil(now.getUTCMinutes() / 5) * 5);
  const drafts = await listUnscheduledBuilds(db, opts.build_ids);
  const { verdicts, printers, shop } = await verdictsForBuilds(db, drafts);
  const blocked = await printerBlockedFrom(db, now);
  const t0 = performance.now();
  const { result, onThread } = await runSearch("floor", {
    now: now.getTime(),
    staffed: staffedHoursFor(shop.staffed_hours, shop.time_zone),
    budget_ms: opts.budget_ms,
    printers: printers.map((p) => ({ id: p.id, blocked: blocked.get(p.id) ?? [] })),
    builds: drafts.map((b) => ({
      id: b.id,
      due: b.due_at ? new Date(b.due_at).getTime() : null,
      minutes: Object.fromEntries((verdicts.get(b.id)?.verdicts ?? []).filter((v) => v.ok && v.est_minutes).map((v) => [v.printer_id, v.est_minutes!])),
    })),
  }, opts.budget_ms);
  const planMs = performance.now() - t0;
  const byId = new Map(drafts.map((b) => [b.id, b]));
  const printerName = new Map(printers.map((p) => [p.id, p.name]));
  const items: PlanProposalItem[] = result.items.map((i) => {
    const b = byId.get(i.build_id)!;
    return {
      build_id: b.id, build_version: b.version, code: b.code, material_code: b.material_code,
      printer_id: i.printer_id, printer_name: printerName.get(i.printer_id) ?? "?",
      starts_at: new Date(i.start).toISOString(), ends_at: new Date(i.end).toISOString(),
      due_at: b.due_at ? new Date(b.due_at).toISOString() : null, lateness_min: Math.round(i.lateness_min),
    };
  });
  const unplaced = result.unplaced.map((u) => {
    const b = byId.get(u.build_id)!;
    const reasons = (verdicts.get(u.build_id)?.verdicts ?? []).filter((v) => !v.ok).map((v) => v.reason);
    return { build_id: u.build_id, code: b.code, build_version: b.version, reason: u.reason, printer_reasons: reasons };
  });
  // Flagged, not refused: the technician may receive a lot before the build starts.
  const short = await shortAmongProposed(db, items, now);
  for (const item of items) if (short.has(item.build_id)) item.feedstock_short = short.get(item.build_id)!;
  const metrics = { ...result.metrics, plan_ms: Math.round(planMs * 10) / 10, on_thread: onThread };
  const row = await db
    .insertInto("plan_proposals")
    .values({ created_by: actorId, planned_from: now, items: JSON.stringify(items), unplaced: JSON.stringify(unplaced), metrics: JSON.stringify(metrics) })
    .returning(["id", "created_at", "status", "planned_from"])
    .executeTakeFirstOrThrow();
  return { proposal: { ...row, items, unplaced, metrics } };
}

/**
 * Applies every booking of a proposal in the caller's transaction, or none: a build that
 * changed since the proposal, a booking made meanwhile or a new maintenance window makes the
 * whole proposal stale (409), and the person proposes again.
 */
export async function applyPlanProposal(trx: Trx, id: string, actorId: string) {
  const proposal = await trx.selectFrom("plan_proposals").selectAll().where("id", "=", id).forUpdate().executeTakeFirst();
  if (!proposal) throw new AppError("not_found", "That plan proposal does not exist.");
  if (proposal.status !== "open") throw new AppError("conflict", `This proposal was already ${proposal.status}.`);
  const items = proposal.items as unknown as PlanProposalItem[];
  if (!items.length) throw new AppError("invalid", "The proposal books nothing.");
  const locked = await trx
    .selectFrom("builds")
    .select(["id", "code", "version", "state"])
    .where("id", "in", items.map((i) => i.build_id))
    .orderBy("id")
    .forUpdate()
    .execute();
  for (const item of items) {
    const b = locked.find((l) => l.id === item.build_id);
    if (!b || b.version !== item.build_version || b.state !== "draft") {
      throw new AppError("conflict", `The proposal is stale: ${item.code} changed after it was proposed. Propose again.`, undefined, { reason: "stale", build: item.code });
    }
  }
  const [printers, shop] = await Promise.all([listPrinterSpecs(trx), getShopPlanning(trx)]);
  for (const item of [...items].sort((a, b) => a.printer_id.localeCompare(b.printer_id) || a.starts_at.localeCompare(b.starts_at))) {
    try {
      const { build } = await scheduleBuild(trx, item.build_id, { version: item.build_version, printer_id: item.printer_id, starts_at: item.starts_at }, actorId, { printers, clearanceMm: shop.plate_clearance_mm });
      if (build.ends_at && new Date(build.ends_at).toISOString() !== item.ends_at) {
        throw new AppError("conflict", `The proposal is stale: ${item.code}'s print time changed after it was proposed. Propose again.`);
      }
    } catch (err) {
      if (err instanceof AppError && err.status === 409 && !err.message.startsWith("The proposal is stale")) {
        throw new AppError("conflict", `The proposal is stale: ${err.message} Propose again.`, undefined, err.details);
      }
      throw err;
    }
  }
  return trx
    .updateTable("plan_proposals")
    .set({ status: "applied", decided_by: actorId, decided_at: new Date() })
    .where("id", "=", id)
    .returningAll()
    .executeTakeFirstOrThrow();
}

export async function refusePlanProposal(db: Database, id: string, actorId: string | null, refusal: string) {
  return db
    .updateTable("plan_proposals")
    .set({ status: "refused", decided_by: actorId, decided_at: new Date(), refusal })
    .where("id", "=", id)
    .where("status", "=", "open")
    .returningAll()
    .executeTakeFirst();
}
