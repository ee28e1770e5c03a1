import type { Role } from "@/lib/auth/permissions";
import { sql, type Transaction } from "kysely";
import type PgBoss from "pg-boss";
import type { Database } from "@/db/client";
import type { DB } from "@/db/schema";
import { AppError } from "@/lib/errors";
import { lockRowOrThrow, recordEvents, requireVersion } from "@/db/versioned";
import { insertOrder } from "@/db/orders/commands";
import { insertPart } from "@/db/parts/commands";
import { insertBuild } from "@/db/builds/commands";
import { insertOutboxRows } from "@/db/outbox/commands";
import { enqueueOutboxSends } from "@/db/jobs/mail";
import { getShopPlanning } from "@/db/floor/reads";
import { evaluateQuote, type EvaluatedQuote } from "@/lib/quotes/evaluate";
import { quotePdf } from "@/lib/quotes/pdf";
import { quoteMail } from "@/lib/quotes/mail";
import type { AddLine, CreateQuote, EquipmentRateInput, MaterialRateInput, QuoteSettingsInput, UpdateQuote } from "@/lib/quotes/schemas";
import type { PlanProposalItem } from "@/db/builds/commands";
import { getQuoteOrThrow, getQuoteSettings, lineSpecOf, loadQuoteContext } from "./reads";

type Trx = Transaction<DB>;

async function lockQuote(trx: Trx, id: string, version: number | undefined) {
  const q = await lockRowOrThrow(trx, "quotes", id, "That quote does not exist.");
  requireVersion(`Quote ${q.code}`, q.version, version);
  return q;
}

function requireStatus(q: { code: string; status: string }, allowed: string[], doing: string) {
  if (!allowed.includes(q.status)) throw new AppError("conflict", `Quote ${q.code} is ${q.status}; it cannot be ${doing}.`, undefined, { status: q.status });
}

const bump = { updated_at: sql<Date>`now()`, version: sql<number>`version + 1` };

export async function insertQuote(db: Database, input: CreateQuote, actorId: string) {
  return db.transaction().execute(async (trx) => {
    const s = await getQuoteSettings(trx);
    const code = await sql<{ code: string }>`select 'Q-' || lpad(nextval('quote_code_seq')::text, 4, '0') as code`.execute(trx);
    const validUntil = input.valid_until ?? new Date(Date.now() + s.validity_days * 86_400_000);
    const row = await trx
      .insertInto("quotes")
      .values({ code: code.rows[0].code, customer: input.customer, contact_email: input.contact_email, notes: input.notes, valid_until: validUntil, currency: s.currency, minor_digits: s.minor_digits, created_by: actorId })
      .returningAll()
      .executeTakeFirstOrThrow();
    await recordEvents(trx, [{ entity: "quote", entity_id: row.id, kind: "state", from_state: null, to_state: "draft", actor_id: actorId }]);
    return row;
  });
}

export async function updateQuote(trx: Trx, id: string, input: UpdateQuote) {
  const q = await lockQuote(trx, id, input.version);
  requireStatus(q, ["draft"], "edited");
  const { version: _v, ...rest } = input;
  void _v;
  return trx.updateTable("quotes").set({ ...rest, ...bump }).where("id", "=", id).returningAll().executeTakeFirstOrThrow();
}

/** A line from an existing part (its size and finishing) or from an analysed STL upload. */
export async function addQuoteLine(trx: Trx, id: string, input: AddLine) {
  const q = await lockQuote(trx, id, input.version);
  requireStatus(q, ["draft"], "edited");
  const finishing = {
    stock_x_neg_mm: input.stock_x_neg_mm, stock_x_pos_mm: input.stock_x_pos_mm, stock_y_neg_mm: input.stock_y_neg_mm,
    stock_y_pos_mm: input.stock_y_pos_mm, stock_z_neg_mm: input.stock_z_neg_mm, stock_z_pos_mm: input.stock_z_pos_mm,
    target_ra_um: input.target_ra_um ?? null, tolerance_um: input.tolerance_um ?? null,
  };
  let values;
  if (input.part_id) {
    const p = await trx.selectFrom("parts").selectAll().where("id", "=", input.part_id).executeTakeFirst();
    if (!p) throw new AppError("invalid", "That part does not exist.", { part_id: ["choose a part"] });
    const anyStock = Object.entries(finishing).some(([k, v]) => k.startsWith("stock_") && Number(v) > 0) || finishing.target_ra_um !== null || finishing.tolerance_um !== null;
    values = {
      name: input.name || `${p.part_number} rev ${p.revision} ${p.name}`.slice(0, 200),
      material_id: input.material_id ?? p.material_id,
      part_id: p.id,
      nominal_x_mm: p.nominal_x_mm, nominal_y_mm: p.nominal_y_mm, nominal_z_mm: p.nominal_z_mm,
      volume_mm3: p.volume_mm3, thickest_wall_mm: input.thickest_wall_mm ?? p.thickest_wall_mm,
      // The part's own finishing requirements stand unless the line gives its own.
      ...(anyStock ? finishing : {
        stock_x_neg_mm: p.stock_x_neg_mm, stock_x_pos_mm: p.stock_x_pos_mm, stock_y_neg_mm: p.stock_y_neg_mm,
        stock_y_pos_mm: p.stock_y_pos_mm, stock_z_neg_mm: p.stock_z_neg_mm, stock_z_pos_mm: p.stock_z_pos_mm,
        target_ra_um: p.target_ra_um, tolerance_um: p.tolerance_um,
      }),
    };
  } else {
    const f = await trx.selectFrom("files").select(["id", "kind", "status", "analysis", "filename", "error"]).where("id", "=", input.file_id!).executeTakeFirst();
    if (!f || f.kind !== "geometry") throw new AppError("invalid", "That upload does not exist.", { file_id: ["upload the STL again"] });
    if (f.status === "failed") throw new AppError("invalid", `${f.filename} could not be analysed: ${f.error ?? "unknown reason"}.`, { file_id: [f.error ?? "analysis failed"] });
    if (f.status !== "done") throw new AppError("conflict", `${f.filename} is still being analysed; add the line in a moment.`, undefined, { status: f.status });
    const a = f.analysis as { closed?: boolean; volume_mm3?: number; bounds?: { size: { x: number; y: number; z: number } } } | null;
    const size = a?.bounds?.size;
    if (!size || !(size.x > 0 && size.y > 0 && size.z > 0)) throw new AppError("invalid", `${f.filename} has no usable size.`, { file_id: ["the mesh is flat or empty"] });
    if (!input.thickest_wall_mm) throw new AppError("invalid", "Give the part's thickest wall: the wash time depends on it.", { thickest_wall_mm: ["required for an uploaded model"] });
    const m = await trx.selectFrom("materials").select(["id", "active"]).where("id", "=", input.material_id!).executeTakeFirst();
    if (!m || !m.active) throw new AppError("invalid", "Choose an active material.", { material_id: ["choose an active material"] });
    values = {
      name: (input.name || f.filename.replace(/\.stl$/i, "")).slice(0, 200),
      material_id: m.id,
      file_id: f.id,
      nominal_x_mm: Math.round(size.x * 1000) / 1000, nominal_y_mm: Math.round(size.y * 1000) / 1000, nominal_z_mm: Math.round(size.z * 1000) / 1000,
      // An open mesh has no volume to trust; the estimate then falls back to half the box.
      volume_mm3: a?.closed && a.volume_mm3 && a.volume_mm3 > 0 ? Math.round(a.volume_mm3 * 1000) / 1000 : null,
      thickest_wall_mm: input.thickest_wall_mm,
      ...finishing,
    };
  }
  const pos = await trx.selectFrom("quote_lines").select(sql<number>`coalesce(max(position), 0) + 1`.as("next")).where("quote_id", "=", id).executeTakeFirstOrThrow();
  const line = await trx.insertInto("quote_lines").values({ ...values, quote_id: id, position: Number(pos.next), quantity: input.quantity, requested_at: input.requested_at ?? null }).returningAll().executeTakeFirstOrThrow();
  await trx.updateTable("quotes").set(bump).where("id", "=", id).execute();
  return line;
}

export async function removeQuoteLine(trx: Trx, id: string, lineId: string, version: number) {
  const q = await lockQuote(trx, id, version);
  requireStatus(q, ["draft"], "edited");
  const gone = await trx.deleteFrom("quote_lines").where("id", "=", lineId).where("quote_id", "=", id).returning("id").executeTakeFirst();
  if (!gone) throw new AppError("not_found", "That line is not on this quote.");
  await trx.updateTable("quotes").set(bump).where("id", "=", id).execute();
}

/** Prices and plans a quote's lines against the schedule as it stands (nothing is booked). */
export async function evaluateQuoteNow(db: Database | Trx, id: string, now = new Date()): Promise<EvaluatedQuote> {
  const { lines } = await getQuoteOrThrow(db, id);
  const ctx = await loadQuoteContext(db, now);
  return evaluateQuote(lines.map(lineSpecOf), ctx);
}

/** Expires sent quotes whose validity has passed (the worker's sweep and every read call it). */
export async function expireQuotes(db: Database, now = new Date()) {
  const rows = await db
    .updateTable("quotes")
    .set({ status: "expired", decided_at: now, ...bump })
    .where("status", "=", "sent")
    .where("valid_until", "<", now)
    .returning(["id", "code"])
    .execute();
  if (rows.length) await recordEvents(db, rows.map((r) => ({ entity: "quote", entity_id: r.id, kind: "state", from_state: "sent", to_state: "expired", actor_id: null, reason: "validity passed" })));
  return rows.length;
}

const dayText = (d: Date, tz: string) => new Intl.DateTimeFormat("en-GB", { timeZone: tz, dateStyle: "long" }).format(d);

/**
 * Freezes the price and promise, and queues the e-mail with the PDF: all in one transaction, so
 * a failure leaves the quote a draft and no message behind. The worker sends it.
 */
export async function sendQuote(boss: PgBoss, trx: Trx, id: string, version: number, actorId: string) {
  const q = await lockQuote(trx, id, version);
  requireStatus(q, ["draft"], "sent");
  const { lines } = await getQuoteOrThrow(trx, id);
  if (!lines.length) throw new AppError("invalid", "Add at least one line before sending.", { lines: ["no lines"] });
  // One moment for the whole quote: the promise is planned from it and it is the quote's sent_at,
  // so the plan behind a promise can be worked again from the moment it was made.
  const now = new Date();
  if (new Date(q.valid_until) <= now) throw new AppError("invalid", "The validity date has passed; set a later one.", { valid_until: ["in the past"] });
  const evaluated = evaluateQuote(lines.map(lineSpecOf), await loadQuoteContext(trx, now));
  if (!evaluated.feasible) {
    const bad = evaluated.lines.find((l) => !l.promise.feasible)!;
    throw new AppError("invalid", `${bad.name} cannot be planned: ${bad.promise.feasible ? "" : bad.promise.reason}`, { lines: ["cannot be planned"] });
  }
  const shop = await getShopPlanning(trx);
  const promiseAt = new Date(evaluated.completion!);
  const p90At = new Date(evaluated.p90!);
  const pdf = await quotePdf({
    shop_name: shop.shop_name, code: q.code, customer: q.customer, contact_email: q.contact_email, currency: q.currency, minor_digits: q.minor_digits,
    lines: evaluated.lines.map((l, i) => ({
      name: l.name, material: lines[i].material_code, quantity: l.quantity, unit_price_minor: l.cost!.unit_price_minor, total_minor: l.cost!.total_minor,
      finishing: [lines[i].target_ra_um ? `Ra ${Number(lines[i].target_ra_um)} µm` : "", lines[i].tolerance_um ? `±${Number(lines[i].tolerance_um)} µm` : ""].filter(Boolean).join(", "),
      requested: lines[i].requested_at ? dayText(new Date(lines[i].requested_at!), shop.time_zone) : null,
    })),
    setup_minor: evaluated.setup_minor, total_minor: evaluated.total_minor!, valid_until: new Date(q.valid_until), promise_at: promiseAt, promise_p90_at: p90At,
    time_zone: shop.time_zone, notes: q.notes, issued_at: now,
  });
  for (const l of evaluated.lines) await trx.updateTable("quote_lines").set({ cost_minor: l.cost!.total_minor }).where("id", "=", l.line_id).execute();
  const row = await trx
    .updateTable("quotes")
    .set({ status: "sent", sent_at: now, total_minor: evaluated.total_minor, cost: JSON.stringify(evaluated), promise_at: promiseAt, promise_p90_at: p90At, promise: JSON.stringify(evaluated.lines.map((l) => l.promise)), ...bump })
    .where("id", "=", id)
    .returningAll()
    .executeTakeFirstOrThrow();
  const mail = quoteMail({
    shop_name: shop.shop_name, code: q.code, customer: q.customer, total_minor: evaluated.total_minor!, currency: q.currency, minor_digits: q.minor_digits,
    valid_until: dayText(new Date(q.valid_until), shop.time_zone), promise: dayText(promiseAt, shop.time_zone),
  });
  const [outbox] = await insertOutboxRows(trx, [{ kind: "quote", subject_key: `quote:${id}:v${row.version}`, recipient_id: null, recipient_email: q.contact_email, subject: mail.subject, text_body: mail.text, html_body: mail.html }]);
  if (outbox) {
    await trx.insertInto("outbox_attachments").values({ outbox_id: outbox.id, filename: `quote-${q.code}.pdf`, content_type: "application/pdf", content: Buffer.from(pdf) }).execute();
    await enqueueOutboxSends(boss, trx, [outbox.id]);
  }
  await recordEvents(trx, [{ entity: "quote", entity_id: id, kind: "state", from_state: "draft", to_state: "sent", actor_id: actorId, data: { total_minor: evaluated.total_minor, promise_at: promiseAt.toISOString() } }]);
  return { quote: row, evaluated };
}

export async function declineQuote(trx: Trx, id: string, version: number, actorId: string, reason: string) {
  const q = await lockQuote(trx, id, version);
  requireStatus(q, ["sent"], "declined");
  const row = await trx.updateTable("quotes").set({ status: "declined", decided_at: new Date(), decided_by: actorId, ...bump }).where("id", "=", id).returningAll().executeTakeFirstOrThrow();
  await recordEvents(trx, [{ entity: "quote", entity_id: id, kind: "state", from_state: "sent", to_state: "declined", actor_id: actorId, reason: reason || null }]);
  return row;
}

/**
 * The customer said yes: an order with its parts and units (the units to start, yield included),
 * due on the promised date, draft builds by the plates of a fresh tentative plan, and that plan
 * as a printer-plan proposal for a planner to apply on the floor. Nothing is booked here.
 */
export async function acceptQuote(trx: Trx, id: string, version: number, actor: { id: string; role: Role }) {
  const actorId = actor.id;
  const q = await lockQuote(trx, id, version);
  if (q.status === "sent" && new Date(q.valid_until) < new Date()) {
    await trx.updateTable("quotes").set({ status: "expired", decided_at: new Date(), ...bump }).where("id", "=", id).execute();
    throw new AppError("conflict", `Quote ${q.code} expired on ${new Date(q.valid_until).toISOString().slice(0, 10)}; send a new one.`, undefined, { status: "expired" });
  }
  requireStatus(q, ["sent"], "accepted");
  const { lines } = await getQuoteOrThrow(trx, id);
  const evaluated = evaluateQuote(lines.map(lineSpecOf), await loadQuoteContext(trx));
  const dueAt = new Date(q.promise_at ?? evaluated.completion ?? Date.now());
  const order = await insertOrder(trx, { code: `WO-${q.code}`, customer: q.customer, project: `Quote ${q.code}`, due_at: dueAt, priority: 3, notes: q.notes }, actor.role);
  const items: PlanProposalItem[] = [];
  const unplaced: Array<{ code: string; reason: string }> = [];
  const printers = new Map((await trx.selectFrom("printers").select(["id", "name"]).execute()).map((p) => [p.id, p.name]));
  for (const [i, l] of lines.entries()) {
    const ev = evaluated.lines[i];
    const part = await insertPart(trx, {
      order_id: order.id, part_number: `${q.code}-${l.position}`, revision: "A", name: l.name.slice(0, 120), material_id: l.material_id,
      quantity: ev.quantity_to_start, nominal_x_mm: Number(l.nominal_x_mm), nominal_y_mm: Number(l.nominal_y_mm), nominal_z_mm: Number(l.nominal_z_mm),
      thickest_wall_mm: Number(l.thickest_wall_mm), stock_x_neg_mm: Number(l.stock_x_neg_mm), stock_x_pos_mm: Number(l.stock_x_pos_mm),
      stock_y_neg_mm: Number(l.stock_y_neg_mm), stock_y_pos_mm: Number(l.stock_y_pos_mm), stock_z_neg_mm: Number(l.stock_z_neg_mm), stock_z_pos_mm: Number(l.stock_z_pos_mm),
      finishing_notes: `From quote ${q.code}: ${l.quantity} good of ${ev.quantity_to_start} started.`,
      target_ra_um: l.target_ra_um === null ? null : Number(l.target_ra_um), tolerance_um: l.tolerance_um === null ? null : Number(l.tolerance_um), tolerance_grade: null,
    }, actorId);
    await trx.updateTable("parts").set({ volume_mm3: l.volume_mm3, geometry_file_id: l.file_id }).where("id", "=", part.id).execute();
    const units = await trx.selectFrom("units").select("id").where("part_id", "=", part.id).orderBy("serial").execute();
    if (!ev.promise.feasible) {
      unplaced.push({ code: part.part_number, reason: ev.promise.reason });
      continue;
    }
    let at = 0;
    for (const plate of ev.promise.plates) {
      const ids = units.slice(at, at + plate.units).map((u) => u.id);
      at += plate.units;
      const build = await insertBuild(trx, { unit_ids: ids, material_lot: "", notes: `Quote ${q.code}, line ${l.position}` }, actorId);
      const mat = await trx.selectFrom("materials").select("code").where("id", "=", l.material_id).executeTakeFirstOrThrow();
      items.push({
        build_id: build.id, build_version: build.version, code: build.code, material_code: mat.code, printer_id: plate.printer_id, printer_name: printers.get(plate.printer_id) ?? "?",
        starts_at: plate.start, ends_at: plate.end, due_at: dueAt.toISOString(), lateness_min: Math.max(0, Math.round((Date.parse(plate.end) - dueAt.getTime()) / 60_000)),
      });
    }
  }
  const proposal = items.length
    ? await trx
        .insertInto("plan_proposals")
        .values({ created_by: actorId, planned_from: new Date(), items: JSON.stringify(items), unplaced: JSON.stringify(unplaced), metrics: JSON.stringify({ source: "quote", quote: q.code, completion: evaluated.completion }) })
        .returning("id")
        .executeTakeFirstOrThrow()
    : null;
  const row = await trx
    .updateTable("quotes")
    .set({ status: "accepted", decided_at: new Date(), decided_by: actorId, order_id: order.id, plan_proposal_id: proposal?.id ?? null, ...bump })
    .where("id", "=", id)
    .returningAll()
    .executeTakeFirstOrThrow();
  await recordEvents(trx, [{ entity: "quote", entity_id: id, kind: "state", from_state: "sent", to_state: "accepted", actor_id: actorId, data: { order_id: order.id, plan_proposal_id: proposal?.id ?? null } }]);
  return { quote: row, order, plan_proposal_id: proposal?.id ?? null, replanned_completion: evaluated.completion };
}

export async function updateQuoteSettings(trx: Trx, input: QuoteSettingsInput) {
  const cur = await trx.selectFrom("quote_settings").select("version").where("id", "=", 1).forUpdate().executeTakeFirstOrThrow();
  requireVersion("The quote settings", cur.version, input.version);
  const { version: _v, ...rest } = input;
  void _v;
  return trx.updateTable("quote_settings").set({ ...rest, ...bump }).where("id", "=", 1).returningAll().executeTakeFirstOrThrow();
}

export async function upsertMaterialRate(db: Database, input: MaterialRateInput) {
  return db
    .insertInto("material_quote_rates")
    .values(input)
    .onConflict((oc) => oc.column("material_id").doUpdateSet({ ...input, updated_at: sql`now()`, version: sql`material_quote_rates.version + 1` }))
    .returningAll()
    .executeTakeFirstOrThrow();
}


/** A printer's or furnace's own quoting rates; all empty removes them (the shop's rates stand). */
export async function setEquipmentRate(db: Database, input: EquipmentRateInput) {
  if (input.kind === "printer") {
    const p = await db.selectFrom("printers").select("id").where("id", "=", input.printer_id).executeTakeFirst();
    if (!p) throw new AppError("not_found", "That printer does not exist.", { printer_id: ["choose a printer"] });
    if (input.rate_minor_per_h === null) {
      await db.deleteFrom("printer_quote_rates").where("printer_id", "=", input.printer_id).execute();
      return { printer_id: input.printer_id, rate_minor_per_h: null };
    }
    const values = { printer_id: input.printer_id, rate_minor_per_h: input.rate_minor_per_h };
    return db
      .insertInto("printer_quote_rates")
      .values(values)
      .onConflict((oc) => oc.column("printer_id").doUpdateSet({ rate_minor_per_h: input.rate_minor_per_h!, updated_at: sql`now()`, version: sql`printer_quote_rates.version + 1` }))
      .returning(["printer_id", "rate_minor_per_h"])
      .executeTakeFirstOrThrow();
  }
  const f = await db.selectFrom("furnaces").select("id").where("id", "=", input.furnace_id).executeTakeFirst();
  if (!f) throw new AppError("not_found", "That furnace does not exist.", { furnace_id: ["choose a furnace"] });
  const { run_cost_minor, gas_cost_minor, energy_cost_minor } = input;
  if (run_cost_minor === null && gas_cost_minor === null && energy_cost_minor === null) {
    await db.deleteFrom("furnace_quote_rates").where("furnace_id", "=", input.furnace_id).execute();
    return { furnace_id: input.furnace_id, run_cost_minor, gas_cost_minor, energy_cost_minor };
  }
  const set = { run_cost_minor, gas_cost_minor, energy_cost_minor };
  return db
    .insertInto("furnace_quote_rates")
    .values({ furnace_id: input.furnace_id, ...set })
    .onConflict((oc) => oc.column("furnace_id").doUpdateSet({ ...set, updated_at: sql`now()`, version: sql`furnace_quote_rates.version + 1` }))
    .returning(["furnace_id", "run_cost_minor", "gas_cost_minor", "energy_cost_minor"])
    .executeTakeFirstOrThrow();
}
