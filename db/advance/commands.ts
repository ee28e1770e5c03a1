import { sql, type Transaction } from "kysely";
import type PgBoss from "pg-boss";
import type { Database } from "@/db/client";
import type { DB, ScrapReason, UnitState } from "@/db/schema";
import { inTrx } from "@/db/jobs/boss";
import { QUEUES, type AdvanceJob } from "@/lib/jobs/queues";
import { NOTIFICATION_RECIPIENTS, subjectKey, type NotificationKind } from "@/lib/notifications/kinds";
import { queueMessages } from "@/db/notifications/outbox";
import {
buildMail,
furnaceRunFinishedMail,
readyForFinishingMail,
washDoneMail,
type MailContent,
type MailContext,
type MailRecipient,
type ReadyPart,
type UnitLine,
} from "@/lib/notifications/templates";
import { massLossCheck } from "@/lib/process/wash";
import { findMailContext, listRecipients } from "@/db/notifications/reads";
import { type BookingEntity } from "./reads";
import { recordEvents } from "@/db/versioned";

export type AdvanceSource = { via: "job"; job: AdvanceJob; job_id?: string } | { via: "sweep"; worker_id?: string };

export type SkipReason =
  | "missing" // no such booking (deleted), or locked by another worker (the sweep does not wait)
  | "stale_version" // the booking changed since the job was sent; its newer job will do it
  | "moved" // same version but another end: never advance on the old time
  | "not_open" // draft, cancelled, or already complete with nothing left to do
  | "not_due"; // its end (or its drying) is still ahead

export type AdvanceResult =
  | { status: "advanced"; entity: BookingEntity; id: string; code: string; transitions: number; messages: number; follow_up?: string }
  | { status: "skipped"; entity: BookingEntity; id: string; reason: SkipReason };

type Trx = Transaction<DB>;

type UnitChange = {
  id: string;
  from_state: UnitState;
  to_state: UnitState;
  hold_reason?: string | null;
  held_from?: UnitState | null;
  scrap_reason?: ScrapReason | null;
  scrap_note?: string | null;
  wash_passed?: boolean | null;
  /** Replaces the shared reason on this unit's event. */
  note?: string | null;
};

/** Applies unit changes and writes one event per unit actually changed; returns that count. */
async function applyUnitChanges(trx: Trx, changes: UnitChange[], reason: string, data: Record<string, unknown>): Promise<number> {
  if (!changes.length) return 0;
  const result = await sql<{ entity_id: string }>`
    with v as (
      select * from jsonb_to_recordset(${JSON.stringify(changes)}::jsonb) as v(
        id uuid, from_state unit_state, to_state unit_state, hold_reason text, held_from unit_state,
        scrap_reason scrap_reason, scrap_note text, wash_passed boolean, note text)
    ), upd as (
      update units u set
        state = v.to_state,
        hold_reason = case when v.to_state = 'on_hold' then v.hold_reason else u.hold_reason end,
        held_from = case when v.to_state = 'on_hold' then v.held_from else u.held_from end,
        scrap_reason = case when v.to_state = 'scrapped' then v.scrap_reason else u.scrap_reason end,
        scrap_note = case when v.to_state = 'scrapped' then v.scrap_note else u.scrap_note end,
        wash_passed = coalesce(v.wash_passed, u.wash_passed),
        state_changed_at = now(),
        updated_at = now(),
        version = u.version + 1
      from v
      where u.id = v.id and u.state = v.from_state
      returning u.id, v.from_state, v.to_state, v.note
    )
    insert into events (entity, entity_id, kind, from_state, to_state, actor_id, reason, data)
    select 'unit', upd.id, 'state', upd.from_state::text, upd.to_state::text, null, coalesce(upd.note, ${reason}), ${JSON.stringify(data)}::jsonb
    from upd
    returning entity_id`.execute(trx);
  return result.rows.length;
}

const BOOKING_TABLES = { build: "builds", wash_batch: "wash_batches", furnace_run: "furnace_runs" } as const;

/**
 * Marks an open booking complete and records why. A build or wash batch finished by hand keeps
 * its own finish time; otherwise its scheduled end is when it finished (a run has no finish time:
 * it is unloaded).
 */
async function completeBooking(trx: Trx, entity: BookingEntity, id: string, from: string, reason: string, data: Record<string, unknown>) {
  await trx
    .updateTable(BOOKING_TABLES[entity] as "builds")
    .set({ state: "complete", version: sql`version + 1`, updated_at: sql`now()`, ...(entity === "furnace_run" ? {} : { finished_at: sql`coalesce(finished_at, ends_at)` }) })
    .where("id", "=", id)
    .execute();
  await recordEvents(trx, [{ entity, entity_id: id, kind: "state", from_state: from, to_state: "complete", actor_id: null, reason, data }]);
}

/** Locks a booking's units that are still in one of `states`. */
function lockUnitsIn(trx: Trx, column: "build_id" | "furnace_run_id", id: string, states: UnitState[]) {
  return trx.selectFrom("units").select(["id", "state"]).where(column, "=", id).where("state", "in", states).forUpdate().execute();
}

function sourceData(source: AdvanceSource): Record<string, unknown> {
  return source.via === "job" ? { via: "job", job_id: source.job_id ?? null } : { via: "sweep", worker_id: source.worker_id ?? null };
}

/** Guards shared by every booking kind while it is open (scheduled or running). */
function checkOpenBooking(
  row: { state: string; version: number; ends_at: Date | null; ended: boolean | null },
  source: AdvanceSource,
): SkipReason | null {
  if (source.via === "job") {
    if (row.version !== source.job.version) return "stale_version";
    if (!row.ends_at || row.ends_at.getTime() !== new Date(source.job.due_at).getTime()) return "moved";
  }
  if (row.state !== "scheduled" && row.state !== "running") return "not_open";
  if (!row.ended) return "not_due";
  return null;
}

async function listUnitLines(trx: Trx, column: "build_id" | "wash_batch_id" | "furnace_run_id", id: string): Promise<UnitLine[]> {
  const rows = await trx
    .selectFrom("units")
    .innerJoin("parts", "parts.id", "units.part_id")
    .innerJoin("orders", "orders.id", "parts.order_id")
    .select([
      "units.serial",
      "units.state",
      "units.hold_reason",
      "units.scrap_reason",
      "units.scrap_note",
      "parts.part_number",
      "parts.revision",
      "parts.name as part_name",
      "orders.code as order_code",
    ])
    .where(`units.${column}`, "=", id)
    .orderBy("units.serial")
    .execute();
  return rows.map((r) => ({
    serial: r.serial,
    part_number: r.part_number,
    revision: r.revision,
    part_name: r.part_name,
    order_code: r.order_code,
    state: r.state,
    note:
      r.state === "on_hold"
        ? r.hold_reason
        : r.state === "scrapped"
          ? `${(r.scrap_reason ?? "other").replace(/_/g, " ")}${r.scrap_note ? `: ${r.scrap_note}` : ""}`
          : null,
  }));
}

/** Writes one message per recipient of the kind (its roles, minus those who turned it off). */
async function notify(
  trx: Trx,
  boss: PgBoss,
  kind: NotificationKind,
  key: string,
  render: (r: MailRecipient, ctx: MailContext) => MailContent,
  ctx: MailContext,
): Promise<number> {
  const recipients = await listRecipients(trx, NOTIFICATION_RECIPIENTS[kind], kind);
  const rows = recipients.map((r) => {
    const m = render(r, ctx);
    return { kind, subject_key: key, recipient_id: r.id, recipient_email: r.email, subject: m.subject, text_body: m.text, html_body: m.html };
  });
  return queueMessages(boss, trx, rows);
}

// Builds -------------------------------------------------------------------------------------

async function advanceBuild(trx: Trx, boss: PgBoss, id: string, source: AdvanceSource): Promise<AdvanceResult> {
  let q = trx
    .selectFrom("builds")
    .select(["id", "code", "state", "version", "starts_at", "ends_at", "failed", "failure_reason", "material_lot", "printer_id", "material_id"])
    .select([
      sql<boolean>`ends_at <= now()`.as("ended"),
      // Subqueries rather than joins: FOR UPDATE then locks the build alone.
      sql<string | null>`(select name from printers where printers.id = builds.printer_id)`.as("printer_name"),
      sql<string | null>`(select code from materials where materials.id = builds.material_id)`.as("material_code"),
    ])
    .where("id", "=", id)
    .forUpdate();
  if (source.via === "sweep") q = q.skipLocked();
  const build = await q.executeTakeFirst();
  if (!build) return { status: "skipped", entity: "build", id, reason: "missing" };
  // A technician completed (or failed) the build by hand and sent its job: the units are
  // already moved, the other technicians still hear of it.
  const byHand = build.state === "complete" && source.via === "job" && build.version === source.job.version;
  const skip = byHand ? null : checkOpenBooking(build, source);
  if (skip) return { status: "skipped", entity: "build", id, reason: skip };
  if (byHand) {
    const messages = await notifyBuild(trx, boss, build, id);
    return { status: "advanced", entity: "build", id, code: build.code, transitions: 0, messages };
  }

  const units = await lockUnitsIn(trx, "build_id", id, ["planned", "printing"]);
  const data = { build_id: id, ...sourceData(source) };
  const failNote = build.failure_reason?.trim() || `build ${build.code} marked failed`;
  const reason = build.failed
    ? `Build ${build.code} was marked failed; at its scheduled end its units were scrapped (print failure)`
    : `Build ${build.code} reached its scheduled end`;
  const transitions = await applyUnitChanges(
    trx,
    units.map((u) =>
      build.failed
        ? { id: u.id, from_state: u.state, to_state: "scrapped" as const, scrap_reason: "print_failure" as const, scrap_note: failNote }
        : { id: u.id, from_state: u.state, to_state: "green" as const },
    ),
    reason,
    data,
  );
  await completeBooking(trx, "build", id, build.state, reason, { ...data, units: transitions, failed: build.failed });
  const messages = await notifyBuild(trx, boss, build, id);
  return { status: "advanced", entity: "build", id, code: build.code, transitions, messages };
}

async function notifyBuild(
  trx: Trx,
  boss: PgBoss,
  build: {
    code: string;
    printer_name: string | null;
    material_code: string | null;
    material_lot: string;
    starts_at: Date | null;
    ends_at: Date | null;
    failed: boolean;
    failure_reason: string | null;
  },
  id: string,
): Promise<number> {
  const [lines, ctx] = await Promise.all([listUnitLines(trx, "build_id", id), findMailContext(trx)]);
  const mailData = {
    id,
    code: build.code,
    printer: build.printer_name,
    material: build.material_code ?? "",
    material_lot: build.material_lot,
    starts_at: build.starts_at,
    ends_at: build.ends_at,
    failed: build.failed,
    failure_reason: build.failure_reason,
    units: lines,
  };
  const kind: NotificationKind = build.failed ? "build_failed" : "build_finished";
  return notify(trx, boss, kind, subjectKey("build", id), (r, c) => buildMail(mailData, r, c), ctx);
}

// Wash batches ---------------------------------------------------------------------------------

async function advanceWashBatch(trx: Trx, boss: PgBoss, id: string, source: AdvanceSource): Promise<AdvanceResult> {
  let q = trx
    .selectFrom("wash_batches")
    .select(["id", "code", "state", "version", "ends_at", "wash_station_id"])
    .select([
      sql<boolean>`ends_at <= now()`.as("ended"),
      sql<Date | null>`ends_at + make_interval(mins => (select coalesce(max(drying_minutes), 0) from shop_settings))`.as("dried_at"),
      sql<boolean>`ends_at + make_interval(mins => (select coalesce(max(drying_minutes), 0) from shop_settings)) <= now()`.as("dried"),
    ])
    .where("id", "=", id)
    .forUpdate();
  if (source.via === "sweep") q = q.skipLocked();
  const batch = await q.executeTakeFirst();
  if (!batch) return { status: "skipped", entity: "wash_batch", id, reason: "missing" };
  const data = { wash_batch_id: id, ...sourceData(source) };

  let transitions = 0;
  let follow_up: string | undefined;
  if (batch.state === "scheduled" || batch.state === "running") {
    const skip = checkOpenBooking(batch, source);
    if (skip) return { status: "skipped", entity: "wash_batch", id, reason: skip };
    const reason = `Wash batch ${batch.code} reached its scheduled end`;
    await completeBooking(trx, "wash_batch", id, batch.state, reason, data);
    transitions++;
    if (!batch.dried && batch.dried_at) {
      // The parts dry before they are weighed; a second job comes back for them then.
      const job: AdvanceJob = { entity: "wash_batch", id, version: batch.version + 1, due_at: batch.dried_at.toISOString() };
      await boss.send(QUEUES.advance, job, {
        startAfter: batch.dried_at,
        singletonKey: `wash_batch:${id}:${job.version}:dried`,
        db: inTrx(trx),
      });
      follow_up = job.due_at;
      return { status: "advanced", entity: "wash_batch", id, code: batch.code, transitions, messages: 0, follow_up };
    }
  } else if (batch.state === "complete") {
    if (source.via === "job" && batch.version !== source.job.version) return { status: "skipped", entity: "wash_batch", id, reason: "stale_version" };
    if (!batch.dried) return { status: "skipped", entity: "wash_batch", id, reason: "not_due" };
  } else {
    return { status: "skipped", entity: "wash_batch", id, reason: "not_open" };
  }

  // Dried: weigh-in decides brown or on hold.
  const units = await trx
    .selectFrom("units")
    .innerJoin("parts", "parts.id", "units.part_id")
    .innerJoin("materials", "materials.id", "parts.material_id")
    .select([
      "units.id",
      "units.state",
      "units.green_mass_g",
      "units.brown_mass_g",
      "units.wash_passed",
      "materials.code as material_code",
      "materials.min_mass_loss",
    ])
    .where("units.wash_batch_id", "=", id)
    .where((eb) =>
      eb.or([
        eb("units.state", "=", "washing"),
        // A green unit released from hold for another wash keeps this batch until it gets a new one.
        eb.and([eb("units.state", "=", "green"), eb("units.state_changed_at", "<=", batch.dried_at ?? new Date(0))]),
      ]),
    )
    .forUpdate("units")
    .execute();
  const changes: UnitChange[] = units.map((u) => {
    const pct = (x: number) => `${(x * 100).toFixed(1)} %`;
    if (u.green_mass_g != null && u.brown_mass_g != null) {
      try {
        const check = massLossCheck(Number(u.green_mass_g), Number(u.brown_mass_g), Number(u.min_mass_loss));
        if (check.passed) {
          return { id: u.id, from_state: u.state, to_state: "brown", wash_passed: true, note: `Washed in ${batch.code} and dried; mass loss ${pct(check.lossFraction)} ≥ ${pct(Number(u.min_mass_loss))} for ${u.material_code}` };
        }
        return {
          id: u.id,
          from_state: u.state,
          to_state: "on_hold",
          held_from: "green",
          wash_passed: false,
          hold_reason: `Mass loss ${pct(check.lossFraction)} is below the ${pct(Number(u.min_mass_loss))} minimum for ${u.material_code} (${check.shortByG.toFixed(1)} g of binder still to come out); wash again or release`,
        };
      } catch (err) {
        return { id: u.id, from_state: u.state, to_state: "on_hold", held_from: "green", hold_reason: `Mass-loss check impossible: ${err instanceof Error ? err.message : String(err)}` };
      }
    }
    if (u.wash_passed === true) return { id: u.id, from_state: u.state, to_state: "brown", note: `Washed in ${batch.code} and dried; mass-loss check recorded as passed` };
    if (u.wash_passed === false) return { id: u.id, from_state: u.state, to_state: "on_hold", held_from: "green", hold_reason: "The mass-loss check was recorded as failed; wash again or release" };
    return {
      id: u.id,
      from_state: u.state,
      to_state: "on_hold",
      held_from: "green",
      hold_reason: `No ${u.green_mass_g == null ? "green" : "brown"} mass recorded by the end of drying, so the mass-loss check could not pass; weigh the unit and release it`,
    };
  });
  const unitTransitions = await applyUnitChanges(trx, changes, `Wash batch ${batch.code} done and dried`, data);
  transitions += unitTransitions;
  // A batch finished by hand (the units already brown or held) still tells the furnace operators.
  const announced = unitTransitions > 0 || (source.via === "job" && batch.state === "complete");
  if (!announced) {
    return transitions
      ? { status: "advanced", entity: "wash_batch", id, code: batch.code, transitions, messages: 0 }
      : { status: "skipped", entity: "wash_batch", id, reason: "not_open" };
  }

  const [station, lines, ctx] = await Promise.all([
    batch.wash_station_id ? trx.selectFrom("wash_stations").select("name").where("id", "=", batch.wash_station_id).executeTakeFirst() : undefined,
    listUnitLines(trx, "wash_batch_id", id),
    findMailContext(trx),
  ]);
  const outcome = lines.filter((l) => l.state === "brown" || l.state === "on_hold");
  if (!outcome.length) return { status: "advanced", entity: "wash_batch", id, code: batch.code, transitions, messages: 0 };
  const mailData = { id, code: batch.code, station: station?.name ?? null, ends_at: batch.ends_at, dried_at: batch.dried_at, units: outcome };
  const messages = await notify(trx, boss, "wash_done", subjectKey("wash_batch", id), (r, c) => washDoneMail(mailData, r, c), ctx);
  return { status: "advanced", entity: "wash_batch", id, code: batch.code, transitions, messages };
}

// Furnace runs ---------------------------------------------------------------------------------

async function advanceFurnaceRun(trx: Trx, boss: PgBoss, id: string, source: AdvanceSource): Promise<AdvanceResult> {
  let q = trx
    .selectFrom("furnace_runs")
    .select(["id", "code", "state", "version", "starts_at", "ends_at", "cycle_minutes", "furnace_id", "profile_id"])
    .select(sql<boolean>`ends_at <= now()`.as("ended"))
    .where("id", "=", id)
    .forUpdate();
  if (source.via === "sweep") q = q.skipLocked();
  const run = await q.executeTakeFirst();
  if (!run) return { status: "skipped", entity: "furnace_run", id, reason: "missing" };
  const data = { furnace_run_id: id, ...sourceData(source) };

  let transitions = 0;
  let completedNow = false;
  if (run.state === "scheduled" || run.state === "running") {
    const skip = checkOpenBooking(run, source);
    if (skip) return { status: "skipped", entity: "furnace_run", id, reason: skip };
    const units = await lockUnitsIn(trx, "furnace_run_id", id, ["brown", "sintering"]);
    const reason = `Furnace run ${run.code} reached the end of its cycle (cool-down included)`;
    transitions += await applyUnitChanges(trx, units.map((u) => ({ id: u.id, from_state: u.state, to_state: "sintered" as const })), reason, data);
    await completeBooking(trx, "furnace_run", id, run.state, reason, { ...data, units: transitions });
    transitions++;
    completedNow = true;
  } else if (run.state === "complete") {
    if (source.via === "job" && run.version !== source.job.version) return { status: "skipped", entity: "furnace_run", id, reason: "stale_version" };
  } else {
    return { status: "skipped", entity: "furnace_run", id, reason: "not_open" };
  }

  // Sintered units (just now, or unloaded by hand) move on to the machinists.
  const sintered = await lockUnitsIn(trx, "furnace_run_id", id, ["sintered"]);
  const promoted = await applyUnitChanges(
    trx,
    sintered.map((u) => ({ id: u.id, from_state: u.state, to_state: "ready_for_finishing" as const })),
    `Sintered in furnace run ${run.code}; ready for finishing`,
    data,
  );
  transitions += promoted;
  if (!completedNow && promoted === 0) return { status: "skipped", entity: "furnace_run", id, reason: "not_open" };

  const [furnace, profile, lines, ctx] = await Promise.all([
    run.furnace_id ? trx.selectFrom("furnaces").select("name").where("id", "=", run.furnace_id).executeTakeFirst() : undefined,
    trx.selectFrom("sinter_profiles").select(["code", "name", "atmosphere"]).where("id", "=", run.profile_id).executeTakeFirst(),
    listUnitLines(trx, "furnace_run_id", id),
    findMailContext(trx),
  ]);
  const key = subjectKey("furnace_run", id);
  const runData = {
    id,
    code: run.code,
    furnace: furnace?.name ?? null,
    profile_code: profile?.code ?? "",
    profile_name: profile?.name ?? "",
    atmosphere: profile?.atmosphere ?? "",
    starts_at: run.starts_at,
    ends_at: run.ends_at,
    cycle_minutes: run.cycle_minutes,
    units: lines,
  };
  let messages = await notify(trx, boss, "furnace_run_finished", key, (r, c) => furnaceRunFinishedMail(runData, r, c), ctx);
  if (promoted > 0) {
    const parts = await readyParts(trx, sintered.map((u) => u.id));
    const ready = { run_id: id, run_code: run.code, furnace: furnace?.name ?? null, parts };
    messages += await notify(trx, boss, "ready_for_finishing", key, (r, c) => readyForFinishingMail(ready, r, c), ctx);
  }
  return { status: "advanced", entity: "furnace_run", id, code: run.code, transitions, messages };
}

async function readyParts(trx: Trx, unitIds: string[]): Promise<ReadyPart[]> {
  if (!unitIds.length) return [];
  const rows = await trx
    .selectFrom("units")
    .innerJoin("parts", "parts.id", "units.part_id")
    .innerJoin("orders", "orders.id", "parts.order_id")
    .select([
      "units.serial",
      "parts.id as part_id",
      "parts.part_number",
      "parts.revision",
      "parts.name",
      "parts.stock_x_neg_mm",
      "parts.stock_x_pos_mm",
      "parts.stock_y_neg_mm",
      "parts.stock_y_pos_mm",
      "parts.stock_z_neg_mm",
      "parts.stock_z_pos_mm",
      "parts.finishing_notes",
      "parts.target_ra_um",
      "parts.tolerance_um",
      "parts.tolerance_grade",
      "orders.code as order_code",
      "orders.due_at",
    ])
    .where("units.id", "in", unitIds)
    .orderBy("orders.due_at")
    .orderBy("parts.part_number")
    .orderBy("units.serial")
    .execute();
  const byPart = new Map<string, ReadyPart>();
  for (const r of rows) {
    let p = byPart.get(r.part_id);
    if (!p) {
      p = {
        part_number: r.part_number,
        revision: r.revision,
        name: r.name,
        order_code: r.order_code,
        due_at: r.due_at,
        serials: [],
        stock: {
          x_neg: Number(r.stock_x_neg_mm),
          x_pos: Number(r.stock_x_pos_mm),
          y_neg: Number(r.stock_y_neg_mm),
          y_pos: Number(r.stock_y_pos_mm),
          z_neg: Number(r.stock_z_neg_mm),
          z_pos: Number(r.stock_z_pos_mm),
        },
        finishing_notes: r.finishing_notes,
        target_ra_um: r.target_ra_um == null ? null : Number(r.target_ra_um),
        tolerance_um: r.tolerance_um == null ? null : Number(r.tolerance_um),
        tolerance_grade: r.tolerance_grade,
      };
      byPart.set(r.part_id, p);
    }
    p.serials.push(r.serial);
  }
  return [...byPart.values()];
}

// Entry points -----------------------------------------------------------------------------------

/** Advances one booking if it is due and still the booking the source asked about. */
export async function advanceBooking(db: Database, boss: PgBoss, entity: BookingEntity, id: string, source: AdvanceSource): Promise<AdvanceResult> {
  return db.transaction().execute((trx) => {
    if (entity === "build") return advanceBuild(trx, boss, id, source);
    if (entity === "wash_batch") return advanceWashBatch(trx, boss, id, source);
    return advanceFurnaceRun(trx, boss, id, source);
  });
}
