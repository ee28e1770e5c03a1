// npm run bench -- --only live
// Live updates (GET /api/events, fed by the database's NOTIFY) against a database of its own
// (hearth_bench_live): the floor benchmark's shop (the demo shop, 24 more printers and
// HEARTH_BENCH_LIVE_BUILDS bookings, 10,000 by default), the built app started as `npm start`
// runs it (scripts/serve.ts), loopback only, every loop bounded in time and count.
//   1. change-to-screen: 50 open floors (an event stream and the window refetch the page does on
//      each event), one booking change every 100 ms for LATENCY_S seconds: from the change's
//      request to the event on each stream, and to the refetched window in hand (target p95 ≤ 1 s);
//   2. a shift: 50 people, each with the floor, the batches board and a unit page open (three
//      tabs: three streams and the refetches each page's client makes on the events it hears,
//      one in flight and one pending per query, as TanStack Query does), and 5 more people
//      moving bookings, one move each every two seconds, for SHIFT_S seconds: requests/s and
//      p95 per endpoint (target ≤ 150 ms on every one, no errors);
//   3. open streams held by one app instance and the memory they take (resident set, /proc).
import fs from "node:fs";
import http from "node:http";
import { gunzipSync } from "node:zlib";
import os from "node:os";
import { createDb } from "@/db/client";
import { migrateToLatest } from "@/db/migrate";
import { startApp, stopProcs, waitFor, type Proc } from "../scripts/stack";
import { changesOf, openEventStream, type EventStream, type StreamEvent } from "../tests/helpers/event-stream";
import { queryHears, queryReadsData } from "@/components/live/query-map";
import { isStaffedAt, staffingOf, type Staffing } from "@/lib/batches/staffed";
import { seedFloor } from "./floor-bench";
import { freshDatabase } from "./fresh-database";
import { ensureBuild } from "./setup";
import { pct, r1 } from "./stats";
import type { BenchRow, BenchSection } from "./types";

const PORT = Number(process.env.HEARTH_BENCH_LIVE_PORT ?? 3158);
const PEOPLE = 50;
const MOVERS = 5;
const LATENCY_S = Number(process.env.HEARTH_BENCH_LIVE_LATENCY_SECONDS ?? 10);
const SHIFT_S = Number(process.env.HEARTH_BENCH_LIVE_SHIFT_SECONDS ?? 60);
const MEMORY_STREAMS = 500;
const RAMP_S = 10;
const HOUR = 3_600_000;

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

/**
 * One person's browser: keep-alive connections to the app, at most BROWSER_SOCKETS at a time
 * (browsers open six per host over HTTP/1.1; the person's three event streams hold three of
 * them), and the entity tag of each answer it holds, sent back as If-None-Match, as a browser's
 * HTTP cache does for an answer marked "no-cache" with an ETag (RFC 9111 §4.3.1).
 */
class Browser {
  readonly agent = new http.Agent({ keepAlive: true, maxSockets: BROWSER_SOCKETS });
  readonly held = new Map<string, { etag: string; answer: Answer }>();
  constructor(readonly cookie: string) {}
  close() {
    this.agent.destroy();
  }
}

const BROWSER_SOCKETS = 3;
/** The health check answers 503 with its detail when a part is down (the bench runs no worker). */
const HEALTH_ANSWERS = [200, 503];

/** Request timings per endpoint (path without its query and ids). */
class Recorder {
  times = new Map<string, number[]>();
  errors = new Map<string, number>();
  /** What each failed request answered: "label: status" or "label: the fetch's error". */
  reasons = new Map<string, number>();
  /** Answers by status (200, 304), per label. */
  statuses = new Map<string, Map<number, number>>();
  started = performance.now();
  /**
   * A GET as the browser makes it (gzip accepted, If-None-Match for an answer it holds), timed to
   * the last byte of the answer. The body stays gzipped and is decoded and parsed only when asked
   * for (Answer.json): 150 simulated pages share this one process, and decoding and parsing every
   * floor window and board they fetch (about 200 kB each) took more of its CPU than the app took
   * to answer them, slowing every other page's timers and reads. The pages whose refetch rule
   * never looks at the data (components/live/query-map.ts) never decode it.
   */
  get(base: string, path: string, browser: Browser, label: string, accept: readonly number[] = [200]): Promise<Answer | null> {
    const t0 = performance.now();
    const held = browser.held.get(path);
    const headers: http.OutgoingHttpHeaders = { cookie: browser.cookie, "accept-encoding": "gzip, deflate, br" };
    if (held) headers["if-none-match"] = held.etag;
    return new Promise<Answer>((resolve, reject) => {
      const req = http.get(`${base}${path}`, { agent: browser.agent, headers }, (res) => {
        const chunks: Buffer[] = [];
        res.on("data", (c: Buffer) => chunks.push(c));
        res.on("error", reject);
        res.on("end", () => {
          const status = res.statusCode ?? 0;
          const perStatus = this.statuses.get(label) ?? new Map<number, number>();
          perStatus.set(status, (perStatus.get(status) ?? 0) + 1);
          this.statuses.set(label, perStatus);
          const bytes = Buffer.concat(chunks);
          if (status === 304 && held) return resolve(held.answer);
          if (!accept.includes(status)) return reject(new Error(`${status} ${bytes.toString("utf8", 0, 100)}`));
          const answer = new Answer(bytes, res.headers["content-encoding"] === "gzip");
          const etag = res.headers.etag;
          if (etag) browser.held.set(path, { etag, answer });
          resolve(answer);
        });
      });
      req.on("error", reject);
    }).then(
      (answer) => {
        this.add(label, performance.now() - t0);
        return answer;
      },
      (err: unknown) => {
        this.errors.set(label, (this.errors.get(label) ?? 0) + 1);
        const why = `${label}: ${err instanceof Error ? err.message : String(err)}`;
        this.reasons.set(why, (this.reasons.get(why) ?? 0) + 1);
        return null;
      },
    );
  }
  add(label: string, ms: number) {
    const list = this.times.get(label) ?? [];
    list.push(ms);
    this.times.set(label, list);
  }
}

/** A response body, decoded and parsed on first use. */
class Answer {
  private parsed?: unknown;
  constructor(
    private readonly bytes: Buffer,
    private readonly gzipped: boolean,
  ) {}
  get json(): unknown {
    if (this.parsed === undefined) this.parsed = JSON.parse((this.gzipped ? gunzipSync(this.bytes) : this.bytes).toString("utf8"));
    return this.parsed;
  }
}

/** One query of a simulated page: at most one request in flight and one waiting behind it. */
class SimQuery {
  private inflight = false;
  private again = false;
  private waiting: number[] = [];
  answer: Answer | null = null;
  constructor(
    readonly key: unknown[],
    private readonly run: () => Promise<Answer | null>,
    private readonly onDone?: (latencies: number[]) => void,
  ) {}
  /** sentAt: when the change that caused this was sent (for change-to-screen). */
  refetch(sentAt?: number) {
    if (sentAt !== undefined) this.waiting.push(sentAt);
    if (this.inflight) {
      this.again = true;
      return;
    }
    this.inflight = true;
    const covered = this.waiting.splice(0);
    void this.run().then((d) => {
      if (d !== null) this.answer = d;
      const now = performance.now();
      this.onDone?.(covered.map((t) => now - t));
      this.inflight = false;
      if (this.again) {
        this.again = false;
        this.refetch();
      }
    });
  }
}

async function signIn(base: string, email: string): Promise<string> {
  const res = await fetch(`${base}/api/session`, { method: "POST", headers: { "content-type": "application/json", "x-forwarded-for": `10.9.${Math.floor(Math.random() * 250)}.${Math.floor(Math.random() * 250)}` }, body: JSON.stringify({ email, password: "hearth-demo" }) });
  const cookie = res.headers.getSetCookie().find((c) => c.startsWith("hearth_session="));
  if (!cookie) throw new Error(`sign-in as ${email} failed: ${res.status}`);
  return cookie.split(";")[0];
}

async function postJson(base: string, path: string, cookie: string, body: unknown, method = "POST") {
  const res = await fetch(`${base}${path}`, { method, headers: { cookie, "content-type": "application/json" }, body: JSON.stringify(body) });
  return { status: res.status, body: (await res.json().catch(() => null)) as any };
}

/**
 * The first hour from `from` at which a mover's two slots (t and t + 1 h) are both bookable: a
 * wash must be loaded while someone is on shift (lib/batches/staffed.ts), so a wash mover booked
 * outside the shop's staffed hours would be refused (422) on every move: the bench's error, not
 * the app's. A printer needs nobody to start.
 */
function bookableBase(m: Mover, from: number, staffing: Staffing): number {
  if (m.kind !== "wash") return from;
  for (let t = from; t < from + 14 * 24 * HOUR; t += HOUR) {
    if (isStaffedAt(new Date(t), staffing) && isStaffedAt(new Date(t + HOUR), staffing)) return t;
  }
  throw new Error("no two staffed hours in a row in the next two weeks");
}

type Mover = { kind: "build" | "wash"; id: string; version: number; resource: string; flip: boolean };

/** A printer and a one-unit draft build of its own per mover: its moves never clash with anything. */
async function makeMovers(base: string, cookie: string, db: ReturnType<typeof createDb>["db"], n: number): Promise<Mover[]> {
  const material = await db.selectFrom("materials").select("id").where("code", "=", "17-4PH").executeTakeFirstOrThrow();
  const movers: Mover[] = [];
  for (let i = 0; i < n; i++) {
    const printer = await db.insertInto("printers").values({ name: `Live bench ${i + 1}`, build_x_mm: 330, build_y_mm: 330, build_z_mm: 330, deposition_cm3_per_h: 40 }).returning("id").executeTakeFirstOrThrow();
    await db.insertInto("printer_materials").values({ printer_id: printer.id, material_id: material.id }).execute();
    const order = await postJson(base, "/api/orders", cookie, { code: `LB-${Date.now().toString(36)}-${i}`, customer: "Bench", due_at: new Date(Date.now() + 10 * 24 * HOUR).toISOString(), priority: 3 });
    const part = await postJson(base, "/api/parts", cookie, {
      order_id: order.body.order.id, part_number: `LBP-${i}-${Date.now().toString(36)}`, revision: "A", name: "bench bracket", material_id: material.id, quantity: 1,
      nominal_x_mm: 40, nominal_y_mm: 30, nominal_z_mm: 20, thickest_wall_mm: 4, stock_x_neg_mm: 0.3, stock_x_pos_mm: 0.3, stock_z_pos_mm: 0.2,
    });
    const units = await db.selectFrom("units").select("id").where("part_id", "=", part.body.part.id).execute();
    const build = await postJson(base, "/api/builds", cookie, { unit_ids: units.map((u) => u.id), material_lot: "LOT-BENCH" });
    if (build.status !== 201) throw new Error(`bench build: ${build.status} ${JSON.stringify(build.body)}`);
    movers.push({ kind: "build", id: build.body.build.id, version: build.body.build.version, resource: printer.id, flip: false });
  }
  return movers;
}

/** A wash station and a one-unit draft wash batch of its own: moving it changes the batching board. */
async function makeWashMover(base: string, cookie: string, db: ReturnType<typeof createDb>["db"], i: number): Promise<Mover> {
  const station = await db
    .insertInto("wash_stations")
    .values({ name: `Live bench bath ${i + 1}`, solvent: "bench solvent", basket_x_mm: 500, basket_y_mm: 500, basket_z_mm: 400, capacity_units: 40, max_load_g: 50_000 })
    .returning("id")
    .executeTakeFirstOrThrow();
  const batch = await postJson(base, "/api/wash-batches", cookie, { wash_station_id: station.id });
  if (batch.status !== 201) throw new Error(`bench wash batch: ${batch.status} ${JSON.stringify(batch.body)}`);
  const unit = await db.selectFrom("units").select(["id", "version"]).where("state", "=", "green").where("wash_batch_id", "is", null).orderBy("serial", "desc").offset(i).limit(1).executeTakeFirstOrThrow();
  const added = await postJson(base, `/api/wash-batches/${batch.body.id}/units`, cookie, { version: batch.body.version, unit_id: unit.id, unit_version: unit.version });
  if (added.status !== 200 && added.status !== 201) throw new Error(`bench wash unit: ${added.status} ${JSON.stringify(added.body)}`);
  return { kind: "wash", id: batch.body.id, version: added.body.version ?? batch.body.version + 1, resource: station.id, flip: false };
}

/** Books the mover's build at one of two slots a few hours ahead, alternately. */
async function move(base: string, cookie: string, m: Mover, slotBase: number): Promise<{ status: number; version: number; error?: string }> {
  m.flip = !m.flip;
  const at = new Date(slotBase + (m.flip ? HOUR : 0));
  const res =
    m.kind === "build"
      ? await postJson(base, `/api/builds/${m.id}/schedule`, cookie, { version: m.version, printer_id: m.resource, starts_at: at.toISOString() }, "PATCH")
      : await postJson(base, `/api/wash-batches/${m.id}/schedule`, cookie, { version: m.version, wash_station_id: m.resource, starts_at: at.toISOString() }, "PATCH");
  if (res.status === 200) m.version = m.kind === "build" ? res.body.build.version : res.body.version;
  else if (res.body?.current_version) m.version = res.body.current_version;
  return { status: res.status, version: m.version, error: res.status === 200 ? undefined : `${m.kind} ${res.status} ${String(res.body?.error?.message ?? res.body?.error?.code ?? "").slice(0, 120)}` };
}

function rssKb(pid: number): number {
  const m = /VmRSS:\s+(\d+)/.exec(fs.readFileSync(`/proc/${pid}/status`, "utf8"));
  return m ? Number(m[1]) : NaN;
}

async function openStreams(base: string, cookie: string, n: number): Promise<EventStream[]> {
  const out: EventStream[] = [];
  // In small groups: a burst of hundreds of sign-in checks at once is not what a shift does.
  for (let i = 0; i < n; i += 25) {
    const group = await Promise.all(Array.from({ length: Math.min(25, n - i) }, () => openEventStream(`${base}/api/events`, { cookie })));
    for (const s of group) if (s.status !== 200) throw new Error(`event stream: ${s.status}`);
    out.push(...group);
  }
  await Promise.all(out.map((s) => s.waitFor((e) => e.event === "ready", 10_000)));
  return out;
}

export const section: BenchSection = {
  name: "live",
  run: async () => {
    const rows: BenchRow[] = [];
    const { url, drop } = await freshDatabase(process.env.HEARTH_BENCH_LIVE_DB ?? "hearth_bench_live");
    const { db } = createDb(url, 4);
    let procs: Proc[] = [];
    const streams: EventStream[] = [];
    try {
      await migrateToLatest(db);
      const seeded = await seedFloor(db, Number(process.env.HEARTH_BENCH_LIVE_BUILDS ?? 10_000));
      const distDir = ensureBuild();
      const base = `http://127.0.0.1:${PORT}`;
      const env: NodeJS.ProcessEnv = { ...process.env, DATABASE_URL: url, NEXT_DIST_DIR: distDir, NODE_ENV: "production", PORT: String(PORT), APP_URL: base, SESSION_SECRET: process.env.SESSION_SECRET ?? "bench-live-secret-0123456789abcdef0123456789ab" };
      procs = [startApp(PORT, env, true)];
      await waitFor(`${base}/sign-in`, 90_000, (s) => s === 200);
      const pid = procs[0].child.pid!;
      const [viewer, tech, admin] = [await signIn(base, "manager@demo.hearth.test"), await signIn(base, "technician@demo.hearth.test"), await signIn(base, "admin@demo.hearth.test")];
      // Three move builds (the floor hears them), two move wash batches (the floor and the board).
      const movers = [...(await makeMovers(base, tech, db, MOVERS - 2)), await makeWashMover(base, tech, db, 0), await makeWashMover(base, tech, db, 1)];
      // The window every floor shows: the week from half a day ago; the moves land inside it.
      const from = Math.floor(Date.now() / HOUR) * HOUR - 12 * HOUR;
      const windowPath = `/api/floor?from=${encodeURIComponent(new Date(from).toISOString())}&to=${encodeURIComponent(new Date(from + 7 * 24 * HOUR).toISOString())}`;
      const slotBase = from + 24 * HOUR;
      const unit = await db.selectFrom("units").select("id").where("state", "=", "green").where("build_id", "is not", null).limit(PEOPLE).execute();
      const settings = await db.selectFrom("shop_settings").select(["staffed_hours", "time_zone"]).where("id", "=", 1).executeTakeFirst();
      const staffing = staffingOf(settings?.staffed_hours, settings?.time_zone ?? "UTC");

      // 1. Change-to-screen ------------------------------------------------------------------
      {
        const rec = new Recorder();
        const toEvent: number[] = [];
        const toScreen: number[] = [];
        const sentAt = new Map<string, { id: string; v: number; t: number }>();
        const floors = await openStreams(base, viewer, PEOPLE);
        streams.push(...floors);
        const browsers = floors.map(() => new Browser(viewer));
        const queries = browsers.map((b) => new SimQuery(["floor"], () => rec.get(base, windowPath, b, "GET /api/floor"), (l) => toScreen.push(...l)));
        await Promise.all(browsers.map((b) => rec.get(base, windowPath, b, "warm")));
        // A change is heard by a stream when an event names its row at its version or a later one:
        // the hub sends one entry per row per group, the row's newest version
        // (lib/live/changes.ts ChangeBatcher), so two changes of one row announced within the
        // group's window arrive as one entry naming the second; the page refetches the row as it
        // is after both. Those are counted apart (heard_as_later_version), and a change that no
        // event on a stream names, at its version or after, is not heard on that stream.
        let heardLater = 0;
        const heard = (s: EventStream, q: SimQuery) => {
          let seen = 0;
          const known = new Set<string>();
          const tick = () => {
            for (; seen < s.events.length; seen++) {
              const e: StreamEvent = s.events[seen];
              for (const c of changesOf(e)) {
                if (c.id === undefined || c.v === undefined) continue;
                for (const [key, sent] of sentAt) {
                  if (sent.id !== c.id || sent.v > c.v || known.has(key)) continue;
                  known.add(key);
                  if (sent.v < c.v) heardLater += 1;
                  toEvent.push(e.at - sent.t);
                  q.refetch(sent.t);
                }
              }
            }
          };
          return setInterval(tick, 5);
        };
        const timers = floors.map((s, i) => heard(s, queries[i]));
        const m = movers[0];
        const statuses: number[] = [];
        const deadline = performance.now() + LATENCY_S * 1000;
        for (let k = 0; performance.now() < deadline && k < LATENCY_S * 10; k++) {
          const tick = performance.now();
          const key = `${m.id}:${m.version + 1}`;
          // Before the request: its event may come before its answer.
          sentAt.set(key, { id: m.id, v: m.version + 1, t: tick });
          void move(base, tech, m, slotBase).then((r) => {
            // A refused move changes nothing and is not waited for (nor counted in changes_ok).
            if (r.status !== 200) sentAt.delete(key);
            statuses.push(r.status);
          });
          // Sequential moves of one build need the previous version: wait for it, then keep the pace.
          while (statuses.length <= k && performance.now() - tick < 2_000) await sleep(2);
          const rest = 100 - (performance.now() - tick);
          if (rest > 0) await sleep(rest);
        }
        await sleep(1_500);
        timers.forEach(clearInterval);
        // What the hub heard from the database and sent (notifications, groups, slow streams cut off).
        const hub = ((await rec.get(base, "/api/health", new Browser(admin), "health", HEALTH_ANSWERS))?.json as { live?: Record<string, unknown> } | null)?.live ?? null;
        for (const s of floors) s.close();
        for (const b of browsers) b.close();
        streams.length = 0;
        const changes = statuses.length;
        const ok = statuses.filter((s) => s === 200).length;
        const p95e = pct(toEvent, 95);
        const p95s = pct(toScreen, 95);
        const expected = ok * PEOPLE;
        rows.push({ section: "live", name: `change → event on ${PEOPLE} open floors, a change every 100 ms (${changes} changes)`, metric: "p95 ms", value: r1(p95e), target: "≤ 1000", ok: p95e <= 1000 && toEvent.length >= expected, detail: { p50_ms: r1(pct(toEvent, 50)), p99_ms: r1(pct(toEvent, 99)), max_ms: r1(Math.max(...toEvent)), events_heard: toEvent.length, events_expected: expected, heard_as_later_version: heardLater, changes_ok: ok, hub } });
        rows.push({ section: "live", name: `change → refetched window in hand on ${PEOPLE} open floors (change to screen)`, metric: "p95 ms", value: r1(p95s), target: "≤ 1000", ok: p95s <= 1000, detail: { p50_ms: r1(pct(toScreen, 50)), p99_ms: r1(pct(toScreen, 99)), floor_requests: rec.times.get("GET /api/floor")?.length ?? 0, floor_p95_ms: r1(pct(rec.times.get("GET /api/floor") ?? [], 95)), errors: Object.fromEntries(rec.errors), load_average_1m: r1(os.loadavg()[0]) } });
        rows.push({ section: "live", name: "change → event, p50", metric: "ms", value: r1(pct(toEvent, 50)) });
        rows.push({ section: "live", name: "change → screen, p50", metric: "ms", value: r1(pct(toScreen, 50)) });
      }
      await sleep(1_000);

      // 2. A shift ---------------------------------------------------------------------------
      {
        const rec = new Recorder();
        const people = (await Promise.all(Array.from({ length: PEOPLE }, (_, i) => (i % 10 === 0 ? signIn(base, "technician@demo.hearth.test") : Promise.resolve(viewer))))).map((c) => new Browser(c));
        type Tab = { stream: EventStream; queries: SimQuery[] };
        const tabs: Tab[] = [];
        for (let i = 0; i < PEOPLE; i++) {
          const cookie = people[i];
          const [floorS, boardS, unitS] = await openStreams(base, cookie.cookie, 3);
          streams.push(floorS, boardS, unitS);
          const u = unit[i % unit.length].id;
          tabs.push({ stream: floorS, queries: [new SimQuery(["floor", "a", "b"], () => rec.get(base, windowPath, cookie, "GET /api/floor")), new SimQuery(["unscheduled"], () => rec.get(base, "/api/floor/unscheduled", cookie, "GET /api/floor/unscheduled"))] });
          tabs.push({ stream: boardS, queries: [new SimQuery(["batches-board"], () => rec.get(base, "/api/batches", cookie, "GET /api/batches"))] });
          tabs.push({ stream: unitS, queries: [new SimQuery(["trace", u], () => rec.get(base, `/api/units/${u}/trace`, cookie, "GET /api/units/:id/trace"))] });
        }
        // Every page loads once, as it opens: people arrive over RAMP_S seconds (a shift does not
        // open 150 pages in the same millisecond), and the figures start once all are in.
        for (let i = 0; i < tabs.length; i++) {
          for (const q of tabs[i].queries) q.refetch();
          await sleep((RAMP_S * 1000) / tabs.length);
        }
        await sleep(2_000);
        rec.times.clear();
        rec.errors.clear();
        rec.statuses.clear();
        const seen = new Map<Tab, number>(tabs.map((t) => [t, t.stream.events.length]));
        const ticker = setInterval(() => {
          for (const t of tabs) {
            const events = t.stream.events;
            for (let k = seen.get(t)!; k < events.length; k++) {
              const e = events[k];
              const changes = e.event === "resync" ? null : changesOf(e);
              if (changes && !changes.length) continue;
              for (const q of t.queries) if (queryHears(q.key, queryReadsData(q.key) ? (q.answer?.json ?? null) : null, changes as never)) q.refetch();
            }
            seen.set(t, events.length);
          }
        }, 5);
        const moveTimes: number[] = [];
        const moveErrors: string[] = [];
        const t0 = performance.now();
        const deadline = t0 + SHIFT_S * 1000;
        await Promise.all(
          movers.map(async (m, i) => {
            await sleep(i * 400);
            for (let k = 0; performance.now() < deadline && k < SHIFT_S; k++) {
              const s = performance.now();
              const r = await move(base, tech, m, bookableBase(m, slotBase + (i + 1) * 3 * HOUR, staffing));
              if (r.status === 200) moveTimes.push(performance.now() - s);
              else moveErrors.push(r.error!);
              await sleep(Math.max(0, 2_000 - (performance.now() - s)));
            }
          }),
        );
        const elapsed = (performance.now() - t0) / 1000;
        await sleep(1_000);
        clearInterval(ticker);
        const live = (await rec.get(base, "/api/health", new Browser(admin), "health", HEALTH_ANSWERS))?.json as { live?: { open_streams: number } } | null | undefined;
        for (const s of streams) s.close();
        streams.length = 0;
        for (const p of people) p.close();
        rec.times.set("PATCH …/schedule (builds, wash batches)", moveTimes);
        if (moveErrors.length) rec.errors.set("PATCH …/schedule (builds, wash batches)", moveErrors.length);
        const all = [...rec.times.entries()].filter(([k]) => k !== "health");
        const total = all.reduce((s, [, v]) => s + v.length, 0);
        const everything = all.flatMap(([, v]) => v);
        const errors = [...rec.errors.entries()].filter(([k]) => k !== "health").reduce((s, [, v]) => s + v, 0);
        const moveErrorKinds = Object.fromEntries([...new Set(moveErrors)].map((e) => [e, moveErrors.filter((x) => x === e).length]));
        rows.push({ section: "live", name: `shift: ${PEOPLE} people × 3 pages (${PEOPLE * 3} streams) + ${MOVERS} moving bookings, ${SHIFT_S} s`, metric: "requests/s", value: r1(total / elapsed), detail: { requests: total, errors, move_errors: moveErrorKinds, read_errors: Object.fromEntries(rec.reasons), open_streams_during: live?.live?.open_streams ?? null, load_average_1m: r1(os.loadavg()[0]) } });
        rows.push({ section: "live", name: "shift: every endpoint together", metric: "p95 ms", value: r1(pct(everything, 95)), target: "≤ 150", ok: pct(everything, 95) <= 150 && errors === 0 });
        for (const [label, times] of all) {
          const p95 = pct(times, 95);
          rows.push({ section: "live", name: `shift: ${label}`, metric: "p95 ms", value: r1(p95), target: "≤ 150", ok: p95 <= 150 && !rec.errors.get(label), detail: { requests: times.length, req_per_s: r1(times.length / elapsed), p50_ms: r1(pct(times, 50)), p99_ms: r1(pct(times, 99)), errors: rec.errors.get(label) ?? 0, answers_by_status: Object.fromEntries(rec.statuses.get(label) ?? []) } });
        }
      }
      await sleep(1_000);

      // 3. Streams held and their memory -------------------------------------------------------
      {
        global.gc?.();
        await sleep(500);
        const before = rssKb(pid);
        const many = await openStreams(base, viewer, MEMORY_STREAMS);
        streams.push(...many);
        await sleep(1_000);
        const after = rssKb(pid);
        const health = (await (await fetch(`${base}/api/health`, { headers: { cookie: admin } })).json()) as { live?: { open_streams: number } };
        for (const s of many) s.close();
        streams.length = 0;
        rows.push({ section: "live", name: `open streams held by one app instance (${MEMORY_STREAMS} opened)`, metric: "streams", value: health.live?.open_streams ?? null, ok: (health.live?.open_streams ?? 0) >= MEMORY_STREAMS, target: `≥ ${MEMORY_STREAMS}` });
        rows.push({ section: "live", name: "memory per open stream (app resident set growth / streams)", metric: "KiB", value: r1((after - before) / MEMORY_STREAMS), detail: { rss_before_kib: before, rss_after_kib: after } });
      }
      void seeded;
    } finally {
      for (const s of streams) s.close();
      await stopProcs(procs);
      await db.destroy();
      if (!process.env.HEARTH_BENCH_KEEP_DB) await drop();
    }
    return rows;
  },
};
