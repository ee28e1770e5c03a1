// The advancement rules, called in-process against a scratch database: what each booking's end
// does to its units, its events and the outbox, and what it refuses to do.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type PgBoss from "pg-boss";
import { sql } from "kysely";
import { advanceBooking, type AdvanceSource } from "@/db/advance/commands";
import { listDueBookings } from "@/db/advance/reads";
import type { AdvanceJob } from "@/lib/jobs/queues";
import { recomputeScaleUp } from "@/worker/handlers/scale-up";
import { createWorkerDb, insertBuild, insertRun, insertWash, startSender, unitStateEvents, type WorkerDb } from "./harness";

let w: WorkerDb;
let boss: PgBoss;
const past = (min: number) => new Date(Date.now() - min * 60_000);
const jobOf = (entity: AdvanceJob["entity"], b: { id: string; version: number; ends_at: Date }): AdvanceSource => ({
  via: "job",
  job: { entity, id: b.id, version: b.version, due_at: b.ends_at.toISOString() },
});

const units = (ids: string[]) => w.db.selectFrom("units").selectAll().where("id", "in", ids).orderBy("serial").execute();
const outbox = (key: string) => w.db.selectFrom("notification_outbox").selectAll().where("subject_key", "=", key).orderBy("recipient_email").execute();

beforeAll(async () => {
  w = await createWorkerDb("adv");
  boss = await startSender(w.url);
});

afterAll(async () => {
  await boss?.stop({ graceful: false, close: true });
  await w?.drop();
});

describe("build end", () => {
  it("turns its units green, completes the build once, writes events and one message per technician", async () => {
    const b = await insertBuild(w.db, w.shop, { ends_at: past(5), units: 3, state: "running" });
    const r = await advanceBooking(w.db, boss, "build", b.id, jobOf("build", b));
    expect(r).toMatchObject({ status: "advanced", transitions: 3, messages: 1 });

    const us = await units(b.unit_ids);
    expect(us.map((u) => u.state)).toEqual(["green", "green", "green"]);
    expect(us.every((u) => u.version === 2)).toBe(true);
    const build = await w.db.selectFrom("builds").selectAll().where("id", "=", b.id).executeTakeFirstOrThrow();
    expect(build).toMatchObject({ state: "complete", version: b.version + 1 });
    expect(build.finished_at?.getTime()).toBe(b.ends_at.getTime());
    expect(build.scale_snapshot).toEqual({ xy: 1.17647, z: 1.1976 });

    const ev = await unitStateEvents(w.db, b.unit_ids);
    expect(ev).toHaveLength(3);
    expect(ev.every((e) => e.from_state === "printing" && e.to_state === "green" && e.actor_id === null && e.reason?.includes("scheduled end"))).toBe(true);
    const buildEv = await w.db.selectFrom("events").selectAll().where("entity", "=", "build").where("entity_id", "=", b.id).execute();
    expect(buildEv).toMatchObject([{ from_state: "running", to_state: "complete", actor_id: null }]);

    const mail = await outbox(`build:${b.id}`);
    expect(mail.map((m) => [m.kind, m.recipient_email])).toEqual([["build_finished", w.shop.users.technician.email]]);
    expect(mail[0].text_body).toContain("now green");
    expect(mail[0].html_body).toContain("<table");

    // The same job again: the booking has moved on (version), nothing changes twice.
    const again = await advanceBooking(w.db, boss, "build", b.id, jobOf("build", b));
    expect(again).toMatchObject({ status: "skipped", reason: "stale_version" });
    // The sweep finds nothing left to do either.
    const viaSweep = await advanceBooking(w.db, boss, "build", b.id, { via: "sweep" });
    expect(viaSweep).toMatchObject({ status: "skipped", reason: "not_open" });
    expect(await unitStateEvents(w.db, b.unit_ids)).toHaveLength(3);
    expect(await outbox(`build:${b.id}`)).toHaveLength(1);
  });

  it("scraps the units of a build marked failed, with print_failure and the build's reason", async () => {
    const b = await insertBuild(w.db, w.shop, { ends_at: past(3), units: 2, failed: true, printer: 1 });
    const r = await advanceBooking(w.db, boss, "build", b.id, jobOf("build", b));
    expect(r).toMatchObject({ status: "advanced", transitions: 2 });
    const us = await units(b.unit_ids);
    expect(us.map((u) => [u.state, u.scrap_reason, u.scrap_note])).toEqual([
      ["scrapped", "print_failure", "nozzle clog at layer 212"],
      ["scrapped", "print_failure", "nozzle clog at layer 212"],
    ]);
    const mail = await outbox(`build:${b.id}`);
    expect(mail.map((m) => m.kind)).toEqual(["build_failed"]);
    expect(mail[0].subject).toMatch(/failed/);
  });

  it("never advances a moved, cancelled or not yet ended booking", async () => {
    const moved = await insertBuild(w.db, w.shop, { ends_at: past(30), units: 1, slot: 2 });
    // Moved later (same version by mistake): the old due time no longer matches.
    await w.db.updateTable("builds").set({ ends_at: new Date(moved.ends_at.getTime() + 10 * 60_000) }).where("id", "=", moved.id).execute();
    expect(await advanceBooking(w.db, boss, "build", moved.id, jobOf("build", moved))).toMatchObject({ status: "skipped", reason: "moved" });

    const cancelled = await insertBuild(w.db, w.shop, { ends_at: past(10), units: 1, slot: 4 });
    await w.db.updateTable("builds").set({ state: "cancelled", version: cancelled.version + 1 }).where("id", "=", cancelled.id).execute();
    expect(await advanceBooking(w.db, boss, "build", cancelled.id, jobOf("build", { ...cancelled, version: cancelled.version + 1 }))).toMatchObject({ status: "skipped", reason: "not_open" });
    expect(await advanceBooking(w.db, boss, "build", cancelled.id, { via: "sweep" })).toMatchObject({ status: "skipped", reason: "not_open" });

    const future = await insertBuild(w.db, w.shop, { ends_at: new Date(Date.now() + 3_600_000), units: 1, printer: 1, slot: -5 });
    expect(await advanceBooking(w.db, boss, "build", future.id, jobOf("build", future))).toMatchObject({ status: "skipped", reason: "not_due" });
    expect((await units([...moved.unit_ids, ...cancelled.unit_ids, ...future.unit_ids])).map((u) => u.state)).toEqual(["planned", "planned", "planned"]);
  });

  it("lets eight concurrent calls for one build change it exactly once", async () => {
    const b = await insertBuild(w.db, w.shop, { ends_at: past(1), units: 4, slot: 8 });
    const results = await Promise.all(
      Array.from({ length: 8 }, (_, i) => advanceBooking(w.db, boss, "build", b.id, i % 2 ? jobOf("build", b) : { via: "sweep" })),
    );
    expect(results.filter((r) => r.status === "advanced")).toHaveLength(1);
    expect(await unitStateEvents(w.db, b.unit_ids)).toHaveLength(4);
    expect(await outbox(`build:${b.id}`)).toHaveLength(1);
  });
});

describe("wash end and drying", () => {
  it("completes the batch at its end and sends the drying job; brown or on hold only after drying", async () => {
    await w.db.updateTable("shop_settings").set({ drying_minutes: 60 }).execute();
    try {
      const wb = await insertWash(w.db, w.shop, { ends_at: past(10), units: [{ green: 50, brown: 47.5 }] });
      const r = await advanceBooking(w.db, boss, "wash_batch", wb.id, jobOf("wash_batch", wb));
      expect(r).toMatchObject({ status: "advanced", transitions: 1, messages: 0 });
      expect(r.status === "advanced" && new Date(r.follow_up!).getTime()).toBe(wb.ends_at.getTime() + 60 * 60_000);
      expect((await units(wb.unit_ids))[0].state).toBe("washing");
      const follow = await sql<{ data: AdvanceJob; start_after: Date }>`select data, start_after from pgboss.job where name = 'advance-booking' and singleton_key = ${`wash_batch:${wb.id}:${wb.version + 1}:dried`}`.execute(w.db);
      expect(follow.rows).toHaveLength(1);
      expect(follow.rows[0].start_after.getTime()).toBe(wb.ends_at.getTime() + 60 * 60_000);
      // Still drying: the follow-up job (were it early) and the sweep leave the units alone.
      const early = await advanceBooking(w.db, boss, "wash_batch", wb.id, { via: "job", job: follow.rows[0].data });
      expect(early).toMatchObject({ status: "skipped", reason: "not_due" });
      expect(await listDueBookings(w.db, 100)).not.toContainEqual({ entity: "wash_batch", id: wb.id });
    } finally {
      await w.db.updateTable("shop_settings").set({ drying_minutes: 0 }).execute();
    }
  });

  it("sends units that pass the mass-loss check brown and holds the others with the reason", async () => {
    const wb = await insertWash(w.db, w.shop, {
      ends_at: past(90),
      slot: 2,
      units: [
        { green: 50, brown: 47.5 }, // 5.0 % ≥ 3.5 %
        { green: 50, brown: 49.0 }, // 2.0 %
        { green: 50 }, // not weighed after the wash
        { passed: true }, // checked by hand
      ],
    });
    const r = await advanceBooking(w.db, boss, "wash_batch", wb.id, jobOf("wash_batch", wb));
    expect(r).toMatchObject({ status: "advanced", transitions: 5, messages: 2 });
    const us = await w.db.selectFrom("units").selectAll().where("wash_batch_id", "=", wb.id).execute();
    const byId = new Map(us.map((u) => [u.id, u]));
    const [ok, short, unweighed, manual] = wb.unit_ids.map((id) => byId.get(id)!);
    expect([ok.state, ok.wash_passed]).toEqual(["brown", true]);
    expect([short.state, short.held_from, short.wash_passed]).toEqual(["on_hold", "green", false]);
    expect(short.hold_reason).toMatch(/Mass loss 2\.0 % is below the 3\.5 % minimum/);
    expect(unweighed.state).toBe("on_hold");
    expect(unweighed.hold_reason).toMatch(/No brown mass recorded/);
    expect(manual.state).toBe("brown");
    const mail = await outbox(`wash_batch:${wb.id}`);
    expect(mail.map((m) => [m.kind, m.recipient_email])).toEqual([
      ["wash_done", w.shop.users.operator1.email],
      ["wash_done", w.shop.users.operator2.email],
    ]);
    expect(mail[0].subject).toMatch(/2 brown, 2 on hold/);
    expect(mail[0].text_body).toContain("Mass loss 2.0 %");
  });
});

describe("furnace run end", () => {
  it("moves units sintered then ready for finishing, and mails operators, managers and machinists once each", async () => {
    const run = await insertRun(w.db, w.shop, { ends_at: past(2), units: 3 });
    const r = await advanceBooking(w.db, boss, "furnace_run", run.id, jobOf("furnace_run", run));
    expect(r).toMatchObject({ status: "advanced", transitions: 3 + 1 + 3, messages: 5 });
    const ev = await unitStateEvents(w.db, run.unit_ids);
    for (const id of run.unit_ids) {
      expect(ev.filter((e) => e.entity_id === id).map((e) => `${e.from_state}→${e.to_state}`)).toEqual(["sintering→sintered", "sintered→ready_for_finishing"]);
    }
    const mail = await outbox(`furnace_run:${run.id}`);
    expect(mail.map((m) => `${m.kind} ${m.recipient_email}`).sort()).toEqual(
      [
        `furnace_run_finished ${w.shop.users.manager.email}`,
        `furnace_run_finished ${w.shop.users.operator1.email}`,
        `furnace_run_finished ${w.shop.users.operator2.email}`,
        `ready_for_finishing ${w.shop.users.machinist1.email}`,
        `ready_for_finishing ${w.shop.users.machinist2.email}`,
      ].sort(),
    );
    const mm = mail.find((m) => m.recipient_email === w.shop.users.machinist1.email)!;
    const inch = mail.find((m) => m.recipient_email === w.shop.users.machinist2.email)!;
    expect(mm.text_body).toContain("X− 0.30 mm, X+ 0.30 mm, Z+ 0.50 mm");
    expect(inch.text_body).toContain("X− 0.012 in");
    expect(mm.text_body).toContain("Grind datum A flat");
    expect(mm.text_body).toContain("NFPA 484");
    const op = mail.find((m) => m.kind === "furnace_run_finished")!;
    expect(op.text_body).toContain("NFPA 86");
    expect(op.html_body).toContain("/furnace-runs/");
  });

  it("leaves out a user who turned a kind of message off", async () => {
    await w.db.updateTable("users").set({ muted_mail: ["ready_for_finishing"] }).where("id", "=", w.shop.users.machinist2.id).execute();
    try {
      const run = await insertRun(w.db, w.shop, { ends_at: past(120), units: 1, slot: 3 });
      await advanceBooking(w.db, boss, "furnace_run", run.id, { via: "sweep" });
      const mail = await outbox(`furnace_run:${run.id}`);
      expect(mail.filter((m) => m.kind === "ready_for_finishing").map((m) => m.recipient_email)).toEqual([w.shop.users.machinist1.email]);
    } finally {
      await w.db.updateTable("users").set({ muted_mail: [] }).where("id", "=", w.shop.users.machinist2.id).execute();
    }
  });

  it("moves on units an operator unloaded as sintered by hand", async () => {
    const run = await insertRun(w.db, w.shop, { ends_at: past(300), units: 2, slot: 6 });
    await w.db.updateTable("furnace_runs").set({ state: "complete", version: run.version + 1 }).where("id", "=", run.id).execute();
    await w.db.updateTable("units").set({ state: "sintered" }).where("furnace_run_id", "=", run.id).execute();
    expect(await listDueBookings(w.db, 1000)).toContainEqual({ entity: "furnace_run", id: run.id });
    const r = await advanceBooking(w.db, boss, "furnace_run", run.id, { via: "sweep" });
    expect(r).toMatchObject({ status: "advanced", transitions: 2 });
    expect((await units(run.unit_ids)).map((u) => u.state)).toEqual(["ready_for_finishing", "ready_for_finishing"]);
    expect(await listDueBookings(w.db, 1000)).not.toContainEqual({ entity: "furnace_run", id: run.id });
  });
});

describe("scale-up recomputation", () => {
  it("recomputes green sizes after a material change, logs it, and leaves builds' snapshots alone", async () => {
    const b = await insertBuild(w.db, w.shop, { ends_at: new Date(Date.now() + 7_200_000), units: 1, slot: -10 });
    await recomputeScaleUp(w.db, { part_id: w.shop.part_id });
    const before = await w.db.selectFrom("parts").selectAll().where("id", "=", w.shop.part_id).executeTakeFirstOrThrow();
    // (40 + 0.3 + 0.3) / (1 − 0.15) and (20 + 0.5) / (1 − 0.165)
    expect(Number(before.green_x_mm)).toBeCloseTo(40.6 / 0.85, 3);
    expect(Number(before.green_z_mm)).toBeCloseTo(20.5 / 0.835, 3);

    // The part was scaled a while ago; then the material's shrinkage changed.
    await w.db.updateTable("parts").set({ scaled_at: sql`now() - interval '10 seconds'` }).where("id", "=", w.shop.part_id).execute();
    await w.db.updateTable("materials").set({ shrink_xy: 0.18, updated_at: sql`now()` }).where("id", "=", w.shop.material_id).execute();
    const stale = await recomputeScaleUp(w.db, { stale: 100 });
    expect(stale).toMatchObject({ checked: 1, changed: 1 });
    const after = await w.db.selectFrom("parts").selectAll().where("id", "=", w.shop.part_id).executeTakeFirstOrThrow();
    expect(Number(after.green_x_mm)).toBeCloseTo(40.6 / 0.82, 3);
    expect(after.scale_factors).toMatchObject({ shrink_xy: 0.18 });
    expect(after.version).toBe(before.version);
    const ev = await w.db.selectFrom("events").selectAll().where("entity", "=", "part").where("entity_id", "=", w.shop.part_id).where("kind", "=", "scale_up").execute();
    expect(ev.length).toBeGreaterThanOrEqual(1);
    expect(ev.at(-1)!.data).toMatchObject({ after: { x: expect.closeTo(40.6 / 0.82, 9) } });
    // Nothing changed since: the sizes stay exactly as stored.
    await recomputeScaleUp(w.db, { part_id: w.shop.part_id });
    const again = await w.db.selectFrom("parts").select(["green_x_mm", "green_z_mm"]).where("id", "=", w.shop.part_id).executeTakeFirstOrThrow();
    expect(again).toEqual({ green_x_mm: after.green_x_mm, green_z_mm: after.green_z_mm });
    // Up to date now: nothing stale is left.
    expect(await recomputeScaleUp(w.db, { stale: 100 })).toMatchObject({ checked: 0 });
    const build = await w.db.selectFrom("builds").select("scale_snapshot").where("id", "=", b.id).executeTakeFirstOrThrow();
    expect(build.scale_snapshot).toEqual({ xy: 1.17647, z: 1.1976 });
  });
});
