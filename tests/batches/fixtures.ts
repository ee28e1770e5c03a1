import type { Database } from "@/db/client";

// Rows of their own for the batching tests: a furnace and a wash station nobody else books,
// and units written straight into the state a test needs, with unique names.

export const uniq = (prefix: string) => `${prefix}-${Date.now().toString(36)}${Math.floor(Math.random() * 1e6).toString(36)}`.toUpperCase();

export async function profileId(db: Database, code: string): Promise<string> {
  const p = await db.selectFrom("sinter_profiles").select("id").where("code", "=", code).where("retired", "=", false).orderBy("revision", "desc").executeTakeFirstOrThrow();
  return p.id;
}

export async function materialOf(db: Database, code: string) {
  return db.selectFrom("materials").select(["id", "default_profile_id", "min_mass_loss"]).where("code", "=", code).executeTakeFirstOrThrow();
}

export async function makeFurnace(
  db: Database,
  opts: { profiles: string[]; tray?: [number, number]; trays?: number; height?: number; load?: number; name?: string },
): Promise<{ id: string; name: string }> {
  const name = opts.name ?? uniq("Test kiln");
  const [x, y] = opts.tray ?? [300, 250];
  const row = await db
    .insertInto("furnaces")
    .values({ name, tray_x_mm: x, tray_y_mm: y, tray_count: opts.trays ?? 2, usable_height_mm: opts.height ?? 100, max_load_g: opts.load ?? 5000, max_cool_rate_c_per_min: 10 })
    .returning("id")
    .executeTakeFirstOrThrow();
  for (const p of opts.profiles) await db.insertInto("furnace_profiles").values({ furnace_id: row.id, profile_id: p }).execute();
  return { id: row.id, name };
}

export async function makeStation(db: Database, opts: { capacity?: number; load?: number; basket?: [number, number, number] } = {}) {
  const [x, y, z] = opts.basket ?? [300, 250, 150];
  const name = uniq("Test wash");
  const row = await db
    .insertInto("wash_stations")
    .values({ name, solvent: "test solvent", basket_x_mm: x, basket_y_mm: y, basket_z_mm: z, capacity_units: opts.capacity ?? 4, max_load_g: opts.load ?? 4000 })
    .returning("id")
    .executeTakeFirstOrThrow();
  return { id: row.id, name };
}

/** Takes test equipment out of use afterwards so it does not crowd other tests' boards and floors. */
export async function retireEquipment(db: Database, furnaces: string[], stations: string[]) {
  if (furnaces.length) await db.updateTable("furnaces").set({ active: false }).where("id", "in", furnaces).execute();
  if (stations.length) await db.updateTable("wash_stations").set({ active: false }).where("id", "in", stations).execute();
}

export type UnitSpec = {
  material: string;
  state: "green" | "brown" | "washing";
  count?: number;
  green: [number, number, number];
  mass_g: number;
  wall_mm?: number;
  due?: Date;
};

/** One order with one part of `count` units, in the state asked for. */
export async function makeUnits(db: Database, spec: UnitSpec): Promise<{ id: string; serial: string; version: number }[]> {
  const m = await materialOf(db, spec.material);
  const order = await db
    .insertInto("orders")
    .values({ code: uniq("T6"), customer: "Batching test", due_at: spec.due ?? new Date(Date.now() + 6 * 86_400_000), priority: 3 })
    .returning(["id", "code"])
    .executeTakeFirstOrThrow();
  const [gx, gy, gz] = spec.green;
  const part = await db
    .insertInto("parts")
    .values({
      order_id: order.id, part_number: uniq("P"), name: "test carrier", material_id: m.id, quantity: spec.count ?? 1,
      nominal_x_mm: gx * 0.85, nominal_y_mm: gy * 0.85, nominal_z_mm: gz * 0.85, thickest_wall_mm: spec.wall_mm ?? 3,
      green_x_mm: gx, green_y_mm: gy, green_z_mm: gz,
    })
    .returning("id")
    .executeTakeFirstOrThrow();
  const rows = [];
  for (let k = 0; k < (spec.count ?? 1); k++) {
    rows.push({
      part_id: part.id,
      serial: `${order.code}-${String(k + 1).padStart(2, "0")}`,
      state: spec.state,
      green_mass_g: spec.mass_g,
      brown_mass_g: spec.state === "brown" ? Math.round(spec.mass_g * 0.95 * 10) / 10 : null,
      wash_passed: spec.state === "brown" ? true : null,
    });
  }
  return db.insertInto("units").values(rows).returning(["id", "serial", "version"]).execute();
}

const ALWAYS = JSON.stringify([0, 1, 2, 3, 4, 5, 6].map((day) => ({ day, start: "00:00", end: "24:00" })));

/** Staffs the shop around the clock for a test file and gives back what was there. */
export async function staffAroundTheClock(db: Database): Promise<() => Promise<void>> {
  const before = await db.selectFrom("shop_settings").select(["staffed_hours"]).where("id", "=", 1).executeTakeFirstOrThrow();
  await db.updateTable("shop_settings").set({ staffed_hours: ALWAYS }).where("id", "=", 1).execute();
  return async () => {
    await db.updateTable("shop_settings").set({ staffed_hours: JSON.stringify(before.staffed_hours) }).where("id", "=", 1).execute();
  };
}

export async function setStaffedHours(db: Database, hours: unknown) {
  await db.updateTable("shop_settings").set({ staffed_hours: JSON.stringify(hours) }).where("id", "=", 1).execute();
}

/**
 * A sinter profile and a material of the test's own (a copy of an existing one), so that a
 * proposal filtered to that profile touches only the test's units and furnaces.
 */
export async function makeProfileAndMaterial(db: Database, like = "316L"): Promise<{ profile_id: string; material_code: string }> {
  const m = await db.selectFrom("materials").selectAll().where("code", "=", like).executeTakeFirstOrThrow();
  const src = await db.selectFrom("sinter_profiles").selectAll().where("id", "=", m.default_profile_id!).executeTakeFirstOrThrow();
  const code = uniq("TP6");
  const p = await db
    .insertInto("sinter_profiles")
    .values({ code, name: `${src.name} (test)`, atmosphere: src.atmosphere, start_temp_c: src.start_temp_c, cool_rate_c_per_min: src.cool_rate_c_per_min, cool_to_c: src.cool_to_c })
    .returning("id")
    .executeTakeFirstOrThrow();
  const segs = await db.selectFrom("sinter_profile_segments").selectAll().where("profile_id", "=", src.id).execute();
  await db.insertInto("sinter_profile_segments").values(segs.map((s) => ({ profile_id: p.id, position: s.position, rate_c_per_min: s.rate_c_per_min, setpoint_c: s.setpoint_c, hold_min: s.hold_min }))).execute();
  const { id: _id, created_at: _c, updated_at: _u, version: _v, ...rest } = m;
  void _id, void _c, void _u, void _v;
  const mat = await db.insertInto("materials").values({ ...rest, code: uniq("TM6"), name: `${m.name} (test)`, default_profile_id: p.id }).returning(["id", "code"]).executeTakeFirstOrThrow();
  await db.insertInto("sinter_profile_materials").values({ profile_id: p.id, material_id: mat.id }).execute();
  return { profile_id: p.id, material_code: mat.code };
}

/** Test materials leave the filters of other runs' boards afterwards. */
export async function retireMaterials(db: Database, codes: string[]) {
  if (codes.length) await db.updateTable("materials").set({ active: false }).where("code", "in", codes).execute();
}
