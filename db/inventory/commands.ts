import { sql, type Transaction } from "kysely";
import type PgBoss from "pg-boss";
import type { Database } from "@/db/client";
import type { DB } from "@/db/schema";
import { queueMessages } from "@/db/notifications/outbox";
import { findMailContext, listRecipients } from "@/db/notifications/reads";
import { lockRowOrThrow, recordEvents, requireVersion } from "@/db/versioned";
import { AppError } from "@/lib/errors";
import { roundGrams } from "@/lib/inventory/consumption";
import { allocate, drawRefusal, LOT_TRANSITIONS, type LotForDraw, type LotState } from "@/lib/inventory/lots";
import { noStockDecision, reorderDecision } from "@/lib/inventory/projection";
import type { LotCsvRow, ReceiveLot, UpdateLot } from "@/lib/inventory/schemas";
import type { RecallResult } from "@/lib/inventory/types";
import { NOTIFICATION_RECIPIENTS, type NotificationKind } from "@/lib/notifications/kinds";
import { bathChangeDueMail, feedstockNoStockMail, feedstockReorderMail, type MailContent, type MailContext, type MailRecipient } from "@/lib/notifications/templates";
import { estimateBuildDraws, findShopZone, listBaths, projectStock, shopDay } from "./reads";

type Trx = Transaction<DB>;
const kg = (g: number) => `${(g / 1000).toFixed(2)} kg`;

async function nextLotCode(trx: Trx): Promise<string> {
  const { rows } = await sql<{ n: string }>`select nextval('feedstock_lot_code_seq') as n`.execute(trx);
  return `FL-${String(rows[0].n).padStart(5, "0")}`;
}

/** A lot arrives: it waits in quarantine until someone releases it after the incoming check. */
export async function receiveLot(db: Database, input: ReceiveLot, actorId: string) {
  return db.transaction().execute(async (trx) => {
    const material = await trx.selectFrom("materials").select(["id", "code"]).where("id", "=", input.material_id).executeTakeFirst();
    if (!material) throw new AppError("invalid", "That material does not exist.", { material_id: ["choose a material"] });
    if (input.form_id && !(await trx.selectFrom("feedstock_forms").select("id").where("id", "=", input.form_id).executeTakeFirst())) {
      throw new AppError("invalid", "That form does not exist.", { form_id: ["choose a form from the list"] });
    }
    const grams = roundGrams(input.quantity_kg * 1000);
    const row = await trx
      .insertInto("feedstock_lots")
      .values({
        code: await nextLotCode(trx), material_id: input.material_id, supplier: input.supplier, supplier_lot: input.supplier_lot, form_id: input.form_id ?? null,
        received_on: input.received_on, expires_on: input.expires_on ?? null, quantity_g: grams, remaining_g: grams, storage_notes: input.storage_notes,
        created_by: actorId,
      })
      .returning(["id", "code"])
      .executeTakeFirstOrThrow();
    await recordEvents(trx, [{ entity: "feedstock_lot", entity_id: row.id, kind: "state", to_state: "quarantine", actor_id: actorId, reason: `received ${kg(grams)} of ${material.code} from ${input.supplier}, lot ${input.supplier_lot}` }]);
    return row;
  });
}

/** Receives every row of a CSV or none: the errors name the row and the column. */
export async function importLots(db: Database, rows: LotCsvRow[], actorId: string) {
  const materials = await db.selectFrom("materials").select(["id", "code"]).execute();
  const forms = await db.selectFrom("feedstock_forms").select(["id", "name"]).execute();
  const byCode = new Map(materials.map((m) => [m.code.toLowerCase(), m.id]));
  const byForm = new Map(forms.map((f) => [f.name.toLowerCase(), f.id]));
  const errors: Record<string, string[]> = {};
  rows.forEach((r, i) => {
    if (!byCode.has(r.material.toLowerCase())) errors[`row ${i + 2}.material`] = [`no material with code "${r.material}"`];
    if (r.form && !byForm.has(r.form.toLowerCase())) errors[`row ${i + 2}.form`] = [`no form named "${r.form}"; add it first`];
  });
  if (Object.keys(errors).length) throw new AppError("invalid", "Some rows do not match the shop's materials or forms; nothing was received.", errors);
  return db.transaction().execute(async (trx) => {
    const out: { id: string; code: string }[] = [];
    for (const r of rows) {
      const grams = roundGrams(r.quantity_kg * 1000);
      const exists = await trx.selectFrom("feedstock_lots").select("code").where("material_id", "=", byCode.get(r.material.toLowerCase())!).where("supplier", "=", r.supplier).where("supplier_lot", "=", r.supplier_lot).executeTakeFirst();
      if (exists) throw new AppError("conflict", `${r.supplier} lot ${r.supplier_lot} was already received as ${exists.code}; nothing was received.`, { supplier_lot: ["already received"] });
      const row = await trx
        .insertInto("feedstock_lots")
        .values({
          code: await nextLotCode(trx), material_id: byCode.get(r.material.toLowerCase())!, supplier: r.supplier, supplier_lot: r.supplier_lot,
          form_id: r.form ? byForm.get(r.form.toLowerCase())! : null, received_on: r.received_on, expires_on: r.expires_on || null, quantity_g: grams, remaining_g: grams,
          storage_notes: r.storage_notes, created_by: actorId,
        })
        .returning(["id", "code"])
        .executeTakeFirstOrThrow();
      out.push(row);
    }
    await recordEvents(trx, out.map((r) => ({ entity: "feedstock_lot", entity_id: r.id, kind: "state", to_state: "quarantine", actor_id: actorId, reason: "received from a CSV import" })));
    return out;
  });
}

/** Release, reject, requarantine, or correct the shelf count of a lot; every change is an event. */
export async function updateLot(db: Database, id: string, input: UpdateLot, actorId: string) {
  return db.transaction().execute(async (trx) => {
    const lot = await lockRowOrThrow(trx, "feedstock_lots", id, "That feedstock lot does not exist.");
    requireVersion(`Lot ${lot.code}`, lot.version, input.version);
    const set: Record<string, unknown> = {};
    const events: Parameters<typeof recordEvents>[1] = [];
    if (input.state && input.state !== lot.state) {
      if (!LOT_TRANSITIONS[lot.state].includes(input.state as LotState)) {
        throw new AppError("conflict", `Lot ${lot.code} is ${lot.state}; it cannot become ${input.state}.`, { state: [`not allowed from ${lot.state}`] }, { current_version: lot.version });
      }
      if (input.state === "rejected" && !input.reason) throw new AppError("invalid", "Say why the lot is rejected.", { reason: ["required when rejecting"] });
      set.state = input.state;
      set.state_reason = input.reason || null;
      events.push({ entity: "feedstock_lot", entity_id: id, kind: "state", from_state: lot.state, to_state: input.state, actor_id: actorId, reason: input.reason || null });
    }
    if (input.remaining_kg !== undefined) {
      const grams = roundGrams(input.remaining_kg * 1000);
      if (grams > Number(lot.quantity_g)) throw new AppError("invalid", `A lot cannot hold more than it was received with (${kg(Number(lot.quantity_g))}).`, { remaining_kg: ["more than received"] });
      set.remaining_g = grams;
      if (grams === 0 && (set.state ?? lot.state) === "released") set.state = "consumed";
      events.push({ entity: "feedstock_lot", entity_id: id, kind: "count", actor_id: actorId, reason: input.reason || "shelf count", data: { from_g: Number(lot.remaining_g), to_g: grams } });
    }
    if (input.storage_notes !== undefined) set.storage_notes = input.storage_notes;
    if (input.expires_on !== undefined) set.expires_on = input.expires_on;
    const row = await trx
      .updateTable("feedstock_lots")
      .set({ ...set, version: sql`version + 1`, updated_at: sql`now()` })
      .where("id", "=", id)
      .returning(["id", "code", "state", "version"])
      .executeTakeFirstOrThrow();
    await recordEvents(trx, events);
    return row;
  });
}

/**
 * A build takes its feedstock when it starts: from the lot chosen for it, or else first
 * expiring first out from the released lots of its material (a material with no lot ever
 * received is not tracked and draws nothing). The lots are locked in a fixed
 * order, so two builds drawing the last kilograms at once queue on the same rows and the second
 * sees what the first left.
 */
export async function drawForBuild(trx: Trx, build: { id: string; code: string; material_id: string; feedstock_lot_id: string | null }, actorId: string, now = new Date()) {
  const est = (await estimateBuildDraws(trx, { buildIds: [build.id] })).get(build.id);
  if (!est || est.total_g <= 0) return [];
  const zone = await findShopZone(trx);
  const day = shopDay(now, zone);
  let q = trx
    .selectFrom("feedstock_lots")
    .select(["id", "code", "state", "remaining_g", "material_id", sql<string | null>`to_char(expires_on, 'YYYY-MM-DD')`.as("expires_on"), sql<string>`to_char(received_on, 'YYYY-MM-DD')`.as("received_on")])
    .orderBy("id")
    .forUpdate();
  q = build.feedstock_lot_id ? q.where("id", "=", build.feedstock_lot_id) : q.where("material_id", "=", build.material_id).where("state", "=", "released");
  const lots: LotForDraw[] = (await q.execute()).map((l) => ({ ...l, remaining_g: Number(l.remaining_g) }));
  if (build.feedstock_lot_id) {
    const lot = lots[0];
    const why = lot ? drawRefusal(lot, day) : "The lot chosen for this build no longer exists.";
    if (why) throw new AppError("conflict", `${build.code} cannot start: ${why}`, { feedstock_lot_id: [why] });
    if (lot.remaining_g < est.total_g) {
      throw new AppError("conflict", `${build.code} needs ${kg(est.total_g)} of feedstock but lot ${lot.code} holds ${kg(lot.remaining_g)}. Choose another lot or leave the choice to first-expiring-first-out.`, { feedstock_lot_id: ["not enough left"] });
    }
  }
  // A material the shop has never received a lot of is not tracked yet: the build starts and
  // draws nothing, as before feedstock was kept in Hearth.
  if (!build.feedstock_lot_id && !lots.length) {
    const tracked = await trx.selectFrom("feedstock_lots").select("id").where("material_id", "=", build.material_id).limit(1).executeTakeFirst();
    if (!tracked) return [];
  }
  const plan = allocate(lots, est.total_g, day);
  if (!plan) {
    const usable = lots.filter((l) => drawRefusal(l, day) === null).reduce((s, l) => s + l.remaining_g, 0);
    throw new AppError("conflict", `${build.code} needs ${kg(est.total_g)} of feedstock; the released, in-date lots of its material hold ${kg(usable)}. Receive or release a lot first.`, { feedstock: ["not enough on the shelf"] }, { needed_g: est.total_g, available_g: roundGrams(usable) });
  }
  for (const d of plan) {
    const lot = lots.find((l) => l.id === d.lot_id)!;
    const left = roundGrams(lot.remaining_g - d.grams);
    await trx.updateTable("feedstock_lots").set({ remaining_g: left, ...(left <= 0 ? { state: "consumed" } : {}), version: sql`version + 1`, updated_at: sql`now()` }).where("id", "=", d.lot_id).execute();
    await trx.insertInto("feedstock_draws").values({ lot_id: d.lot_id, build_id: build.id, estimated_g: d.grams, drawn_g: d.grams, created_by: actorId }).execute();
  }
  await recordEvents(trx, plan.map((d) => ({ entity: "feedstock_lot", entity_id: d.lot_id, kind: "draw", actor_id: actorId, reason: `${build.code} started`, data: { build_id: build.id, grams: d.grams } })));
  return plan;
}

/**
 * When a build ends, the weighed figure (if any) replaces the estimate: the difference goes
 * back to, or comes from, the lots it drew on. Without a figure the estimate stands, for a
 * failed build too (the feedstock went into the failed print).
 */
export async function correctDraws(trx: Trx, build: { id: string; code: string }, usedKg: number | undefined, actorId: string, note: string) {
  if (usedKg === undefined) return;
  const draws = await trx.selectFrom("feedstock_draws").selectAll().where("build_id", "=", build.id).orderBy("created_at").execute();
  if (!draws.length) return;
  const lots = await trx.selectFrom("feedstock_lots").select(["id", "remaining_g", "quantity_g", "state"]).where("id", "in", draws.map((d) => d.lot_id)).orderBy("id").forUpdate().execute();
  let diff = roundGrams(usedKg * 1000 - draws.reduce((s, d) => s + Number(d.drawn_g), 0)); // + more used, − some returned
  // Returned feedstock goes back to the last lot drawn; extra comes from the last lot while it lasts.
  for (const d of [...draws].reverse()) {
    if (diff === 0) break;
    const lot = lots.find((l) => l.id === d.lot_id)!;
    const change = diff > 0 ? Math.min(diff, Number(lot.remaining_g)) : Math.max(diff, -Number(d.drawn_g));
    if (change === 0) continue;
    const left = roundGrams(Number(lot.remaining_g) - change);
    const state = left <= 0 && lot.state === "released" ? "consumed" : left > 0 && lot.state === "consumed" ? "released" : lot.state;
    await trx.updateTable("feedstock_lots").set({ remaining_g: left, state, version: sql`version + 1`, updated_at: sql`now()` }).where("id", "=", lot.id).execute();
    await trx.updateTable("feedstock_draws").set({ drawn_g: roundGrams(Number(d.drawn_g) + change), corrected_at: sql`now()`, correction_note: note }).where("id", "=", d.id).execute();
    lot.remaining_g = left;
    diff = roundGrams(diff - change);
  }
  await recordEvents(trx, [{ entity: "build", entity_id: build.id, kind: "feedstock_corrected", actor_id: actorId, reason: note, data: { used_g: roundGrams(usedKg * 1000), unaccounted_g: diff } }]);
}

/** Choosing (or clearing) the lot a build will print from: same material, and usable today. */
export async function assertLotFitsBuild(trx: Trx, build: { code: string; material_id: string }, lotId: string | null) {
  if (!lotId) return;
  const lot = await trx
    .selectFrom("feedstock_lots")
    .select(["id", "code", "state", "remaining_g", "material_id", sql<string | null>`to_char(expires_on, 'YYYY-MM-DD')`.as("expires_on"), sql<string>`to_char(received_on, 'YYYY-MM-DD')`.as("received_on")])
    .where("id", "=", lotId)
    .executeTakeFirst();
  if (!lot) throw new AppError("invalid", "That feedstock lot does not exist.", { feedstock_lot_id: ["choose a lot"] });
  if (lot.material_id !== build.material_id) throw new AppError("invalid", `Lot ${lot.code} is another material than ${build.code}.`, { feedstock_lot_id: ["another material"] });
  const why = drawRefusal({ ...lot, remaining_g: Number(lot.remaining_g) }, shopDay(new Date(), await findShopZone(trx)));
  if (why) throw new AppError("conflict", why, { feedstock_lot_id: [why] });
}

export type { RecallResult };

/**
 * A supplier recall or a failed lot: every unit printed from it that is still in the shop goes
 * on hold with the reason; finished and scrapped units are listed for the people to chase.
 */
export async function recallLot(db: Database, lotId: string, input: { version: number; reason: string }, actorId: string): Promise<RecallResult> {
  return db.transaction().execute(async (trx) => {
    const lot = await lockRowOrThrow(trx, "feedstock_lots", lotId, "That feedstock lot does not exist.");
    requireVersion(`Lot ${lot.code}`, lot.version, input.version);
    const units = await trx
      .selectFrom("units as u")
      .innerJoin("feedstock_draws as d", "d.build_id", "u.build_id")
      .innerJoin("parts as p", "p.id", "u.part_id")
      .innerJoin("orders as o", "o.id", "p.order_id")
      .select(["u.id", "u.serial", "u.state", "o.code as order_code", "o.customer"])
      .where("d.lot_id", "=", lotId)
      .orderBy("u.id")
      .forUpdate("u")
      .execute();
    const reason = `recall of feedstock lot ${lot.code}: ${input.reason}`;
    const toHold = units.filter((u) => u.state !== "done" && u.state !== "scrapped" && u.state !== "on_hold");
    if (toHold.length) {
      await trx
        .updateTable("units")
        .set({ held_from: sql`state`, state: "on_hold", hold_reason: reason, state_changed_at: sql`now()`, updated_at: sql`now()`, version: sql`version + 1` })
        .where("id", "in", toHold.map((u) => u.id))
        .execute();
      await recordEvents(trx, toHold.map((u) => ({ entity: "unit", entity_id: u.id, kind: "state", from_state: u.state, to_state: "on_hold", actor_id: actorId, reason })));
    }
    // already on hold for another reason: the recall is added to the record
    const alreadyHeld = units.filter((u) => u.state === "on_hold");
    if (alreadyHeld.length) await recordEvents(trx, alreadyHeld.map((u) => ({ entity: "unit", entity_id: u.id, kind: "recall", actor_id: actorId, reason })));
    await trx
      .updateTable("feedstock_lots")
      .set({ recalled_at: sql`now()`, recall_reason: input.reason, state: lot.state === "consumed" ? "consumed" : "rejected", state_reason: `recalled: ${input.reason}`, version: sql`version + 1`, updated_at: sql`now()` })
      .where("id", "=", lotId)
      .execute();
    await recordEvents(trx, [{ entity: "feedstock_lot", entity_id: lotId, kind: "recall", from_state: lot.state, to_state: lot.state === "consumed" ? "consumed" : "rejected", actor_id: actorId, reason: input.reason, data: { held: toHold.length, beyond_reach: units.length - toHold.length - alreadyHeld.length } }]);
    return {
      held: toHold.map((u) => ({ unit_id: u.id, serial: u.serial, from: u.state })),
      beyond_reach: units.filter((u) => u.state === "done" || u.state === "scrapped").map((u) => ({ unit_id: u.id, serial: u.serial, state: u.state, order_code: u.order_code, customer: u.customer })),
    };
  });
}

export async function addForm(db: Database, name: string) {
  const existing = await db.selectFrom("feedstock_forms").select("id").where(sql`lower(name)`, "=", name.toLowerCase()).executeTakeFirst();
  if (existing) throw new AppError("conflict", `The form "${name}" is already on the list.`, { name: ["already on the list"] });
  return db.insertInto("feedstock_forms").values({ name }).returning(["id", "name"]).executeTakeFirstOrThrow();
}

export async function updateMaterialStockRules(db: Database, id: string, input: { version: number; support_allowance: number; purge_g: number; reorder_point_kg: number; lead_time_days: number }, actorId: string) {
  return db.transaction().execute(async (trx) => {
    const m = await lockRowOrThrow(trx, "materials", id, "That material does not exist.");
    requireVersion(`Material ${m.code}`, m.version, input.version);
    const row = await trx
      .updateTable("materials")
      .set({ support_allowance: input.support_allowance, purge_g: input.purge_g, reorder_point_g: roundGrams(input.reorder_point_kg * 1000), lead_time_days: input.lead_time_days, version: sql`version + 1`, updated_at: sql`now()` })
      .where("id", "=", id)
      .returning(["id", "version"])
      .executeTakeFirstOrThrow();
    await recordEvents(trx, [{ entity: "material", entity_id: id, kind: "stock_rules", actor_id: actorId, data: input }]);
    return row;
  });
}

/** The operator's count of a gas: cylinders times their content, or a tank gauge, in litres. */
export async function recordGasCount(db: Database, input: { gas: string; on_hand_l: number; note: string }, actorId: string) {
  return db
    .insertInto("gas_supplies")
    .values({ gas: input.gas, on_hand_l: input.on_hand_l, note: input.note, counted_by: actorId })
    .onConflict((oc) => oc.column("gas").doUpdateSet({ on_hand_l: input.on_hand_l, note: input.note, counted_by: actorId, counted_at: sql`now()`, version: sql`gas_supplies.version + 1` }))
    .returning(["gas", "on_hand_l", "version"])
    .executeTakeFirstOrThrow();
}

export async function recordBathChange(db: Database, stationId: string, input: { version: number; note: string }, actorId: string) {
  return db.transaction().execute(async (trx) => {
    const s = await lockRowOrThrow(trx, "wash_stations", stationId, "That wash station does not exist.");
    requireVersion(`Wash station ${s.name}`, s.version, input.version);
    const row = await trx.updateTable("wash_stations").set({ bath_changed_at: sql`now()`, bath_alerted_at: null, version: sql`version + 1` }).where("id", "=", stationId).returning(["id", "version", "bath_changed_at"]).executeTakeFirstOrThrow();
    await recordEvents(trx, [{ entity: "wash_station", entity_id: stationId, kind: "bath_changed", actor_id: actorId, reason: input.note || null }]);
    return row;
  });
}

async function notifyRoles(trx: Trx, boss: PgBoss, kind: NotificationKind, key: string, ctx: MailContext, render: (r: MailRecipient, c: MailContext) => MailContent) {
  const recipients = await listRecipients(trx, NOTIFICATION_RECIPIENTS[kind], kind);
  return queueMessages(
    boss,
    trx,
    recipients.map((r) => {
      const m = render(r, ctx);
      return { kind, subject_key: key, recipient_id: r.id, recipient_email: r.email, subject: m.subject, text_body: m.text, html_body: m.html };
    }),
  );
}

/**
 * Run by the worker's sweep: mails managers once when a material's projection crosses its
 * reorder point within the lead time (and re-arms when it recovers), and operators once when a
 * bath reaches its change-out point. The flag on the row is set in the same transaction as the
 * outbox rows, so two workers sweeping at once send one message. A material no lot was ever
 * received for is not tracked: it mails nothing while no build needs it, and once when a
 * scheduled build within the horizon does ("no stock on hand, needed by build B on day D").
 */
export async function checkStockAlerts(db: Database, boss: PgBoss, now = new Date()): Promise<{ reorder: number; bath: number }> {
  const { today, materials } = await projectStock(db, { days: 90, now });
  let reorder = 0, bath = 0;
  const ctx = await findMailContext(db);
  for (const m of materials) {
    // the first scheduled build that will draw on the material (its code, day and draw)
    const firstNeed = m.projection.days.find((d) => d.builds.length > 0);
    const alerted = m.reorder_alerted_at !== null;
    const decision = m.tracked
      ? reorderDecision({ first_below_reorder_day: m.projection.first_below_reorder_day, today, lead_time_days: m.lead_time_days, alerted })
      : noStockDecision({ first_need_day: firstNeed?.day ?? null, alerted });
    if (decision === "none") continue;
    await db.transaction().execute(async (trx) => {
      const row = await trx.selectFrom("materials").select(["reorder_alerted_at"]).where("id", "=", m.id).forUpdate().executeTakeFirstOrThrow();
      if (decision === "clear") {
        if (row.reorder_alerted_at) await trx.updateTable("materials").set({ reorder_alerted_at: null }).where("id", "=", m.id).execute();
        return;
      }
      if (row.reorder_alerted_at) return;
      const at = new Date(now);
      await trx.updateTable("materials").set({ reorder_alerted_at: at }).where("id", "=", m.id).execute();
      if (!m.tracked) {
        const builds = m.projection.days.reduce((n, d) => n + d.builds.length, 0);
        reorder += await notifyRoles(trx, boss, "feedstock_reorder", `material:${m.id}:no-stock:${at.toISOString()}`, ctx, (r, c) =>
          feedstockNoStockMail(
            { material_code: m.code, material_name: m.name, first_build: firstNeed!.builds[0], first_day: firstNeed!.day, first_day_g: firstNeed!.drawn_g, builds, needed_g: m.projection.committed_g },
            r,
            c,
          ),
        );
        return;
      }
      // The mail names builds as the floor and the travelers do, by code.
      const shortIds = m.projection.short_builds;
      const codeOf = new Map(shortIds.length ? (await trx.selectFrom("builds").select(["id", "code"]).where("id", "in", shortIds).execute()).map((b) => [b.id, b.code]) : []);
      const shortCodes = shortIds.map((id) => codeOf.get(id) ?? id);
      reorder += await notifyRoles(trx, boss, "feedstock_reorder", `material:${m.id}:reorder:${at.toISOString()}`, ctx, (r, c) =>
        feedstockReorderMail(
          {
            material_code: m.code, material_name: m.name, on_hand_g: m.projection.on_hand_g, reorder_point_g: m.reorder_point_g, lead_time_days: m.lead_time_days,
            first_below_day: m.projection.first_below_reorder_day!, first_short_day: m.projection.first_short_day, short_builds: shortCodes,
          },
          r,
          c,
        ),
      );
    });
  }
  for (const s of await listBaths(db)) {
    if (!s.due || s.bath_alerted_at) continue;
    await db.transaction().execute(async (trx) => {
      const row = await trx.selectFrom("wash_stations").select(["bath_alerted_at", "bath_changed_at"]).where("id", "=", s.id).forUpdate().executeTakeFirstOrThrow();
      if (row.bath_alerted_at) return;
      await trx.updateTable("wash_stations").set({ bath_alerted_at: sql`now()` }).where("id", "=", s.id).execute();
      bath += await notifyRoles(trx, boss, "bath_change_due", `wash_station:${s.id}:bath:${new Date(row.bath_changed_at).toISOString()}`, ctx, (r, c) =>
        bathChangeDueMail({ station: s.name, solvent: s.solvent, dissolved_g: s.dissolved_g, limit_g: s.limit_g, saturation: s.saturation }, r, c),
      );
    });
  }
  return { reorder, bath };
}

/**
 * A lot's certificate of analysis, stored already (the object is put before this runs, outside
 * any transaction): records the file and points the lot at it, in one transaction. The file it
 * replaces loses its row here; the caller deletes its object after the commit.
 */
export async function attachCertificate(
  db: Database,
  lotId: string,
  file: { bucket: string; object_key: string; filename: string; content_type: string; size_bytes: number; sha256: string },
  actorId: string,
  version?: number,
) {
  return db.transaction().execute(async (trx) => {
    const lot = await lockRowOrThrow(trx, "feedstock_lots", lotId, "That feedstock lot does not exist.");
    requireVersion(`Lot ${lot.code}`, lot.version, version);
    const row = await trx
      .insertInto("files")
      .values({ ...file, kind: "attachment", status: "done", uploaded_by: actorId })
      .returning(["id", "filename", "content_type", "size_bytes", "sha256", "created_at"])
      .executeTakeFirstOrThrow();
    const updated = await trx
      .updateTable("feedstock_lots")
      .set({ certificate_file_id: row.id, version: sql`version + 1`, updated_at: sql`now()` })
      .where("id", "=", lotId)
      .returning(["id", "code", "version"])
      .executeTakeFirstOrThrow();
    const replaced = lot.certificate_file_id
      ? await trx.deleteFrom("files").where("id", "=", lot.certificate_file_id).returning(["bucket", "object_key"]).executeTakeFirst()
      : undefined;
    await recordEvents(trx, [{ entity: "feedstock_lot", entity_id: lotId, kind: "certificate", actor_id: actorId, data: { file_id: row.id, filename: row.filename, sha256: row.sha256, replaced: lot.certificate_file_id } }]);
    return { lot: updated, file: row, replaced };
  });
}
