import { sql, type Transaction } from "kysely";
import type { Database } from "@/db/client";
import type { DB } from "@/db/schema";
import { AppError } from "@/lib/errors";
import { orderPriorityRefusal, type Role } from "@/lib/auth/permissions";
import { csvRowSchema, type CreatePart, type CsvRow, type ImportRequest, type RowResult, type UpdatePart } from "@/lib/parts/schemas";
import { insertUnitsForPart } from "@/db/units/commands";
import { scaleFields } from "./reads";

type Trx = Transaction<DB>;

async function materialOrThrow(db: Database | Trx, id: string) {
  const m = await db.selectFrom("materials").select(["id", "code", "shrink_xy", "shrink_z", "active"]).where("id", "=", id).executeTakeFirst();
  if (!m) throw new AppError("invalid", "That material does not exist.", { material_id: ["choose a material"] });
  return { ...m, shrink_xy: Number(m.shrink_xy), shrink_z: Number(m.shrink_z) };
}

function duplicatePart(err: unknown, input: { part_number?: string; revision?: string }): never {
  if ((err as { code?: string })?.code === "23505") {
    throw new AppError("invalid", `Part ${input.part_number} rev ${input.revision} is already on this order.`, { part_number: ["already on this order at this revision"] });
  }
  throw err;
}

export async function insertPart(trx: Trx, input: CreatePart, actorId: string | null) {
  const order = await trx.selectFrom("orders").select(["id", "code"]).where("id", "=", input.order_id).executeTakeFirst();
  if (!order) throw new AppError("invalid", "That order does not exist.", { order_id: ["choose an order"] });
  const material = await materialOrThrow(trx, input.material_id);
  if (!material.active) throw new AppError("invalid", `${material.code} is retired; choose an active material.`, { material_id: ["retired material"] });
  const exists = await trx
    .selectFrom("parts")
    .select("id")
    .where("order_id", "=", input.order_id)
    .where("part_number", "=", input.part_number)
    .where("revision", "=", input.revision)
    .executeTakeFirst();
  if (exists) duplicatePart({ code: "23505" }, input);
  let part;
  try {
    part = await trx
      .insertInto("parts")
      .values({ ...input, ...scaleFields(input, material) })
      .returningAll()
      .executeTakeFirstOrThrow();
  } catch (err) {
    duplicatePart(err, input);
  }
  await insertUnitsForPart(trx, { id: part.id, part_number: part.part_number, order_code: order.code }, input.quantity, actorId);
  return part;
}

export async function updatePart(trx: Trx, id: string, input: UpdatePart, actorId: string | null) {
  const { version, ...values } = input;
  const current = await trx.selectFrom("parts as p").innerJoin("orders as o", "o.id", "p.order_id").selectAll("p").select("o.code as order_code").where("p.id", "=", id).forUpdate("p").executeTakeFirst();
  if (!current) throw new AppError("not_found", "That part does not exist.");
  if (current.version !== version) {
    throw new AppError("conflict", `Part ${current.part_number} was changed by someone else (now version ${current.version}); reload to see their change, then apply yours again.`, undefined, { current_version: current.version });
  }
  const merged = {
    nominal_x_mm: values.nominal_x_mm ?? Number(current.nominal_x_mm),
    nominal_y_mm: values.nominal_y_mm ?? Number(current.nominal_y_mm),
    nominal_z_mm: values.nominal_z_mm ?? Number(current.nominal_z_mm),
    stock_x_neg_mm: values.stock_x_neg_mm ?? Number(current.stock_x_neg_mm),
    stock_x_pos_mm: values.stock_x_pos_mm ?? Number(current.stock_x_pos_mm),
    stock_y_neg_mm: values.stock_y_neg_mm ?? Number(current.stock_y_neg_mm),
    stock_y_pos_mm: values.stock_y_pos_mm ?? Number(current.stock_y_pos_mm),
    stock_z_neg_mm: values.stock_z_neg_mm ?? Number(current.stock_z_neg_mm),
    stock_z_pos_mm: values.stock_z_pos_mm ?? Number(current.stock_z_pos_mm),
  };
  const materialId = values.material_id ?? current.material_id;
  if (materialId !== current.material_id) {
    const onBuild = await trx.selectFrom("units").select("id").where("part_id", "=", id).where("build_id", "is not", null).executeTakeFirst();
    if (onBuild) throw new AppError("invalid", "Some units of this part are already on a build; the material can no longer change.", { material_id: ["units are on a build"] });
  }
  const material = await materialOrThrow(trx, materialId);
  const sizeChanged = Object.entries(merged).some(([k, v]) => Number(current[k as keyof typeof current]) !== v) || materialId !== current.material_id;
  if (sizeChanged) {
    const placed = await trx
      .selectFrom("units as u")
      .innerJoin("builds as b", "b.id", "u.build_id")
      .select("b.code")
      .where("u.part_id", "=", id)
      .where("b.state", "in", ["scheduled", "running", "complete"])
      .executeTakeFirst();
    if (placed) throw new AppError("invalid", `Units of this part are on ${placed.code}, which is on the floor; take it off before changing sizes or stock.`, { nominal_x_mm: ["the part is already booked to print"] });
  }
  let row;
  try {
    row = await trx
      .updateTable("parts")
      .set({ ...values, ...(sizeChanged ? scaleFields(merged, material) : {}), version: sql`version + 1`, updated_at: sql`now()` })
      .where("id", "=", id)
      .where("version", "=", version)
      .returningAll()
      .executeTakeFirstOrThrow();
  } catch (err) {
    duplicatePart(err, { part_number: values.part_number ?? current.part_number, revision: values.revision ?? current.revision });
  }
  if (values.quantity !== undefined && values.quantity !== current.quantity) {
    const live = await trx.selectFrom("units").select(["id", "state", "build_id"]).where("part_id", "=", id).where("state", "<>", "scrapped").orderBy("serial", "desc").execute();
    if (values.quantity > live.length) {
      await insertUnitsForPart(trx, { id, part_number: row.part_number, order_code: current.order_code }, values.quantity - live.length, actorId);
    } else if (values.quantity < live.length) {
      const removable = live.filter((u) => u.state === "planned" && !u.build_id);
      const excess = live.length - values.quantity;
      if (removable.length < excess) {
        throw new AppError("invalid", `Only ${removable.length} unit(s) are planned and on no build; the quantity cannot drop below ${live.length - removable.length}.`, { quantity: [`at least ${live.length - removable.length}`] });
      }
      await trx.deleteFrom("units").where("id", "in", removable.slice(0, excess).map((u) => u.id)).execute();
    }
  }
  return row;
}

// CSV import --------------------------------------------------------------------------------------

export type ImportOutcome = {
  ok: boolean;
  imported_parts: number;
  created_orders: number;
  valid: number;
  invalid: number;
  results: RowResult[];
};

/**
 * Checks every row (shape, material, duplicates in the file and in the shop, one customer and
 * due date per order) and imports in the caller's transaction: all rows or none, or, when
 * asked, the valid ones only. Row numbers are file lines (the header is line 1).
 */
export async function importPartRows(trx: Trx, req: ImportRequest, actor: { id: string; role: Role }): Promise<ImportOutcome> {
  const actorId = actor.id;
  const materials = await trx.selectFrom("materials").select(["id", "code", "active"]).execute();
  const byCode = new Map(materials.map((m) => [m.code.toLowerCase(), m]));
  const known = materials.filter((m) => m.active).map((m) => m.code).join(", ");
  const results: RowResult[] = [];
  const parsed: Array<{ line: number; row: CsvRow & { material_id: string } } | null> = [];
  const seenParts = new Map<string, number>();
  const orderHeads = new Map<string, { customer: string; due: number; line: number }>();

  const codes = [...new Set(req.rows.map((r) => String(r.order_code ?? "").trim().toLowerCase()).filter(Boolean))];
  const existingOrders = codes.length
    ? await trx.selectFrom("orders").select(["id", "code", "customer"]).where(sql`lower(code)`, "in", codes).execute()
    : [];
  const orderByCode = new Map(existingOrders.map((o) => [o.code.toLowerCase(), o]));
  const existingParts = existingOrders.length
    ? await trx.selectFrom("parts").select(["order_id", "part_number", "revision"]).where("order_id", "in", existingOrders.map((o) => o.id)).execute()
    : [];
  const partKeys = new Set(existingParts.map((p) => `${p.order_id}|${p.part_number}|${p.revision}`.toLowerCase()));

  req.rows.forEach((raw, i) => {
    const line = i + 2;
    const clean: Record<string, unknown> = {};
    for (const [k, v] of Object.entries(raw)) clean[k.trim().toLowerCase()] = typeof v === "string" ? v.trim() : v;
    const errors: Record<string, string[]> = {};
    const add = (field: string, msg: string) => (errors[field] ??= []).push(msg);
    const result = csvRowSchema.safeParse(clean);
    if (!result.success) {
      for (const issue of result.error.issues) add(issue.path.join(".") || "_", issue.message);
    }
    const materialCode = String(clean.material ?? "");
    const material = byCode.get(materialCode.toLowerCase());
    if (materialCode && !material) add("material", `unknown material "${materialCode}" (known: ${known})`);
    else if (material && !material.active) add("material", `${material.code} is retired`);
    if (result.success) {
      const r = result.data;
      // the same field rule as creating an order by hand (an existing order keeps its priority)
      const priorityRefusal = orderByCode.has(r.order_code.toLowerCase()) ? null : orderPriorityRefusal(actor.role, r.priority);
      if (priorityRefusal) add("priority", priorityRefusal);
      const orderKey = r.order_code.toLowerCase();
      const key = `${orderKey}|${r.part_number}|${r.revision}`.toLowerCase();
      const first = seenParts.get(key);
      if (first) add("part_number", `the same part and revision is on line ${first} too`);
      else seenParts.set(key, line);
      const head = orderHeads.get(orderKey);
      if (!head) orderHeads.set(orderKey, { customer: r.customer, due: r.due_date.getTime(), line });
      else {
        if (head.customer !== r.customer) add("customer", `line ${head.line} gives ${r.order_code} the customer "${head.customer}"`);
        if (head.due !== r.due_date.getTime()) add("due_date", `line ${head.line} gives ${r.order_code} another due date`);
      }
      const existing = orderByCode.get(orderKey);
      if (existing && partKeys.has(`${existing.id}|${r.part_number}|${r.revision}`.toLowerCase())) {
        add("part_number", `${r.part_number} rev ${r.revision} is already on ${existing.code}`);
      }
    }
    const ok = Object.keys(errors).length === 0;
    results.push({
      row: line,
      ok,
      errors,
      order_code: typeof clean.order_code === "string" ? clean.order_code : undefined,
      part_number: typeof clean.part_number === "string" ? clean.part_number : undefined,
      creates_order: typeof clean.order_code === "string" ? !orderByCode.has(clean.order_code.toLowerCase()) : undefined,
    });
    parsed.push(ok && result.success && material ? { line, row: { ...result.data, material_id: material.id } } : null);
  });

  const valid = parsed.filter((p): p is NonNullable<typeof p> => p !== null);
  const outcome = { valid: valid.length, invalid: req.rows.length - valid.length, results };
  if (req.dry_run || valid.length === 0 || (req.mode === "all" && outcome.invalid > 0)) {
    return { ok: outcome.invalid === 0, imported_parts: 0, created_orders: 0, ...outcome };
  }
  let createdOrders = 0;
  const orderIds = new Map<string, { id: string }>();
  for (const { row } of valid) {
    const key = row.order_code.toLowerCase();
    let order = orderIds.get(key) ?? orderByCode.get(key);
    if (!order) {
      order = await trx
        .insertInto("orders")
        .values({ code: row.order_code, customer: row.customer, project: row.project, due_at: row.due_date, priority: row.priority, notes: "" })
        .returning("id")
        .executeTakeFirstOrThrow();
      createdOrders++;
    }
    orderIds.set(key, order);
    const { order_code: _c, customer: _cu, project: _p, due_date: _d, priority: _pr, material: _m, ...part } = row;
    await insertPart(trx, { ...part, order_id: order.id }, actorId);
  }
  return { ok: outcome.invalid === 0, imported_parts: valid.length, created_orders: createdOrders, ...outcome };
}
