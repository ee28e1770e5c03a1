import { sql, type Transaction } from "kysely";
import type { Database } from "@/db/client";
import type { DB } from "@/db/schema";
import type { Role } from "@/lib/auth/permissions";

export type Executor = Database | Transaction<DB>;

export type CurrentUser = {
  id: string;
  email: string;
  name: string;
  role: Role;
  unit_pref: "mm" | "in";
  muted_mail: string[];
  sessions_valid_after: Date | number | null; // -infinity arrives as a number
  session_id: string | null; // the cookie's user_sessions row
  session_open: boolean; // that row exists for this user and nobody has ended it
};

export { isUuid } from "@/lib/ids";
import { isUuid } from "@/lib/ids";

/**
 * Whether the session row `sid` is open for the user in `userIdColumn`: the same expression in
 * every query that admits a request (findActiveUserById, db/floor/reads.ts floorViewerAndStamp).
 */
export function sessionOpenSql(userIdColumn: string, sid: string | null | undefined) {
  if (!isUuid(sid)) return sql<boolean>`false`;
  return sql<boolean>`exists (select 1 from user_sessions s where s.id = ${sid} and s.user_id = ${sql.ref(userIdColumn)} and s.revoked_at is null)`;
}

/** The active user and whether the cookie's session row (`sid`) is still open, in one query. */
export async function findActiveUserById(db: Executor, id: string, sid?: string | null): Promise<CurrentUser | undefined> {
  if (!isUuid(id)) return undefined;
  return db
    .selectFrom("users")
    .select(["id", "email", "name", "role", "unit_pref", "muted_mail", "sessions_valid_after"])
    .select(sql<string | null>`${isUuid(sid) ? sid : null}::uuid`.as("session_id"))
    .select(sessionOpenSql("users.id", sid).as("session_open"))
    .where("id", "=", id)
    .where("active", "=", true)
    .executeTakeFirst();
}

export async function findUserByEmail(db: Executor, email: string) {
  return db
    .selectFrom("users")
    .select(["id", "email", "name", "role", "active", "password_hash"])
    .where((eb) => eb(eb.fn("lower", ["email"]), "=", email.trim().toLowerCase()))
    .executeTakeFirst();
}

/** The columns an admin sees; never the password hash, only whether one is set. */
const adminColumns = [
  "users.id",
  "users.email",
  "users.name",
  "users.role",
  "users.unit_pref",
  "users.active",
  "users.last_sign_in_at",
  "users.created_at",
  "users.updated_at",
  "users.version",
] as const;

export type AdminUserRow = {
  id: string;
  email: string;
  name: string;
  role: Role;
  unit_pref: "mm" | "in";
  active: boolean;
  last_sign_in_at: Date | null;
  created_at: Date;
  updated_at: Date;
  version: number;
  has_password: boolean;
  open_invite_expires_at: Date | null;
};

function adminUsers(db: Executor) {
  return db
    .selectFrom("users")
    .select(adminColumns)
    .select((eb) => [
      eb("users.password_hash", "is not", null).as("has_password"),
      eb
        .selectFrom("auth_tokens")
        .select((e) => e.fn.max("auth_tokens.expires_at").as("x"))
        .whereRef("auth_tokens.user_id", "=", "users.id")
        .where("auth_tokens.kind", "=", "invite")
        .where("auth_tokens.used_at", "is", null)
        .where("auth_tokens.expires_at", ">", sql<Date>`now()`)
        .as("open_invite_expires_at"),
    ]);
}

export async function listUsers(db: Executor): Promise<AdminUserRow[]> {
  return (await adminUsers(db).orderBy("users.active", "desc").orderBy("users.name").execute()) as AdminUserRow[];
}

export async function findUserById(db: Executor, id: string): Promise<AdminUserRow | undefined> {
  if (!isUuid(id)) return undefined;
  return (await adminUsers(db).where("users.id", "=", id).executeTakeFirst()) as AdminUserRow | undefined;
}

/** Active admins other than the given user (the caller serialises admin changes). */
export async function countOtherActiveAdmins(trx: Transaction<DB>, exceptId: string): Promise<number> {
  const rows = await trx.selectFrom("users").select("id").where("role", "=", "admin").where("active", "=", true).where("id", "!=", exceptId).execute();
  return rows.length;
}

export async function findPasswordHash(db: Executor, id: string): Promise<string | null> {
  const row = await db.selectFrom("users").select("password_hash").where("id", "=", id).executeTakeFirst();
  return row?.password_hash ?? null;
}
