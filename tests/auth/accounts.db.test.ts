// Account rules that need a database of their own: the last active admin cannot be removed.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createDb, type Database } from "@/db/client";
import { migrateToLatest } from "@/db/migrate";
import { updateUserByAdmin, type Actor } from "@/lib/auth/accounts";
import { AppError } from "@/lib/errors";
import { scratchDatabase } from "../helpers/db";

let db: Database;
let drop: () => Promise<void>;

async function admin(name: string) {
  const row = await db.insertInto("users").values({ email: `${name.toLowerCase()}@scratch.test`, name, role: "admin", password_hash: "x" }).returning(["id", "name", "role", "version"]).executeTakeFirstOrThrow();
  return row;
}
const actorOf = (u: { id: string; name: string }): Actor => ({ id: u.id, name: u.name, role: "admin" });
const version = async (id: string) => (await db.selectFrom("users").select("version").where("id", "=", id).executeTakeFirstOrThrow()).version;

beforeAll(async () => {
  const scratch = await scratchDatabase("accounts");
  drop = scratch.drop;
  db = createDb(scratch.url, 4).db;
  await migrateToLatest(db);
});
afterAll(async () => {
  await db?.destroy();
  await drop?.();
});

describe("the last active admin", () => {
  it("cannot be demoted or deactivated; with a second admin it can", async () => {
    const a = await admin("Alda");
    const demote = updateUserByAdmin(db, actorOf(a), a.id, { version: await version(a.id), role: "manager" });
    await expect(demote).rejects.toThrow(/last active admin/);
    await expect(demote).rejects.toBeInstanceOf(AppError);
    const b = await admin("Bram");
    const done = await updateUserByAdmin(db, actorOf(b), a.id, { version: await version(a.id), role: "manager" });
    expect(done.role).toBe("manager");
    await expect(updateUserByAdmin(db, actorOf(a), b.id, { version: await version(b.id), active: false })).rejects.toMatchObject({ code: "conflict" });
    expect((await db.selectFrom("users").select(["role", "active"]).where("id", "=", b.id).executeTakeFirstOrThrow())).toEqual({ role: "admin", active: true });
  });

  it("two admins demoting each other at once: exactly one wins, never a deadlock", async () => {
    const c = await admin("Cleo");
    const d = await admin("Dov");
    // leave only these two as active admins
    await db.updateTable("users").set({ active: false }).where("role", "=", "admin").where("id", "not in", [c.id, d.id]).execute();
    const [vc, vd] = [await version(c.id), await version(d.id)];
    const results = await Promise.allSettled([
      updateUserByAdmin(db, actorOf(d), c.id, { version: vc, role: "technician" }),
      updateUserByAdmin(db, actorOf(c), d.id, { version: vd, role: "technician" }),
    ]);
    expect(results.filter((r) => r.status === "fulfilled")).toHaveLength(1);
    const lost = results.find((r) => r.status === "rejected") as PromiseRejectedResult;
    expect(lost.reason).toBeInstanceOf(AppError);
    expect(lost.reason.message).toMatch(/last active admin/);
    const admins = await db.selectFrom("users").select("id").where("role", "=", "admin").where("active", "=", true).execute();
    expect(admins).toHaveLength(1);
  });
});
