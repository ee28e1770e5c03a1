import { randomBytes } from "node:crypto";
import { sql } from "kysely";
import type { Database } from "@/db/client";
import { hashCalendarToken } from "./reads";

/** A new secret replaces the old one at once: every feed address made with the old one stops. */
export async function rotateCalendarToken(db: Database, userId: string): Promise<{ token: string; created_at: string }> {
  const token = randomBytes(32).toString("base64url");
  return db.transaction().execute(async (trx) => {
    const row = await trx
      .updateTable("users")
      .set({ calendar_token: hashCalendarToken(token), calendar_token_created_at: sql`now()`, updated_at: sql`now()` })
      .where("id", "=", userId)
      .returning(["calendar_token_created_at"])
      .executeTakeFirstOrThrow();
    await trx.insertInto("events").values({ entity: "user", entity_id: userId, kind: "calendar_token_created", actor_id: userId }).execute();
    return { token, created_at: row.calendar_token_created_at!.toISOString() };
  });
}

export async function revokeCalendarToken(db: Database, userId: string): Promise<boolean> {
  return db.transaction().execute(async (trx) => {
    const row = await trx
      .updateTable("users")
      .set({ calendar_token: null, calendar_token_created_at: null, updated_at: sql`now()` })
      .where("id", "=", userId)
      .where("calendar_token", "is not", null)
      .returning("id")
      .executeTakeFirst();
    if (row) await trx.insertInto("events").values({ entity: "user", entity_id: userId, kind: "calendar_token_revoked", actor_id: userId }).execute();
    return !!row;
  });
}
