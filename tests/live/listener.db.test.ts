// The LISTEN connection against the real test database: a connection cut by the server (here
// pg_terminate_backend, as a restart or a proxy's idle timeout would) is reported, never thrown,
// and comes back by itself, still hearing what the triggers announce.
import { afterAll, describe, expect, it } from "vitest";
import { randomUUID } from "node:crypto";
import { sql } from "kysely";
import { ChangeListener, type ListenerState } from "@/db/live/listener";
import { parseChange, type Change } from "@/lib/live/changes";
import { testDb } from "../helpers/db";

const { db, close } = testDb();
afterAll(close);

const until = async (cond: () => boolean, ms: number) => {
  const end = Date.now() + ms;
  while (!cond()) {
    if (Date.now() > end) throw new Error("timed out");
    await new Promise((r) => setTimeout(r, 20));
  }
};

describe("ChangeListener", () => {
  it("hears a trigger's NOTIFY, survives its connection being killed, and hears the next one", async () => {
    const name = `hearth-live-test-${randomUUID().slice(0, 8)}`;
    const heard: Change[] = [];
    const states: { state: ListenerState; resumed: boolean }[] = [];
    const listener = new ChangeListener({
      connectionString: process.env.DATABASE_URL!,
      applicationName: name,
      minDelayMs: 20,
      maxDelayMs: 200,
      onPayload: (p) => {
        const c = parseChange(p);
        if (c) heard.push(c);
      },
      onState: (state, { resumed }) => states.push({ state, resumed }),
    });
    listener.start();
    try {
      await until(() => listener.state === "listening", 5_000);
      const window = await db
        .insertInto("maintenance_windows")
        .values({ resource: "furnace", furnace_id: (await db.selectFrom("furnaces").select("id").limit(1).executeTakeFirstOrThrow()).id, starts_at: new Date(Date.now() + 400 * 86_400_000), ends_at: new Date(Date.now() + 400 * 86_400_000 + 3_600_000), reason: "listener test" })
        .returning(["id", "version"])
        .executeTakeFirstOrThrow();
      await until(() => heard.some((c) => c.e === "maintenance" && c.id === window.id && c.v === window.version), 2_000);

      const killed = await sql<{ ok: boolean }>`select pg_terminate_backend(pid) as ok from pg_stat_activity where application_name = ${name}`.execute(db);
      expect(killed.rows.map((r) => r.ok)).toEqual([true]);
      await until(() => states.some((s) => s.state === "down"), 5_000);
      await until(() => states.some((s) => s.state === "listening" && s.resumed), 5_000);
      expect(listener.reconnects).toBe(1);

      await db.updateTable("maintenance_windows").set({ reason: "listener test, again", version: window.version + 1 }).where("id", "=", window.id).execute();
      await until(() => heard.some((c) => c.e === "maintenance" && c.id === window.id && c.v === window.version + 1), 2_000);
      await db.deleteFrom("maintenance_windows").where("id", "=", window.id).execute();
    } finally {
      await listener.stop();
    }
    expect(listener.state).toBe("stopped");
  });
});
