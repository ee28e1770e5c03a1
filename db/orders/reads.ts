import { sql } from "kysely";
import type { Database } from "@/db/client";
import { AppError } from "@/lib/errors";
import type { ListOrders } from "@/lib/parts/schemas";
import { summarizeOrder, type ProjectionSummary } from "@/lib/parts/projection";
import { loadProjectionContext, projectionsForOrders } from "@/db/units/reads";

const SORTS = { code: "o.code", customer: "o.customer", due_at: "o.due_at", priority: "o.priority", created_at: "o.created_at" } as const;

export type OrderListRow = {
  id: string; code: string; customer: string; project: string; due_at: string; priority: number; notes: string; version: number;
  part_count: number; unit_count: number; done_count: number; projection: ProjectionSummary | null;
};

const escapeLike = (s: string) => `%${s.replace(/[\\%_]/g, (c) => `\\${c}`)}%`;

export async function listOrders(db: Database, q: ListOrders): Promise<{ rows: OrderListRow[]; total: number }> {
  let query = db
    .selectFrom("orders as o")
    .select([
      "o.id", "o.code", "o.customer", "o.project", "o.due_at", "o.priority", "o.notes", "o.version",
      sql<number>`(select count(*) from parts p where p.order_id = o.id)`.as("part_count"),
      sql<number>`(select count(*) from units u join parts p on p.id = u.part_id where p.order_id = o.id and u.state <> 'scrapped')`.as("unit_count"),
      sql<number>`(select count(*) from units u join parts p on p.id = u.part_id where p.order_id = o.id and u.state = 'done')`.as("done_count"),
      sql<number>`count(*) over ()`.as("total_count"),
    ]);
  if (q.search) {
    const like = escapeLike(q.search);
    query = query.where((eb) => eb.or([eb("o.code", "ilike", like), eb("o.customer", "ilike", like), eb("o.project", "ilike", like)]));
  }
  const rows = await query
    .orderBy(sql.ref(SORTS[q.sort]), q.dir)
    .orderBy("o.code")
    .limit(q.page_size)
    .offset((q.page - 1) * q.page_size)
    .execute();
  const ctx = await loadProjectionContext(db);
  const projections = await projectionsForOrders(db, rows.map((r) => r.id), ctx);
  let total = rows.length ? Number(rows[0].total_count) : 0;
  if (!rows.length && q.page > 1) total = (await listOrders(db, { ...q, page: 1 })).total;
  return {
    total,
    rows: rows.map((r) => ({
      id: r.id, code: r.code, customer: r.customer, project: r.project, due_at: new Date(r.due_at).toISOString(), priority: r.priority, notes: r.notes, version: r.version,
      part_count: Number(r.part_count), unit_count: Number(r.unit_count), done_count: Number(r.done_count),
      projection: summarizeOrder(new Date(r.due_at), projections.get(r.id) ?? [], ctx.shop.at_risk_margin_minutes),
    })),
  };
}

export async function getOrderOrThrow(db: Database, id: string) {
  const row = await db.selectFrom("orders").selectAll().where("id", "=", id).executeTakeFirst();
  if (!row) throw new AppError("not_found", "That order does not exist.");
  return row;
}

export async function findOrderByCode(db: Database, code: string) {
  return db.selectFrom("orders").selectAll().where(sql`lower(code)`, "=", code.toLowerCase()).executeTakeFirst();
}

/** Order choices for the part form: newest due first is rarely wanted, so by code. */
export async function listOrderOptions(db: Database) {
  return db.selectFrom("orders").select(["id", "code", "customer", "due_at"]).orderBy("code").limit(1000).execute();
}
