// The activity log's retention against the running app and the real database: the admin's
// setting (zod-checked, 422 with the field), the daily prune in batches, what it must keep.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { sql } from "kysely";
import { randomUUID } from "node:crypto";
import { pruneActivity } from "@/db/activity/commands";
import { testDb } from "../helpers/db";
import { DEMO, api, signIn } from "../helpers/session";

const { db, close } = testDb();
let admin: string;
let manager: string;

/** An event of `entity`, `ageDays` old, with a marker to find it by. */
async function oldEvent(entity: string, ageDays: number, marker: string) {
  const row = await db
    .insertInto("events")
    .values({ entity, entity_id: randomUUID(), kind: "retention_test", reason: marker, created_at: sql<Date>`now() - make_interval(days => ${ageDays})` })
    .returning("id")
    .executeTakeFirstOrThrow();
  return Number(row.id);
}
const exists = async (id: number) => !!(await db.selectFrom("events").select("id").where("id", "=", id).executeTakeFirst());

beforeAll(async () => {
  [admin, manager] = await Promise.all([signIn(DEMO.admin), signIn(DEMO.manager)]);
});
afterAll(async () => {
  await api("/api/activity/retention", { method: "PUT", cookie: admin, body: { retention_days: null } });
  await close();
});

describe("activity log retention", () => {
  it("takes 30 to 3650 days or null, refuses anything else with 422 and the field, and only an admin sets it", async () => {
    for (const bad of [29, 3651, 90.5, "90", -1, true]) {
      const res = await api("/api/activity/retention", { method: "PUT", cookie: admin, body: { retention_days: bad } });
      expect(res.status, `${JSON.stringify(bad)}: ${JSON.stringify(res.body)}`).toBe(422);
      expect(Object.keys(res.body.error.fieldErrors)).toEqual(["retention_days"]);
    }
    expect((await api("/api/activity/retention", { method: "PUT", cookie: admin, body: {} })).status).toBe(422);
    expect((await api("/api/activity/retention", { method: "PUT", cookie: manager, body: { retention_days: 90 } })).status).toBe(403);
    expect((await api("/api/activity/retention", { method: "PUT", body: { retention_days: 90 } })).status).toBe(401);
    const ok = await api("/api/activity/retention", { method: "PUT", cookie: admin, body: { retention_days: 30 } });
    expect(ok.status, JSON.stringify(ok.body)).toBe(200);
    expect(ok.body).toEqual({ retention_days: 30 });
    expect((await api("/api/activity/retention", { cookie: manager })).body).toEqual({ retention_days: 30 });
    // the change is in the log, with who made it
    const logged = await db.selectFrom("events").select(["data", "actor_id"]).where("entity", "=", "shop_settings").where("kind", "=", "activity_retention").orderBy("id", "desc").executeTakeFirstOrThrow();
    expect(logged.data).toMatchObject({ to_days: 30 });
  });

  it("prunes events older than the setting in batches, keeps newer ones and the ones other records read, and shows the setting on /activity", async () => {
    // the longest setting, so that nothing else in the shared database is old enough to go
    expect((await api("/api/activity/retention", { method: "PUT", cookie: admin, body: { retention_days: 3650 } })).status).toBe(200);
    const marker = `retention-${randomUUID()}`;
    const old = await Promise.all(Array.from({ length: 5 }, (_, i) => oldEvent(i % 2 ? "quote" : "order", 3700 + i, marker)));
    const newer = await oldEvent("order", 3600, marker);
    // read by the unit trace, calibration history, lot recall and the security log: kept
    const kept = await Promise.all(["unit", "build", "wash_batch", "furnace_run", "material", "feedstock_lot", "user"].map((e) => oldEvent(e, 4000, marker)));

    const r = await pruneActivity(db, { batch: 2 });
    expect(r.retention_days).toBe(3650);
    expect(r.deleted).toBeGreaterThanOrEqual(5);
    for (const id of old) expect(await exists(id), `event ${id}`).toBe(false);
    expect(await exists(newer)).toBe(true);
    for (const id of kept) expect(await exists(id), `kept event ${id}`).toBe(true);

    const page = await api("/activity", { cookie: manager });
    expect(page.status).toBe(200);
    expect(page.body as string).toMatch(/Retention: events are (<!-- -->)?kept for 10 years/);
  });

  it("keeps everything when set to keep for ever", async () => {
    expect((await api("/api/activity/retention", { method: "PUT", cookie: admin, body: { retention_days: null } })).status).toBe(200);
    const ancient = await oldEvent("order", 5000, `retention-${randomUUID()}`);
    expect(await pruneActivity(db)).toEqual({ retention_days: null, deleted: 0 });
    expect(await exists(ancient)).toBe(true);
    const page = await api("/activity", { cookie: admin });
    expect(page.body as string).toMatch(/Retention: events are (<!-- -->)?kept for ever/);
    await db.deleteFrom("events").where("id", "=", ancient).execute();
  });
});
