import { sql } from "kysely";
import type { Database } from "@/db/client";
import type { Role } from "@/lib/auth/permissions";
import type { MailContext, MailRecipient } from "@/lib/notifications/templates";
import type { NotificationKind } from "@/lib/notifications/kinds";
import { getEnv } from "@/lib/env";

export type RecipientRow = MailRecipient & { id: string; role: Role };

/** Active users of the given roles who have not turned this kind of message off. */
export async function listRecipients(db: Database, roles: readonly Role[], kind: NotificationKind): Promise<RecipientRow[]> {
  if (!roles.length) return [];
  return db
    .selectFrom("users")
    .select(["id", "name", "email", "role", "unit_pref"])
    .where("active", "=", true)
    .where("role", "in", [...roles])
    .where(sql<boolean>`not (${kind} = any(muted_mail))`)
    .orderBy("email")
    .execute();
}

// A worker writes many messages a second in a burst; the shop's name and time zone change
// rarely, so they are read at most every half minute.
const CONTEXT_TTL_MS = 30_000;
let cachedContext: { at: number; value: MailContext } | undefined;

/** Shop name and time zone for the messages, with the app's address for their links. */
export async function findMailContext(db: Database): Promise<MailContext> {
  if (cachedContext && Date.now() - cachedContext.at < CONTEXT_TTL_MS) return cachedContext.value;
  const row = await db.selectFrom("shop_settings").select(["shop_name", "time_zone"]).where("id", "=", 1).executeTakeFirst();
  const value = { shop_name: row?.shop_name ?? "your shop", time_zone: row?.time_zone ?? "UTC", app_url: getEnv().APP_URL };
  cachedContext = { at: Date.now(), value };
  return value;
}
