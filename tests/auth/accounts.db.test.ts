// Account rules that need a database of their own: the last active admin cannot be removed, and
// account mail survives a relay that does not answer.
import { createServer } from "node:net";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createDb, type Database } from "@/db/client";
import { migrateToLatest } from "@/db/migrate";
import { createUserAndInvite, sendAccountLink, updateUserByAdmin, type Actor } from "@/db/auth/accounts";
import { resetEnvCache } from "@/lib/env";
import { AppError } from "@/lib/errors";
import { scratchDatabase } from "../helpers/db";

/** A loopback port with nothing listening: the relay is "down". */
async function closedPort(): Promise<number> {
  const srv = createServer();
  await new Promise<void>((r) => srv.listen(0, "127.0.0.1", () => r()));
  const port = (srv.address() as { port: number }).port;
  await new Promise<void>((r) => srv.close(() => r()));
  return port;
}

let db: Database;
let drop: () => Promise<void>;
const realSmtpPort = process.env.SMTP_PORT;

async function admin(name: string) {
  const row = await db.insertInto("users").values({ email: `${name.toLowerCase()}@scratch.test`, name, role: "admin", password_hash: "x" }).returning(["id", "name", "role", "version"]).executeTakeFirstOrThrow();
  return row;
}
const actorOf = (u: { id: string; name: string }): Actor => ({ id: u.id, name: u.name, role: "admin" });
const version = async (id: string) => (await db.selectFrom("users").select("version").where("id", "=", id).executeTakeFirstOrThrow()).version;

beforeAll(async () => {
  // This file's mail goes nowhere: nothing here may reach the shared capture server.
  process.env.SMTP_PORT = String(await closedPort());
  resetEnvCache();
  const scratch = await scratchDatabase("accounts");
  drop = scratch.drop;
  db = createDb(scratch.url, 4).db;
  await migrateToLatest(db);
});
afterAll(async () => {
  await db?.destroy();
  await drop?.();
  if (realSmtpPort === undefined) delete process.env.SMTP_PORT;
  else process.env.SMTP_PORT = realSmtpPort;
  resetEnvCache();
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

describe("account mail when the relay does not answer", () => {
  it("an invitation is created and queued, not lost; a resend withdraws the queued one", async () => {
    const a = await admin("Esme");
    const { user, mail } = await createUserAndInvite(db, actorOf(a), { email: "queued@scratch.test", name: "Queued Person", role: "technician", unit_pref: "mm" });
    expect(mail.status).toBe("queued");
    expect(mail.error).toBeTruthy();
    const first = await db.selectFrom("notification_outbox").select(["id", "status", "attempts", "last_error", "subject_key"]).where("recipient_id", "=", user.id).executeTakeFirstOrThrow();
    expect(first).toMatchObject({ status: "pending", attempts: 1 });
    const token = await db.selectFrom("auth_tokens").select(["id", "used_at"]).where("user_id", "=", user.id).executeTakeFirstOrThrow();
    expect(first.subject_key).toBe(token.id);

    const again = await sendAccountLink(db, actorOf(a), user.id);
    expect(again).toMatchObject({ kind: "invite", mail: { status: "queued" } });
    const rows = await db.selectFrom("notification_outbox").select(["id", "status", "last_error"]).where("recipient_id", "=", user.id).orderBy("created_at").execute();
    expect(rows).toHaveLength(2);
    expect(rows[0]).toMatchObject({ id: first.id, status: "failed" });
    expect(rows[0].last_error).toMatch(/withdrawn/);
    expect(rows[1].status).toBe("pending");
    const tokens = await db.selectFrom("auth_tokens").select(["id", "used_at"]).where("user_id", "=", user.id).orderBy("created_at").execute();
    expect(tokens[0].used_at).not.toBeNull();
    expect(tokens[1].used_at).toBeNull();
  });
});
