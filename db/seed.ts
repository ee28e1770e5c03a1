import { sql, type Transaction } from "kysely";
import type { DB } from "@/db/schema";
import { estimateBuildDraws } from "@/db/inventory/reads";
import type { Database } from "@/db/client";
import { hashPassword } from "@/lib/auth/password";
import type { Role } from "@/lib/auth/permissions";
import { furnaceCycle } from "@/lib/process/furnace-profile";
import { feedstockDensity, shrinkageFromSolidsLoading } from "@/lib/process/scale-up";
import { washMinutes } from "@/lib/process/wash";
import { DEMO_PASSWORD, DEMO_USERS } from "./seed-users";
import { mulberry32 } from "@/lib/random";

/**
 * The demo shop: an invented contract shop, "Kestrel Sinterworks", with its own equipment,
 * materials, customers and parts, laid out around the moment of seeding so that every unit
 * state is present and the worker has real work to advance. Process values follow published
 * relations (German's shrinkage relation, Crank's t ∝ h² wash law) with typical inputs.
 */

export { DEMO_PASSWORD, DEMO_USERS };


const MIN = 60_000;
const HOUR = 60 * MIN;
const DAY = 24 * HOUR;
const round = (x: number, d = 2) => Math.round(x * 10 ** d) / 10 ** d;

type MaterialSeed = {
  code: string;
  name: string;
  family: string;
  phi: number; // solids loading
  fs: number; // fractional sintered density
  rhoT: number; // wrought density g/cm³ (REFERENCES: matweb / datasheets)
  zExtra: number; // extra Z shrinkage of extruded layers
  profile: { code: string; name: string; atmosphere: string; gas: string; flow: number; segments: [number, number, number][]; cool: number };
};

const BINDER_DENSITY = 0.95; // g/cm³, a typical polymer binder
// From the calibration example of Crank's long-time limit: a 4 mm wall washed in 8 h → 480/4² min/mm².
const WASH_K = 30;
const WASH_MIN = 60;

const MATERIALS: MaterialSeed[] = [
  {
    code: "17-4PH", name: "17-4 PH stainless", family: "precipitation-hardening stainless", phi: 0.6, fs: 0.97, rhoT: 7.78, zExtra: 0.012,
    profile: { code: "174PH-std", name: "17-4 PH standard", atmosphere: "Ar / 3 % H₂ partial pressure", gas: "argon-hydrogen mix", flow: 8, segments: [[5, 600, 60], [5, 1350, 120]], cool: 10 },
  },
  {
    code: "316L", name: "316L stainless", family: "austenitic stainless", phi: 0.62, fs: 0.98, rhoT: 7.99, zExtra: 0.01,
    profile: { code: "316L-std", name: "316L standard", atmosphere: "H₂ flowing", gas: "hydrogen", flow: 12, segments: [[5, 600, 60], [4, 1360, 150]], cool: 8 },
  },
  {
    code: "H13", name: "H13 hot-work tool steel", family: "tool steel", phi: 0.6, fs: 0.98, rhoT: 7.8, zExtra: 0.014,
    profile: { code: "H13-std", name: "H13 standard", atmosphere: "vacuum, Ar backfill", gas: "argon", flow: 2, segments: [[5, 600, 60], [4, 1280, 90]], cool: 10 },
  },
  {
    code: "A2", name: "A2 cold-work tool steel", family: "tool steel", phi: 0.58, fs: 0.97, rhoT: 7.86, zExtra: 0.015,
    profile: { code: "A2-std", name: "A2 standard", atmosphere: "vacuum, N₂ backfill", gas: "nitrogen", flow: 2, segments: [[5, 550, 60], [4, 1260, 90]], cool: 10 },
  },
];

const profileOf = (m: MaterialSeed) => ({
  startTempC: 20,
  coolToC: 100,
  coolRateCPerMin: m.profile.cool,
  segments: m.profile.segments.map(([rateCPerMin, setpointC, holdMin]) => ({ rateCPerMin, setpointC, holdMin })),
});
const shrinkXY = (m: MaterialSeed) => shrinkageFromSolidsLoading(m.phi, m.fs);
const greenDensityOf = (m: MaterialSeed) => feedstockDensity(m.phi, m.rhoT, BINDER_DENSITY);

export async function isEmpty(db: Database): Promise<boolean> {
  const row = await db.selectFrom("users").select((eb) => eb.fn.countAll<number>().as("n")).executeTakeFirstOrThrow();
  return Number(row.n) === 0;
}

export async function seedDemoShop(db: Database, now = new Date()): Promise<{ units: number; orders: number }> {
  const rand = mulberry32(20261201);
  const pick = <T,>(xs: T[]) => xs[Math.floor(rand() * xs.length)];
  // Bookings line up on the hour so the floor reads cleanly.
  const t0 = new Date(Math.floor(now.getTime() / HOUR) * HOUR);
  const at = (hours: number) => new Date(t0.getTime() + hours * HOUR);
  const passwordHash = await hashPassword(DEMO_PASSWORD);

  return db.transaction().execute(async (trx) => {
    const users = await trx
      .insertInto("users")
      .values(DEMO_USERS.map((u) => ({ ...u, password_hash: passwordHash, unit_pref: u.role === "machinist" ? ("in" as const) : ("mm" as const) })))
      .returning(["id", "role"])
      .execute();
    const userId = (role: Role) => users.find((u) => u.role === role)!.id;

    await trx
      .insertInto("shop_settings")
      .values({
        shop_name: "Kestrel Sinterworks",
        time_zone: "America/Detroit",
        staffed_hours: JSON.stringify([1, 2, 3, 4, 5].map((day) => ({ day, start: "06:00", end: "22:00" })).concat([{ day: 6, start: "07:00", end: "15:00" }])),
        drying_minutes: 120,
        finishing_lead_minutes: 2 * 24 * 60,
        at_risk_margin_minutes: 24 * 60,
      })
      .execute();

    // Materials and their sinter profiles ----------------------------------------------------
    const materialIds: Record<string, string> = {};
    const profileIds: Record<string, string> = {};
    for (const m of MATERIALS) {
      const profile = await trx
        .insertInto("sinter_profiles")
        .values({
          code: m.profile.code, name: m.profile.name, atmosphere: m.profile.atmosphere, cool_rate_c_per_min: m.profile.cool, start_temp_c: 20, cool_to_c: 100,
          process_gas: m.profile.gas, gas_flow_l_per_min: m.profile.flow,
        })
        .returning("id")
        .executeTakeFirstOrThrow();
      await trx
        .insertInto("sinter_profile_segments")
        .values(m.profile.segments.map(([rate, setpoint, hold], position) => ({ profile_id: profile.id, position, rate_c_per_min: rate, setpoint_c: setpoint, hold_min: hold })))
        .execute();
      // German's relation: s = 1 − (φ/f_s)^(1/3); Z shrinks a little more in extruded layers.
      const sXY = shrinkXY(m);
      const material = await trx
        .insertInto("materials")
        .values({
          code: m.code, name: m.name, alloy_family: m.family,
          shrink_xy: round(sXY, 4), shrink_z: round(sXY + m.zExtra, 4),
          green_density_g_cm3: round(greenDensityOf(m), 3),
          sintered_density_g_cm3: round(m.fs * m.rhoT, 3),
          theoretical_density_g_cm3: m.rhoT,
          solids_loading: m.phi, binder_density_g_cm3: BINDER_DENSITY,
          wash_k_min_per_mm2: WASH_K, wash_min_minutes: WASH_MIN,
          min_mass_loss: 0.035,
          default_profile_id: profile.id,
          // the demo shop's own allowances and reorder rule (invented)
          support_allowance: 0.15, purge_g: 25, reorder_point_g: m.code === "A2" ? 6000 : 4000, lead_time_days: m.code === "A2" ? 21 : 10,
        })
        .returning("id")
        .executeTakeFirstOrThrow();
      await trx.insertInto("sinter_profile_materials").values({ profile_id: profile.id, material_id: material.id }).execute();
      materialIds[m.code] = material.id;
      profileIds[m.code] = profile.id;
    }

    // Quoting rates (invented for the demo shop; money in euro cents) ------------------------
    await trx
      .updateTable("quote_settings")
      .set({
        currency: "EUR", minor_digits: 2, printer_rate_minor_per_h: 1800, wash_batch_cost_minor: 4500, wash_batch_volume_cm3: 1500,
        furnace_run_cost_minor: 22000, furnace_gas_cost_minor: 6500, furnace_energy_cost_minor: 9000, finishing_rate_minor_per_h: 7200,
        finishing_min_per_cm2: 0.6, inspection_rate_minor_per_h: 6000, inspection_min_per_unit: 12, setup_minor_per_order: 15000,
        overhead_bp: 1800, margin_bp: 2200, fallback_yield: 0.9, validity_days: 30,
      })
      .where("id", "=", 1)
      .execute();
    const feedstockPrice: Record<string, number> = { "17-4PH": 16500, "316L": 17500, H13: 21000, A2: 19500 };
    await trx
      .insertInto("material_quote_rates")
      .values(Object.entries(materialIds).map(([code, id]) => ({ material_id: id, feedstock_minor_per_kg: feedstockPrice[code] ?? 18000, infill_fraction: 0.8, support_fraction: 0.12 })))
      .execute();

    // Equipment -----------------------------------------------------------------------------------
    const printerSpecs = [
      { name: "Wren", build: [300, 220, 180], rate: 22, mats: ["17-4PH", "316L", "H13"] },
      { name: "Lark", build: [250, 180, 150], rate: 16, mats: ["17-4PH", "316L"] },
      { name: "Heron", build: [350, 300, 250], rate: 28, mats: ["H13", "A2", "17-4PH"] },
      { name: "Finch", build: [250, 180, 150], rate: 16, mats: ["316L", "A2"] },
    ];
    const printers: { id: string; name: string; mats: string[] }[] = [];
    for (const p of printerSpecs) {
      const row = await trx
        .insertInto("printers")
        .values({ name: p.name, build_x_mm: p.build[0], build_y_mm: p.build[1], build_z_mm: p.build[2], deposition_cm3_per_h: p.rate, layer_height_mm: 0.15, layer_overhead_s: 8 })
        .returning("id")
        .executeTakeFirstOrThrow();
      await trx.insertInto("printer_materials").values(p.mats.map((c) => ({ printer_id: row.id, material_id: materialIds[c] }))).execute();
      printers.push({ id: row.id, name: p.name, mats: p.mats });
    }
    const washes = await trx
      .insertInto("wash_stations")
      .values([
        { name: "Wash bay 1", solvent: "acetone-free solvent blend", basket_x_mm: 400, basket_y_mm: 300, basket_z_mm: 200, capacity_units: 24, max_load_g: 12000 },
        { name: "Wash bay 2", solvent: "acetone-free solvent blend", basket_x_mm: 300, basket_y_mm: 250, basket_z_mm: 160, capacity_units: 16, max_load_g: 8000 },
      ])
      .returning("id")
      .execute();
    const furnaces = await trx
      .insertInto("furnaces")
      .values([
        { name: "Kiln A", tray_x_mm: 300, tray_y_mm: 250, tray_count: 3, usable_height_mm: 120, max_load_g: 15000, max_cool_rate_c_per_min: 8 },
        { name: "Kiln B", tray_x_mm: 400, tray_y_mm: 300, tray_count: 4, usable_height_mm: 160, max_load_g: 30000, max_cool_rate_c_per_min: 10 },
      ])
      .returning("id")
      .execute();
    // The big printer and the big kiln cost more an hour or a run than the shop's default (invented).
    await trx.insertInto("printer_quote_rates").values({ printer_id: printers[2].id, rate_minor_per_h: 2600 }).execute();
    await trx.insertInto("furnace_quote_rates").values({ furnace_id: furnaces[1].id, run_cost_minor: 30000, gas_cost_minor: 9500, energy_cost_minor: null }).execute();
    await trx
      .insertInto("furnace_profiles")
      .values([
        ...["17-4PH", "316L", "H13"].map((c) => ({ furnace_id: furnaces[0].id, profile_id: profileIds[c] })),
        ...["17-4PH", "316L", "H13", "A2"].map((c) => ({ furnace_id: furnaces[1].id, profile_id: profileIds[c] })),
      ])
      .execute();
    // A furnace cools no faster than it can: the cycle uses the slower of the two rates.
    const cycleOn = (code: string, furnaceIdx: number) =>
      Math.ceil(furnaceCycle(profileOf(MATERIALS.find((x) => x.code === code)!), { maxCoolRateCPerMin: furnaceIdx === 0 ? 8 : 10 }).totalMinutes);

    await trx
      .insertInto("maintenance_windows")
      .values([
        { resource: "printer", printer_id: printers[1].id, starts_at: at(50), ends_at: at(56), reason: "Nozzle and extruder service" },
        { resource: "printer", printer_id: printers[3].id, starts_at: at(100), ends_at: at(108), reason: "Build-plate levelling and belt check" },
        { resource: "furnace", furnace_id: furnaces[0].id, starts_at: at(72), ends_at: at(84), reason: "Thermocouple calibration" },
        { resource: "wash_station", wash_station_id: washes[1].id, starts_at: at(30), ends_at: at(34), reason: "Solvent change and filter" },
      ])
      .execute();

    // Orders, parts, units -------------------------------------------------------------------------
    const customers = ["Halvorsen Marine", "Oakridge Pumps", "Vantablade Cutlery", "Corvid Robotics", "Łódź Präzision", "Жуков Гидравлика", "internal: fixture rebuild", "Brightwater Valves"];
    const partNames = ["impeller hub", "manifold block", "gripper jaw", "bearing carrier", "nozzle insert", "pump bracket", "cam follower", "sensor housing", "drive dog", "valve seat", "ejector plate", "knife bolster", "spacer ring", "clamp arm"];
    type PartRow = { id: string; code: string; material: string; qty: number; green: [number, number, number]; mass: number; wall: number; orderDue: Date };
    const parts: PartRow[] = [];
    let partCount = 0;
    const orderCount = 15;
    for (let i = 0; i < orderCount; i++) {
      const due = at(-24 + i * 30 + Math.floor(rand() * 48));
      const order = await trx
        .insertInto("orders")
        .values({ code: `WO-${2401 + i}`, customer: customers[i % customers.length], project: i % 4 === 0 ? "Q1 replenishment" : "", due_at: due, priority: 1 + (i % 5), notes: "" })
        .returning(["id", "code", "due_at"])
        .executeTakeFirstOrThrow();
      const nParts = i < 10 ? 3 : 2;
      for (let j = 0; j < nParts && partCount < 40; j++, partCount++) {
        const mat = MATERIALS[(i + j) % MATERIALS.length];
        const nominal: [number, number, number] = [round(25 + rand() * 90, 1), round(20 + rand() * 60, 1), round(10 + rand() * 50, 1)];
        const stock = round(0.2 + rand() * 0.3, 2);
        const sXY = shrinkXY(mat);
        const sZ = sXY + mat.zExtra;
        const green: [number, number, number] = [
          round((nominal[0] + 2 * stock) / (1 - sXY), 2),
          round((nominal[1] + 2 * stock) / (1 - sXY), 2),
          round((nominal[2] + stock) / (1 - sZ), 2),
        ];
        const volume = round(nominal[0] * nominal[1] * nominal[2] * (0.35 + rand() * 0.3), 0);
        const wall = round(3 + rand() * 7, 1);
        const qty = 1 + Math.floor(rand() * 3);
        const partNumber = `KS-${1000 + partCount * 7}`;
        const part = await trx
          .insertInto("parts")
          .values({
            order_id: order.id, part_number: partNumber, revision: pick(["A", "A", "B", "C"]), name: partNames[partCount % partNames.length],
            material_id: materialIds[mat.code], quantity: qty,
            nominal_x_mm: nominal[0], nominal_y_mm: nominal[1], nominal_z_mm: nominal[2], volume_mm3: volume, thickest_wall_mm: wall,
            stock_x_neg_mm: stock, stock_x_pos_mm: stock, stock_y_neg_mm: stock, stock_y_pos_mm: stock, stock_z_neg_mm: 0, stock_z_pos_mm: stock,
            finishing_notes: pick(["Grind bore to size; deburr all edges.", "Face datum A, ream Ø8 holes.", "Lap sealing face; no tooling marks.", "Turn OD to drawing, break sharp corners."]),
            target_ra_um: pick([0.4, 0.8, 1.6, 3.2]),
            tolerance_grade: pick(["IT6", "IT7", "IT8", null]),
            tolerance_um: null,
            green_x_mm: green[0], green_y_mm: green[1], green_z_mm: green[2],
            scale_factors: JSON.stringify({ xy: round(1 / (1 - sXY), 5), z: round(1 / (1 - sZ), 5), shrink_xy: round(sXY, 4), shrink_z: round(sZ, 4) }),
            scaled_at: now,
          })
          .returning("id")
          .executeTakeFirstOrThrow();
        // green mass = finished volume scaled up × green density
        const greenVolCm3 = (volume * (green[0] / nominal[0]) * (green[1] / nominal[1]) * (green[2] / nominal[2])) / 1000;
        parts.push({ id: part.id, code: `${order.code}-${partNumber}`, material: mat.code, qty, green, mass: round(greenVolCm3 * greenDensityOf(mat), 1), wall, orderDue: order.due_at });
      }
    }

    // Units move along in stages. Parts of one material at one stage share their bookings, and
    // each chain is laid backwards in time (furnace, then wash, then print) so it is consistent.
    type Stage = "planned" | "printing" | "green" | "washing" | "brown" | "sintering" | "sintered" | "ready_for_finishing" | "finishing" | "done" | "on_hold" | "scrapped";
    const stageOrder: Stage[] = ["planned", "printing", "green", "washing", "brown", "sintering", "sintered", "ready_for_finishing", "finishing", "done"];
    const stages: Stage[] = ["done", "finishing", "ready_for_finishing", "sintered", "sintering", "brown", "brown", "washing", "green", "printing", "planned", "planned", "on_hold", "scrapped", "brown", "done", "ready_for_finishing", "green", "planned", "printing"];
    const printerFor: Record<string, number> = { "17-4PH": 0, "316L": 1, H13: 2, A2: 3 };
    const printerRate = (code: string) => printerSpecs[printerFor[code]].rate;
    const furnaceFor = (code: string, running: Set<number>) => {
      const options = code === "A2" ? [1] : [1, 0];
      return options.find((f) => !running.has(f));
    };
    const depthOf = (st: Stage) => stageOrder.indexOf(st === "on_hold" ? "brown" : st === "scrapped" ? "sintered" : st);
    const hours = (d: Date) => (d.getTime() - t0.getTime()) / HOUR;

    const groups = new Map<string, { stage: Stage; material: string; parts: PartRow[] }>();
    parts.forEach((part, i) => {
      const stage = stages[i % stages.length];
      const key = `${stage}|${part.material}`;
      if (!groups.has(key)) groups.set(key, { stage, material: part.material, parts: [] });
      groups.get(key)!.parts.push(part);
    });
    const ordered = [...groups.values()].sort((a, b) => depthOf(a.stage) - depthOf(b.stage));

    const cursor = new Map<string, number>(); // resource → earliest booked hour so far
    const placeBack = (key: string, minutes: number, latestEndH: number) => {
      const endH = Math.floor(Math.min(cursor.get(key) ?? 0, latestEndH));
      const startH = endH - Math.ceil(minutes / 60);
      cursor.set(key, startH - 1);
      return { start: at(startH), end: at(endH) };
    };
    const runningFurnaces = new Set<number>();
    const runningPrinters = new Set<number>();
    const runningWashes = new Set<number>();
    let buildSeq = 100;
    let washSeq = 300;
    let runSeq = 500;
    let unitCount = 0;
    const eventsRows: { entity: string; entity_id: string; kind: string; from_state: string | null; to_state: string; actor_id: string | null; reason: string | null; created_at: Date }[] = [];
    const greenDensity = (code: string) => greenDensityOf(MATERIALS.find((x) => x.code === code)!);

    for (const group of ordered) {
      let stage = group.stage;
      const code = group.material;
      const pIdx = printerFor[code];
      const printerId = printers[pIdx].id;
      const greenCm3 = group.parts.reduce((v, p) => v + (p.mass / greenDensity(code)) * p.qty, 0);
      const tallest = Math.max(...group.parts.map((p) => p.green[2]));
      const printMin = Math.round((greenCm3 / printerRate(code)) * 60 + ((tallest / 0.15) * 8) / 60);
      const washMin = Math.round(Math.max(...group.parts.map((p) => washMinutes({ thickestWallMm: p.wall, kMinPerMm2: WASH_K, minMinutes: WASH_MIN }))));
      let depth = depthOf(stage);

      let furnaceIdx: number | undefined;
      if (depth === 5) {
        furnaceIdx = furnaceFor(code, runningFurnaces);
        if (furnaceIdx === undefined) {
          stage = "brown"; // both kilns are busy: these wait for the next run
          depth = 4;
        } else runningFurnaces.add(furnaceIdx);
      }
      let washIdx = depth % 2;
      if (depth === 3) {
        const free = [0, 1].find((w) => !runningWashes.has(w));
        if (free === undefined) {
          stage = "green";
          depth = 2;
        } else {
          washIdx = free;
          runningWashes.add(free);
        }
      }
      if (depth === 1 && runningPrinters.has(pIdx)) {
        stage = "planned";
        depth = 0;
      }

      let runId: string | null = null;
      let run: { start: Date; end: Date } | null = null;
      if (depth >= 5) {
        const fi = furnaceIdx ?? (code === "A2" ? 1 : depth % 2);
        const cyc = cycleOn(code, fi);
        if (depth === 5) {
          const startH = -Math.round(cyc / 120);
          run = { start: at(startH), end: new Date(at(startH).getTime() + cyc * MIN) };
          cursor.set(`f${fi}`, Math.min(cursor.get(`f${fi}`) ?? 0, startH - 1));
        } else {
          run = placeBack(`f${fi}`, cyc, depth === 6 ? -1 : -8);
          run.end = new Date(run.start.getTime() + cyc * MIN);
        }
        const state = depth === 5 ? "running" : "complete";
        const r = await trx
          .insertInto("furnace_runs")
          .values({
            code: `R-${runSeq++}`, furnace_id: furnaces[fi].id, profile_id: profileIds[code], state, starts_at: run.start, ends_at: run.end, cycle_minutes: cyc,
            loaded_at: run.start, unloaded_at: state === "complete" ? run.end : null, created_by: userId("furnace_operator"),
            checklist: JSON.stringify({ purge_confirmed: true, setters_checked: true, thermocouples_ok: true, load_within_limit: true }),
          })
          .returning("id")
          .executeTakeFirstOrThrow();
        runId = r.id;
      }

      let washId: string | null = null;
      let wash: { start: Date; end: Date } | null = null;
      if (depth >= 3) {
        const wi = washIdx;
        if (depth === 3) {
          wash = { start: at(-1), end: new Date(at(-1).getTime() + washMin * MIN) };
          cursor.set(`w${wi}`, Math.min(cursor.get(`w${wi}`) ?? 0, -2));
        } else {
          const latest = run ? hours(run.start) - 3 : -4; // drying before the furnace
          wash = placeBack(`w${wi}`, washMin, latest);
        }
        const w = await trx
          .insertInto("wash_batches")
          .values({ code: `W-${washSeq++}`, wash_station_id: washes[wi].id, state: depth === 3 ? "running" : "complete", starts_at: wash.start, ends_at: wash.end, est_minutes: washMin, created_by: userId("technician") })
          .returning("id")
          .executeTakeFirstOrThrow();
        washId = w.id;
      }

      let buildId: string | null = null;
      if (depth >= 1 || group.parts.length > 0) {
        let state: "draft" | "scheduled" | "running" | "complete" = depth === 0 ? "draft" : depth === 1 ? "running" : "complete";
        let slot: { start: Date; end: Date } | null = null;
        if (depth === 1) {
          const startH = -Math.round(printMin / 150);
          slot = { start: at(startH), end: new Date(at(startH).getTime() + printMin * MIN) };
          cursor.set(`p${pIdx}`, Math.min(cursor.get(`p${pIdx}`) ?? 0, startH - 1));
          runningPrinters.add(pIdx);
        } else if (depth >= 2) {
          const latest = wash ? hours(wash.start) - 1 : -1;
          slot = placeBack(`p${pIdx}`, printMin, latest);
          slot.end = new Date(slot.start.getTime() + printMin * MIN);
        } else if (code === "H13") {
          state = "scheduled"; // one planned build already has its slot on the floor
          slot = { start: at(30), end: new Date(at(30).getTime() + printMin * MIN) };
        }
        const b = await trx
          .insertInto("builds")
          .values({
            code: `B-${buildSeq++}`, material_id: materialIds[code], printer_id: slot ? printerId : null,
            material_lot: `${code.replace(/[^A-Z0-9]/g, "")}-L${20 + (buildSeq % 7)}`, state, starts_at: slot?.start ?? null, ends_at: slot?.end ?? null,
            est_minutes: printMin, created_by: userId("technician"),
          })
          .returning("id")
          .executeTakeFirstOrThrow();
        buildId = b.id;
      }

      const m = MATERIALS.find((x) => x.code === code)!;
      const sXY = shrinkXY(m);
      for (const part of group.parts) {
        for (let k = 0; k < part.qty; k++) {
          unitCount++;
          const serial = `${part.code}-${String(k + 1).padStart(2, "0")}`;
          const brown = depth >= 4 ? round(part.mass * (1 - 0.045 - rand() * 0.02), 1) : null;
          const unit = await trx
            .insertInto("units")
            .values({
              part_id: part.id, serial, state: stage,
              held_from: stage === "on_hold" ? "brown" : null,
              hold_reason: stage === "on_hold" ? "Mass loss below the material's minimum after wash; re-wash pending" : null,
              scrap_reason: stage === "scrapped" ? pick(["crack", "slump", "warp"] as const) : null,
              scrap_note: stage === "scrapped" ? "Found at unload" : null,
              build_id: buildId, wash_batch_id: washId, furnace_run_id: runId,
              green_mass_g: depth >= 2 ? part.mass : null,
              brown_mass_g: depth >= 4 ? (stage === "on_hold" ? round(part.mass * 0.985, 1) : brown) : null,
              sintered_mass_g: depth >= 6 && brown ? round(brown * 0.985, 1) : null,
              wash_passed: depth >= 4 ? stage !== "on_hold" : null,
              state_changed_at: run && depth >= 6 ? run.end : now,
            })
            .returning("id")
            .executeTakeFirstOrThrow();
          let from: string | null = null;
          for (let s = 0; s <= depth; s++) {
            eventsRows.push({ entity: "unit", entity_id: unit.id, kind: "state", from_state: from, to_state: stageOrder[s], actor_id: s === 0 ? userId("technician") : null, reason: s === 0 ? "created from order" : null, created_at: new Date(now.getTime() - (depth - s + 1) * 6 * HOUR) });
            from = stageOrder[s];
          }
          if (stage === "on_hold" || stage === "scrapped") {
            eventsRows.push({ entity: "unit", entity_id: unit.id, kind: "state", from_state: from, to_state: stage, actor_id: userId(stage === "scrapped" ? "furnace_operator" : "technician"), reason: stage === "scrapped" ? "defect found at unload" : "mass loss below minimum", created_at: now });
          }
          // Finished units carry inspections with green and sintered sizes for calibration.
          if (depth >= 8) {
            const jitter = () => (rand() - 0.5) * 0.006;
            await trx
              .insertInto("inspections")
              .values({
                unit_id: unit.id, inspector_id: userId("machinist"),
                green_x_mm: part.green[0], green_y_mm: part.green[1], green_z_mm: part.green[2],
                sintered_x_mm: round(part.green[0] * (1 - sXY - jitter()), 3), sintered_y_mm: round(part.green[1] * (1 - sXY - jitter()), 3),
                sintered_z_mm: round(part.green[2] * (1 - sXY - m.zExtra - jitter()), 3),
                ra_um: depth === 9 ? 0.7 : null, runout_mm: 0.04, passed: true, created_at: new Date(now.getTime() - (10 - depth) * DAY - unitCount * HOUR),
              })
              .execute();
          }
        }
      }
    }
    if (eventsRows.length) await trx.insertInto("events").values(eventsRows).execute();
    await seedFeedstock(trx, { now, materialIds, userId: userId("technician") });
    return { units: unitCount, orders: orderCount };
  });
}

/**
 * The demo shop's shelf (invented suppliers and lots): a released lot per material with plenty
 * left, a second lot in quarantine, an A2 lot close to expiry, and the draws of the builds the
 * seed already started, so genealogy and the projection have something to show.
 */
async function seedFeedstock(trx: Transaction<DB>, ctx: { now: Date; materialIds: Record<string, string>; userId: string }) {
  const forms = await trx
    .insertInto("feedstock_forms")
    .values(["spool 1 kg", "spool 3 kg", "rod cartridge", "pellets 5 kg bag"].map((name) => ({ name })))
    .returning(["id", "name"])
    .execute();
  const form = (name: string) => forms.find((f) => f.name === name)!.id;
  const day = (offset: number) => new Date(ctx.now.getTime() + offset * DAY).toISOString().slice(0, 10);
  const lots: Array<{ mat: string; supplier: string; lot: string; form: string; received: number; expires: number | null; kg: number; state: "released" | "quarantine" }> = [
    { mat: "17-4PH", supplier: "Northgate Powders", lot: "NG-174-2611-A", form: "spool 3 kg", received: -40, expires: 320, kg: 30, state: "released" },
    { mat: "17-4PH", supplier: "Northgate Powders", lot: "NG-174-2612-B", form: "spool 3 kg", received: -2, expires: 360, kg: 18, state: "quarantine" },
    { mat: "316L", supplier: "Calder Feedstock Co.", lot: "CF-316-0921", form: "rod cartridge", received: -55, expires: 250, kg: 24, state: "released" },
    { mat: "H13", supplier: "Northgate Powders", lot: "NG-H13-2610", form: "spool 1 kg", received: -70, expires: 200, kg: 12, state: "released" },
    { mat: "A2", supplier: "Ostrava Binder Works", lot: "OBW-A2-118", form: "pellets 5 kg bag", received: -150, expires: 12, kg: 10, state: "released" },
  ];
  // the released lots were received with what the started builds drew plus what is left now
  const started = await trx.selectFrom("builds").select(["id", "material_id"]).where("state", "in", ["running", "complete"]).where("failed", "=", false).execute();
  const estimates = await estimateBuildDraws(trx, { buildIds: started.map((b) => b.id) });
  const drawnOf = (mat: string) => started.filter((b) => b.material_id === ctx.materialIds[mat]).reduce((sum, b) => sum + (estimates.get(b.id)?.total_g ?? 0), 0);
  const rows: Array<{ id: string; material_id: string; state: string }> = [];
  for (const [i, l] of lots.entries()) {
    const drawn = l.state === "released" ? Math.round(drawnOf(l.mat) * 10) / 10 : 0;
    rows.push(
      await trx
        .insertInto("feedstock_lots")
        .values({
          code: `FL-${String(i + 1).padStart(5, "0")}`, material_id: ctx.materialIds[l.mat], supplier: l.supplier, supplier_lot: l.lot, form_id: form(l.form),
          received_on: day(l.received), expires_on: l.expires === null ? null : day(l.expires), quantity_g: l.kg * 1000 + drawn, remaining_g: l.kg * 1000, state: l.state,
          storage_notes: l.form.startsWith("pellets") ? "Sealed bag with desiccant, dry cabinet 2" : "Dry cabinet 1, keep sealed between builds", created_by: ctx.userId,
        })
        .returning(["id", "material_id", "state"])
        .executeTakeFirstOrThrow(),
    );
  }
  await sql`select setval('feedstock_lot_code_seq', ${lots.length})`.execute(trx);
  for (const b of started) {
    const lot = rows.find((r) => r.material_id === b.material_id && r.state === "released");
    const est = estimates.get(b.id);
    if (!lot || !est) continue;
    await trx.insertInto("feedstock_draws").values({ lot_id: lot.id, build_id: b.id, estimated_g: est.total_g, drawn_g: est.total_g, created_by: ctx.userId }).execute();
    await trx.updateTable("builds").set({ feedstock_lot_id: lot.id }).where("id", "=", b.id).execute();
  }
  // the baths were last changed a fortnight ago, so the washes since show on the gauges
  await trx.updateTable("wash_stations").set({ bath_changed_at: new Date(ctx.now.getTime() - 14 * DAY), bath_binder_limit_g: 1500 }).execute();
  await trx
    .insertInto("gas_supplies")
    .values([
      { gas: "argon-hydrogen mix", on_hand_l: 60_000, note: "6 cylinders of 10 000 L", counted_by: ctx.userId },
      { gas: "hydrogen", on_hand_l: 9_000, note: "1 bundle, gauge reading", counted_by: ctx.userId },
      { gas: "argon", on_hand_l: 40_000, note: "4 cylinders", counted_by: ctx.userId },
      { gas: "nitrogen", on_hand_l: 100_000, note: "liquid tank, gauge reading", counted_by: ctx.userId },
    ])
    .execute();
}
