import type { Database } from "@/db/client";
import type { Role } from "@/lib/auth/permissions";

export type CurrentUser = {
  id: string;
  email: string;
  name: string;
  role: Role;
  unit_pref: "mm" | "in";
  sessions_valid_after: Date | number | null; // -infinity arrives as a number
};

export async function findActiveUserById(db: Database, id: string): Promise<CurrentUser | undefined> {
  if (!/^[0-9a-f-]{36}$/i.test(id)) return undefined;
  return db
    .selectFrom("users")
    .select(["id", "email", "name", "role", "unit_pref", "sessions_valid_after"])
    .where("id", "=", id)
    .where("active", "=", true)
    .executeTakeFirst();
}

export async function findUserByEmail(db: Database, email: string) {
  return db
    .selectFrom("users")
    .select(["id", "email", "name", "role", "active", "password_hash"])
    .where((eb) => eb(eb.fn("lower", ["email"]), "=", email.trim().toLowerCase()))
    .executeTakeFirst();
}
