import { sql, type Transaction } from "kysely";
import type { DB } from "@/db/schema";
import type { Role } from "@/lib/auth/permissions";
import { type Executor, isUuid } from "./reads";

/** Row lock for changes that check other rows (the last active admin). */
export async function lockUserById(trx: Transaction<DB>, id: string) {
  if (!isUuid(id)) return undefined;
  return trx
    .selectFrom("users")
    .select(["id", "email", "name", "role", "active", "version", "password_hash"])
    .where("id", "=", id)
    .forUpdate()
    .executeTakeFirst();
}

export async function insertUser(db: Executor, row: { email: string; name: string; role: Role; unit_pref: "mm" | "in" }) {
  return db.insertInto("users").values({ ...row, email: row.email.trim() }).returning(["id", "email", "name", "role"]).executeTakeFirstOrThrow();
}

export type UserPatch = Partial<{
  name: string;
  role: Role;
  active: boolean;
  unit_pref: "mm" | "in";
  muted_mail: string[];
  password_hash: string;
  sessions_valid_after: Date;
}>;

/** Applies a change and bumps the version; with `version`, only when it still matches (else undefined). */
export async function updateUser(db: Executor, id: string, patch: UserPatch, version?: number) {
  let q = db
    .updateTable("users")
    .set({ ...patch, updated_at: sql`now()`, version: sql`version + 1` })
    .where("id", "=", id);
  if (version !== undefined) q = q.where("version", "=", version);
  return q.returning(["id", "email", "name", "role", "active", "unit_pref", "muted_mail", "version"]).executeTakeFirst();
}

export async function recordSignIn(db: Executor, id: string) {
  await db.updateTable("users").set({ last_sign_in_at: sql`now()` }).where("id", "=", id).execute();
}
