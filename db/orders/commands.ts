import { sql } from "kysely";
import type { Database } from "@/db/client";
import { AppError } from "@/lib/errors";
import { orderPriorityRefusal, type Role } from "@/lib/auth/permissions";
import type { CreateOrder, UpdateOrder } from "@/lib/parts/schemas";
import { getOrderOrThrow, findOrderByCode } from "./reads";

function duplicateCode(err: unknown, code: string | undefined): never {
  if ((err as { code?: string })?.code === "23505") {
    throw new AppError("invalid", `Work order ${code} already exists.`, { code: ["this work order number is taken"] });
  }
  throw err;
}

export async function insertOrder(db: Database, input: CreateOrder, role: Role) {
  const refusal = orderPriorityRefusal(role, input.priority);
  if (refusal) throw new AppError("forbidden", refusal, { priority: [refusal] });
  if (await findOrderByCode(db, input.code)) duplicateCode({ code: "23505" }, input.code);
  try {
    return await db.insertInto("orders").values(input).returningAll().executeTakeFirstOrThrow();
  } catch (err) {
    duplicateCode(err, input.code);
  }
}

export async function updateOrder(db: Database, id: string, input: UpdateOrder, role: Role) {
  const { version, ...values } = input;
  const current = await getOrderOrThrow(db, id);
  const refusal = orderPriorityRefusal(role, values.priority, current.priority);
  if (refusal) throw new AppError("forbidden", refusal, { priority: [refusal] });
  try {
    const row = await db
      .updateTable("orders")
      .set({ ...values, version: sql`version + 1`, updated_at: sql`now()` })
      .where("id", "=", id)
      .where("version", "=", version)
      .returningAll()
      .executeTakeFirst();
    if (!row) {
      throw new AppError("conflict", `Work order ${current.code} was changed by someone else (now version ${current.version}); reload to see their change, then apply yours again.`, undefined, { current_version: current.version });
    }
    return row;
  } catch (err) {
    duplicateCode(err, values.code);
  }
}
