import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { testDb } from "../helpers/db";
import { DEMO, api, signIn } from "../helpers/session";
import { makeFurnace, makeProfileAndMaterial, makeStation, makeUnits, profileId, retireEquipment, retireMaterials, setStaffedHours, staffAroundTheClock } from "./fixtures";

// The batching API against the running app: what goes into a furnace run or a wash batch, what
// is refused and why, version conflicts, the mass-loss gate, booking rules and proposals.

const HOUR = 3_600_000;
const { db, close } = testDb();
let operator: string;
let technician: string;
let admin: string;
let restoreHours: () => Promise<void>;
const furnaces: string[] = [];
const stations: string[] = [];
const materials: string[] = [];
let p174: string;
let p316: string;
let kiln: { id: string; name: string };

async function openRun(furnaceId = kiln.id, profile = p174) {
  const res = await api("/api/furnace-runs", { method: "POST", cookie: operator, body: { furnace_id: furnaceId, profile_id: profile } });
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  return res.body as { id: string; code: string; version: number; cycle_minutes: number };
}

async function add(run: { id: string }, version: number, unit: { id: string; version: number }, cookie = operator) {
  return api(`/api/furnace-runs/${run.id}/units`, { method: "POST", cookie, body: { version, unit_id: unit.id, unit_version: unit.version } });
}

async function unitRow(id: string) {
  return db.selectFrom("units").selectAll().where("id", "=", id).executeTakeFirstOrThrow();
}

beforeAll(async () => {
  [operator, technician, admin] = await Promise.all([signIn(DEMO.furnace_operator), signIn(DEMO.technician), signIn(DEMO.admin)]);
  restoreHours = await staffAroundTheClock(db);
  p174 = await profileId(db, "174PH-std");
  p316 = await profileId(db, "316L-std");
  // 2 trays of 300 × 250 mm, 100 mm high, 5 kg: small enough to hit every limit on purpose.
  kiln = await makeFurnace(db, { profiles: [p174, p316] });
  furnaces.push(kiln.id);
});

afterAll(async () => {
  await db.updateTable("units").set({ furnace_run_id: null }).where("furnace_run_id", "in", db.selectFrom("furnace_runs").select("id").where("furnace_id", "in", furnaces).where("state", "in", ["draft", "scheduled"])).execute();
  await db.updateTable("furnace_runs").set({ state: "cancelled" }).where("furnace_id", "in", furnaces).where("state", "in", ["draft", "scheduled"]).execute();
  await db.updateTable("wash_batches").set({ state: "cancelled" }).where("wash_station_id", "in", stations).where("state", "in", ["draft", "scheduled"]).execute();
  await retireEquipment(db, furnaces, stations);
  await retireMaterials(db, materials);
  await restoreHours();
  await close();
});

describe("furnace runs: adding and removing units", () => {
  it("adds a brown unit onto the trays, bumps both versions, and takes it out again", async () => {
    const run = await openRun();
    const [u] = await makeUnits(db, { material: "17-4PH", state: "brown", green: [60, 40, 30], mass_g: 300 });
    const res = await add(run, run.version, u);
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    expect(res.body.version).toBe(run.version + 1);
    expect(res.body.units.map((x: { id: string }) => x.id)).toEqual([u.id]);
    const placements = res.body.tray_layout.trays.flatMap((t: { placements: { unit: string; x: number; y: number; w: number; d: number }[] }) => t.placements);
    expect(placements).toHaveLength(1);
    expect(placements[0].unit).toBe(u.id);
    // clearance from the tray edge is kept (5 mm in the demo shop)
    expect(placements[0].x).toBeGreaterThanOrEqual(5 - 1e-9);
    expect(placements[0].y).toBeGreaterThanOrEqual(5 - 1e-9);
    const after = await unitRow(u.id);
    expect(after.furnace_run_id).toBe(run.id);
    expect(after.version).toBe(u.version + 1);

    const removed = await api(`/api/furnace-runs/${run.id}/units/${u.id}`, { method: "DELETE", cookie: operator, body: { version: res.body.version, unit_version: after.version } });
    expect(removed.status, JSON.stringify(removed.body)).toBe(200);
    expect(removed.body.units).toHaveLength(0);
    expect(removed.body.tray_layout.trays.every((t: { placements: unknown[] }) => t.placements.length === 0)).toBe(true);
    expect((await unitRow(u.id)).furnace_run_id).toBeNull();
  });

  it("moves a unit from one open run to another and takes it off the first run's trays", async () => {
    const a = await openRun();
    const b = await openRun();
    const [u] = await makeUnits(db, { material: "17-4PH", state: "brown", green: [50, 50, 20], mass_g: 200 });
    const first = await add(a, a.version, u);
    expect(first.status).toBe(200);
    const moved = await add(b, b.version, { id: u.id, version: u.version + 1 });
    expect(moved.status, JSON.stringify(moved.body)).toBe(200);
    const runA = await api(`/api/furnace-runs/${a.id}`, { cookie: operator });
    expect(runA.body.run.units).toHaveLength(0);
    expect(runA.body.run.version).toBe(first.body.version + 1);
  });

  it("refuses a unit of another sinter profile with the reason (422)", async () => {
    const run = await openRun(kiln.id, p174);
    const [u] = await makeUnits(db, { material: "316L", state: "brown", green: [40, 40, 20], mass_g: 150 });
    const res = await add(run, run.version, u);
    expect(res.status).toBe(422);
    expect(res.body.error.details.rule).toBe("profile");
    expect(res.body.error.message).toMatch(/needs profile 316L-std r\d+; this run is 174PH-std r\d+/);
    expect((await unitRow(u.id)).furnace_run_id).toBeNull();
  });

  it("refuses a unit taller than the furnace's usable height (422)", async () => {
    const run = await openRun();
    const [u] = await makeUnits(db, { material: "17-4PH", state: "brown", green: [40, 40, 130], mass_g: 300 });
    const res = await add(run, run.version, u);
    expect(res.status).toBe(422);
    expect(res.body.error.details.rule).toBe("height");
    expect(res.body.error.message).toContain("130 mm tall; the furnace allows 100 mm");
  });

  it("refuses a unit that would take the run over its load limit (422)", async () => {
    const run = await openRun();
    const [heavy1, heavy2] = await makeUnits(db, { material: "17-4PH", state: "brown", count: 2, green: [80, 60, 40], mass_g: 2800 });
    const first = await add(run, run.version, heavy1);
    expect(first.status, JSON.stringify(first.body)).toBe(200);
    const res = await add(run, first.body.version, heavy2);
    expect(res.status).toBe(422);
    expect(res.body.error.details.rule).toBe("load");
    expect(res.body.error.message).toMatch(/run would weigh 5320 g; the furnace allows 5000 g/);
  });

  it("refuses a unit when the trays have no room left, even after re-packing (422)", async () => {
    const run = await openRun();
    // 200 × 150 mm plus clearance: one per 300 × 250 mm tray, so a third cannot go on two trays.
    const units = await makeUnits(db, { material: "17-4PH", state: "brown", count: 3, green: [200, 150, 20], mass_g: 400 });
    let version = run.version;
    for (const u of units.slice(0, 2)) {
      const r = await add(run, version, u);
      expect(r.status, JSON.stringify(r.body)).toBe(200);
      version = r.body.version;
    }
    const res = await add(run, version, units[2]);
    expect(res.status).toBe(422);
    expect(res.body.error.details.rule).toBe("room");
    expect(res.body.error.message).toMatch(/no room on the trays/);
    // a footprint larger than a tray is refused as no room as well
    const [wide] = await makeUnits(db, { material: "17-4PH", state: "brown", green: [320, 260, 20], mass_g: 400 });
    const other = await openRun();
    const res2 = await add(other, other.version, wide);
    expect(res2.status).toBe(422);
    expect(res2.body.error.details.rule).toBe("room");
  });

  it("refuses a unit that is still green", async () => {
    const run = await openRun();
    const [u] = await makeUnits(db, { material: "17-4PH", state: "green", green: [40, 40, 20], mass_g: 150 });
    const res = await add(run, run.version, u);
    expect(res.status).toBe(422);
    expect(res.body.error.details.rule).toBe("unit_state");
  });

  it("answers 409 on a stale run version or a stale unit version, and changes nothing", async () => {
    const run = await openRun();
    const [u1, u2] = await makeUnits(db, { material: "17-4PH", state: "brown", count: 2, green: [40, 40, 20], mass_g: 150 });
    const ok = await add(run, run.version, u1);
    expect(ok.status).toBe(200);
    const stale = await add(run, run.version, u2);
    expect(stale.status).toBe(409);
    expect(stale.body.error.details.current_version).toBe(ok.body.version);
    expect((await unitRow(u2.id)).furnace_run_id).toBeNull();
    const staleUnit = await add(run, ok.body.version, { id: u2.id, version: u2.version + 5 });
    expect(staleUnit.status).toBe(409);
    const current = await api(`/api/furnace-runs/${run.id}`, { cookie: operator });
    expect(current.body.run.units).toHaveLength(1);
    expect(current.body.run.version).toBe(ok.body.version);
  });

  it("lets only furnace operators and admins fill runs", async () => {
    const run = await openRun();
    const [u] = await makeUnits(db, { material: "17-4PH", state: "brown", green: [40, 40, 20], mass_g: 150 });
    const res = await add(run, run.version, u, technician);
    expect(res.status).toBe(403);
  });
});

describe("furnace runs: booking, start and unload", () => {
  it("books a run for its profile's cycle, refuses a resize, a clash and an unstaffed start", async () => {
    const run = await openRun();
    const start = new Date(Math.ceil((Date.now() + 40 * 24 * HOUR) / HOUR) * HOUR);
    const booked = await api(`/api/furnace-runs/${run.id}/schedule`, { method: "PATCH", cookie: operator, body: { version: run.version, starts_at: start.toISOString() } });
    expect(booked.status, JSON.stringify(booked.body)).toBe(200);
    expect(booked.body.state).toBe("scheduled");
    expect(new Date(booked.body.ends_at).getTime() - start.getTime()).toBe(run.cycle_minutes * 60_000);

    const resized = await api(`/api/furnace-runs/${run.id}/schedule`, {
      method: "PATCH", cookie: operator,
      body: { version: booked.body.version, starts_at: start.toISOString(), ends_at: new Date(start.getTime() + 2 * HOUR).toISOString() },
    });
    expect(resized.status).toBe(422);
    expect(resized.body.error.details.rule).toBe("resize");

    // The floor shows it on its furnace lane as a booking that can be dragged, with its profile.
    const from = new Date(start.getTime() - 24 * HOUR).toISOString();
    const to = new Date(start.getTime() + 48 * HOUR).toISOString();
    const floor = await api(`/api/floor?from=${encodeURIComponent(from)}&to=${encodeURIComponent(to)}`, { cookie: operator });
    expect(floor.status).toBe(200);
    const ev = floor.body.events.find((e: { id: string }) => e.id === run.id);
    expect(ev).toMatchObject({ kind: "furnace_run", resource_id: kiln.id, editable: true, profile_id: p174 });
    expect(floor.body.resources.find((r: { id: string }) => r.id === kiln.id).profile_ids).toContain(p174);
    // Moving it to a furnace that does not run its profile is refused by the server too.
    const narrow = await makeFurnace(db, { profiles: [p316] });
    furnaces.push(narrow.id);
    const wrongLane = await api(`/api/furnace-runs/${run.id}/schedule`, { method: "PATCH", cookie: operator, body: { version: booked.body.version, starts_at: start.toISOString(), furnace_id: narrow.id } });
    expect(wrongLane.status).toBe(422);
    expect(wrongLane.body.error.details.rule).toBe("profile");

    const other = await openRun();
    const clash = await api(`/api/furnace-runs/${other.id}/schedule`, { method: "PATCH", cookie: operator, body: { version: other.version, starts_at: new Date(start.getTime() + HOUR).toISOString() } });
    expect(clash.status).toBe(409);

    // Weekdays 08:00–16:00 only: a Sunday-night load is refused with the next staffed time.
    const tz = (await db.selectFrom("shop_settings").select("time_zone").executeTakeFirstOrThrow()).time_zone;
    await setStaffedHours(db, [1, 2, 3, 4, 5].map((day) => ({ day, start: "08:00", end: "16:00" })));
    try {
      let sunday = new Date(start.getTime() + 3 * 24 * HOUR);
      while (new Intl.DateTimeFormat("en-US", { timeZone: tz, weekday: "short" }).format(sunday) !== "Sun") sunday = new Date(sunday.getTime() + 24 * HOUR);
      const unstaffed = await api(`/api/furnace-runs/${other.id}/schedule`, { method: "PATCH", cookie: operator, body: { version: other.version, starts_at: sunday.toISOString() } });
      expect(unstaffed.status).toBe(422);
      expect(unstaffed.body.error.fieldErrors.starts_at[0]).toMatch(/next staffed time/);
      expect(new Date(unstaffed.body.error.details.next_staffed_at).getTime()).toBeGreaterThan(sunday.getTime());
    } finally {
      await staffAroundTheClock(db);
    }
  });

  it("starts only with the full checklist and brown units, then unloads with outcomes after the cycle", async () => {
    const run = await openRun();
    const units = await makeUnits(db, { material: "17-4PH", state: "brown", count: 2, green: [50, 40, 25], mass_g: 250 });
    let version = run.version;
    for (const u of units) {
      const r = await add(run, version, u);
      version = r.body.version;
    }
    const partial = await api(`/api/furnace-runs/${run.id}/start`, { method: "POST", cookie: operator, body: { version, checklist: { purge_confirmed: true } } });
    expect(partial.status).toBe(422);
    const all = { setters_checked: true, layout_matches: true, load_within_limit: true, thermocouples_ok: true, gas_supply_checked: true, purge_confirmed: true, door_sealed: true };
    const started = await api(`/api/furnace-runs/${run.id}/start`, { method: "POST", cookie: operator, body: { version, checklist: all } });
    expect(started.status, JSON.stringify(started.body)).toBe(200);
    expect(started.body.state).toBe("running");
    for (const u of units) expect((await unitRow(u.id)).state).toBe("sintering");

    const early = await api(`/api/furnace-runs/${run.id}/unload`, { method: "POST", cookie: operator, body: { version: started.body.version, outcomes: units.map((u) => ({ unit_id: u.id, outcome: "sintered" })) } });
    expect(early.status).toBe(422);
    expect(early.body.error.details.rule).toBe("early");

    // The cycle is over (as if hours had passed); the worker may get there first, so retry once on its version.
    await db.updateTable("furnace_runs").set({ starts_at: new Date(Date.now() - 30 * HOUR), ends_at: new Date(Date.now() - 20 * HOUR) }).where("id", "=", run.id).execute();
    const outcomes = [
      { unit_id: units[0].id, outcome: "sintered" },
      { unit_id: units[1].id, outcome: "scrapped", scrap_reason: "crack" },
    ];
    const noReason = await api(`/api/furnace-runs/${run.id}/unload`, { method: "POST", cookie: operator, body: { version: started.body.version, outcomes: [outcomes[0], { unit_id: units[1].id, outcome: "scrapped" }] } });
    expect(noReason.status).toBe(422);
    let unloaded = await api(`/api/furnace-runs/${run.id}/unload`, { method: "POST", cookie: operator, body: { version: started.body.version, outcomes } });
    if (unloaded.status === 409) {
      const v = (await db.selectFrom("furnace_runs").select("version").where("id", "=", run.id).executeTakeFirstOrThrow()).version;
      unloaded = await api(`/api/furnace-runs/${run.id}/unload`, { method: "POST", cookie: operator, body: { version: v, outcomes } });
    }
    expect(unloaded.status, JSON.stringify(unloaded.body)).toBe(200);
    expect(unloaded.body.state).toBe("complete");
    const kept = await unitRow(units[0].id);
    expect(["sintered", "ready_for_finishing"]).toContain(kept.state);
    const scrapped = await unitRow(units[1].id);
    expect(scrapped.state).toBe("scrapped");
    expect(scrapped.scrap_reason).toBe("crack");
  });
});

describe("wash batches and the mass-loss gate", () => {
  it("refuses a unit over the basket's capacity, and one that does not fit the basket", async () => {
    const st = await makeStation(db, { capacity: 2, basket: [200, 200, 80] });
    stations.push(st.id);
    const batch = await api("/api/wash-batches", { method: "POST", cookie: technician, body: { wash_station_id: st.id } });
    expect(batch.status).toBe(201);
    const units = await makeUnits(db, { material: "17-4PH", state: "green", count: 3, green: [40, 30, 20], mass_g: 100 });
    let version = batch.body.version;
    for (const u of units.slice(0, 2)) {
      const r = await api(`/api/wash-batches/${batch.body.id}/units`, { method: "POST", cookie: technician, body: { version, unit_id: u.id, unit_version: u.version } });
      expect(r.status, JSON.stringify(r.body)).toBe(200);
      version = r.body.version;
    }
    const full = await api(`/api/wash-batches/${batch.body.id}/units`, { method: "POST", cookie: technician, body: { version, unit_id: units[2].id, unit_version: units[2].version } });
    expect(full.status).toBe(422);
    expect(full.body.error.details.rule).toBe("capacity");
    const [tall] = await makeUnits(db, { material: "17-4PH", state: "green", green: [40, 30, 90], mass_g: 100 });
    const b2 = await api("/api/wash-batches", { method: "POST", cookie: technician, body: { wash_station_id: st.id } });
    const r2 = await api(`/api/wash-batches/${b2.body.id}/units`, { method: "POST", cookie: technician, body: { version: b2.body.version, unit_id: tall.id, unit_version: tall.version } });
    expect(r2.status).toBe(422);
    expect(r2.body.error.details.rule).toBe("size");
  });

  it("lasts as long as its slowest unit, holds a unit that lost too little binder, and lets the others dry", async () => {
    const st = await makeStation(db);
    stations.push(st.id);
    const m = await db.selectFrom("materials").select(["wash_k_min_per_mm2", "wash_min_minutes", "min_mass_loss"]).where("code", "=", "17-4PH").executeTakeFirstOrThrow();
    const [thin] = await makeUnits(db, { material: "17-4PH", state: "green", green: [40, 30, 20], mass_g: 100, wall_mm: 2 });
    const [thick] = await makeUnits(db, { material: "17-4PH", state: "green", green: [40, 30, 20], mass_g: 200, wall_mm: 5 });
    const batch = await api("/api/wash-batches", { method: "POST", cookie: technician, body: { wash_station_id: st.id } });
    let version = batch.body.version;
    for (const u of [thin, thick]) {
      const r = await api(`/api/wash-batches/${batch.body.id}/units`, { method: "POST", cookie: technician, body: { version, unit_id: u.id, unit_version: u.version } });
      expect(r.status).toBe(200);
      version = r.body.version;
    }
    const slowest = Math.ceil(Number(m.wash_k_min_per_mm2) * 25 + Number(m.wash_min_minutes));
    const started = await api(`/api/wash-batches/${batch.body.id}/start`, { method: "POST", cookie: technician, body: { version } });
    expect(started.status, JSON.stringify(started.body)).toBe(200);
    expect(started.body.state).toBe("running");
    expect(started.body.est_minutes).toBe(slowest);
    expect(new Date(started.body.ends_at).getTime() - new Date(started.body.starts_at).getTime()).toBe(slowest * 60_000);
    expect((await unitRow(thin.id)).state).toBe("washing");

    const min = Number(m.min_mass_loss);
    // thin: loses 1 point more than the minimum; thick: 1 point less
    const thinBrown = Math.round(100 * (1 - min - 0.01) * 10) / 10;
    const thickBrown = Math.round(200 * (1 - min + 0.01) * 10) / 10;
    const missing = await api(`/api/wash-batches/${batch.body.id}/finish`, { method: "POST", cookie: technician, body: { version: started.body.version, masses: [{ unit_id: thin.id, brown_mass_g: thinBrown }] } });
    expect(missing.status).toBe(422);
    expect(Object.keys(missing.body.error.fieldErrors)).toContain(`${thick.id}.brown_mass_g`);
    const heavier = await api(`/api/wash-batches/${batch.body.id}/masses`, { method: "PUT", cookie: technician, body: { version: started.body.version, masses: [{ unit_id: thick.id, brown_mass_g: 250 }] } });
    expect(heavier.status).toBe(422);

    const finished = await api(`/api/wash-batches/${batch.body.id}/finish`, {
      method: "POST", cookie: technician,
      body: { version: started.body.version, masses: [{ unit_id: thin.id, brown_mass_g: thinBrown }, { unit_id: thick.id, brown_mass_g: thickBrown }] },
    });
    expect(finished.status, JSON.stringify(finished.body)).toBe(200);
    expect(finished.body.batch.state).toBe("complete");
    const byId = Object.fromEntries(finished.body.masses.map((r: { unit_id: string }) => [r.unit_id, r]));
    expect(byId[thin.id].passed).toBe(true);
    expect(byId[thick.id].passed).toBe(false);
    expect(byId[thick.id].loss_fraction).toBeCloseTo(min - 0.01, 3);
    const held = await unitRow(thick.id);
    expect(held.state).toBe("on_hold");
    expect(held.wash_passed).toBe(false);
    expect(held.hold_reason).toMatch(/below the .* minimum for 17-4PH/);
    const dried = await unitRow(thin.id);
    expect(dried.wash_passed).toBe(true);
    expect(["washing", "brown"]).toContain(dried.state);
  });
});

describe("suggest batches", () => {
  it("proposes runs no fewer than the lower bound, books them only when accepted, and refuses a stale proposal", async () => {
    const mine = await makeProfileAndMaterial(db, "316L");
    materials.push(mine.material_code);
    const own = await makeFurnace(db, { profiles: [mine.profile_id], tray: [300, 250], trays: 2, height: 100, load: 5000 });
    furnaces.push(own.id);
    // 120 × 100 mm (+5 mm): four fit a 300 × 250 mm tray, eight a run; twelve need two runs at least.
    const units = await makeUnits(db, { material: mine.material_code, state: "brown", count: 12, green: [120, 100, 30], mass_g: 300 });
    const only = { wash: false, furnace: true, profile_ids: [mine.profile_id] };
    const proposal = await api("/api/batches/suggest", { method: "POST", cookie: operator, body: only });
    expect(proposal.status, JSON.stringify(proposal.body)).toBe(201);
    const p = proposal.body;
    expect(p.metrics.lower_bound).toBe(2);
    expect(p.metrics.furnace_runs).toBeGreaterThanOrEqual(p.metrics.lower_bound);
    expect(p.metrics.furnace_runs).toBeLessThanOrEqual(3);
    // The search reports why it stopped; at the bound there is nothing left to gain.
    expect(p.metrics.search.budget_ms).toBe(1000);
    // The app's web server runs the search on a compute thread (db/compute/threads.ts), not on its own.
    expect(p.timing.on_thread).toBe(true);
    if (p.metrics.furnace_runs === p.metrics.lower_bound) expect(p.metrics.search.stop).toBe("bound");
    expect(p.unplaced).toHaveLength(0);
    const proposedIds = p.furnace.flatMap((r: { units: { id: string }[] }) => r.units.map((u) => u.id));
    expect(proposedIds.sort()).toEqual(units.map((u) => u.id).sort());
    // runs on one furnace never overlap, and each lasts its cycle
    const spans = p.furnace.map((r: { starts_at: string; ends_at: string; furnace_id: string }) => [Date.parse(r.starts_at), Date.parse(r.ends_at), r.furnace_id] as const);
    for (const a of spans) for (const b of spans) if (a !== b && a[2] === b[2]) expect(a[1] <= b[0] || b[1] <= a[0]).toBe(true);
    for (const u of units) expect((await unitRow(u.id)).furnace_run_id).toBeNull();

    const applied = await api("/api/batches/suggest/apply", { method: "POST", cookie: operator, body: { proposal_id: p.id } });
    expect(applied.status, JSON.stringify(applied.body)).toBe(200);
    expect(applied.body.furnace_runs).toHaveLength(p.furnace.length);
    for (const u of units) expect((await unitRow(u.id)).furnace_run_id).not.toBeNull();
    const runs = await db.selectFrom("furnace_runs").select(["state", "starts_at", "ends_at", "furnace_id"]).where("id", "in", applied.body.furnace_runs).execute();
    expect(runs.every((r) => r.state === "scheduled" && r.starts_at && r.ends_at && r.furnace_id === own.id)).toBe(true);
    const again = await api("/api/batches/suggest/apply", { method: "POST", cookie: operator, body: { proposal_id: p.id } });
    expect(again.status).toBe(409);

    // A search budget beyond the limit is refused with the field named, not run.
    const tooLong = await api("/api/batches/suggest", { method: "POST", cookie: operator, body: { ...only, budget_ms: 600_000 } });
    expect(tooLong.status).toBe(422);
    expect(JSON.stringify(tooLong.body)).toMatch(/budget_ms/);

    const more = await makeUnits(db, { material: mine.material_code, state: "brown", count: 2, green: [60, 60, 30], mass_g: 200 });
    const second = await api("/api/batches/suggest", { method: "POST", cookie: operator, body: only });
    expect(second.status).toBe(201);
    expect(second.body.metrics.furnace_units).toBe(2);
    await db.updateTable("units").set({ version: more[0].version + 1 }).where("id", "=", more[0].id).execute();
    const stale = await api("/api/batches/suggest/apply", { method: "POST", cookie: operator, body: { proposal_id: second.body.id } });
    expect(stale.status).toBe(409);
    expect(stale.body.error.message).toMatch(/out of date/);
    expect((await unitRow(more[1].id)).furnace_run_id).toBeNull();
  });

  it("keeps technicians from booking furnace runs through a proposal", async () => {
    const mine = await makeProfileAndMaterial(db, "17-4PH");
    materials.push(mine.material_code);
    const own = await makeFurnace(db, { profiles: [mine.profile_id] });
    furnaces.push(own.id);
    await makeUnits(db, { material: mine.material_code, state: "brown", count: 2, green: [60, 60, 30], mass_g: 200 });
    const p = await api("/api/batches/suggest", { method: "POST", cookie: technician, body: { wash: false, furnace: true, profile_ids: [mine.profile_id] } });
    expect(p.status).toBe(201);
    expect(p.body.furnace.length).toBeGreaterThan(0);
    const r = await api("/api/batches/suggest/apply", { method: "POST", cookie: technician, body: { proposal_id: p.body.id } });
    expect(r.status).toBe(403);
    const refused = await api("/api/batches/suggest/refuse", { method: "POST", cookie: technician, body: { proposal_id: p.body.id } });
    expect(refused.status).toBe(200);
  });
});

describe("sinter profiles", () => {
  it("saves a profile in place until a booked run holds it, then as a new revision the run does not see", async () => {
    const code = `T6-${Date.now().toString(36)}`;
    const body = {
      code, name: "test profile", atmosphere: "Ar", start_temp_c: 20, cool_rate_c_per_min: 10, cool_to_c: 100,
      segments: [{ rate_c_per_min: 5, setpoint_c: 600, hold_min: 30 }, { rate_c_per_min: 5, setpoint_c: 1300, hold_min: 60 }],
      material_ids: [], furnace_ids: [kiln.id],
    };
    const bad = await api("/api/sinter-profiles", { method: "POST", cookie: admin, body: { ...body, cool_to_c: 1400 } });
    expect(bad.status).toBe(422);
    expect(bad.body.error.fieldErrors.cool_to_c).toBeTruthy();
    const created = await api("/api/sinter-profiles", { method: "POST", cookie: admin, body });
    expect(created.status, JSON.stringify(created.body)).toBe(201);
    const inPlace = await api(`/api/sinter-profiles/${created.body.id}`, { method: "PUT", cookie: admin, body: { ...body, name: "renamed", version: created.body.version } });
    expect(inPlace.status).toBe(200);
    expect(inPlace.body.revised).toBe(false);
    expect(inPlace.body.id).toBe(created.body.id);

    const run = await openRun(kiln.id, created.body.id);
    const start = new Date(Math.ceil((Date.now() + 60 * 24 * HOUR) / HOUR) * HOUR);
    const booked = await api(`/api/furnace-runs/${run.id}/schedule`, { method: "PATCH", cookie: operator, body: { version: run.version, starts_at: start.toISOString() } });
    expect(booked.status, JSON.stringify(booked.body)).toBe(200);
    const revised = await api(`/api/sinter-profiles/${created.body.id}`, {
      method: "PUT", cookie: admin,
      body: { ...body, segments: [{ rate_c_per_min: 5, setpoint_c: 600, hold_min: 30 }, { rate_c_per_min: 5, setpoint_c: 1320, hold_min: 90 }], version: inPlace.body.version },
    });
    expect(revised.status, JSON.stringify(revised.body)).toBe(201);
    expect(revised.body.revised).toBe(true);
    expect(revised.body.revision).toBe(2);
    expect(revised.body.supersedes_id).toBe(created.body.id);
    const runRow = await db.selectFrom("furnace_runs").select(["profile_id", "ends_at"]).where("id", "=", run.id).executeTakeFirstOrThrow();
    expect(runRow.profile_id).toBe(created.body.id);
    expect(new Date(runRow.ends_at!).toISOString()).toBe(booked.body.ends_at);
    const old = await db.selectFrom("sinter_profile_segments").select("setpoint_c").where("profile_id", "=", created.body.id).orderBy("position").execute();
    expect(old.map((s) => Number(s.setpoint_c))).toEqual([600, 1300]);
    const editOld = await api(`/api/sinter-profiles/${created.body.id}`, { method: "PUT", cookie: admin, body: { ...body, version: inPlace.body.version + 1 } });
    expect(editOld.status).toBe(409);
    const asOperator = await api(`/api/sinter-profiles/${revised.body.id}`, { method: "PUT", cookie: operator, body: { ...body, version: revised.body.version } });
    expect(asOperator.status).toBe(403);
  });
});
