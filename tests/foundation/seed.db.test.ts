import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { sql } from "kysely";
import { createDb, type Database } from "@/db/client";
import { migrateToLatest } from "@/db/migrate";
import { DEMO_USERS, isEmpty, seedDemoShop } from "@/db/seed";
import { ROLES } from "@/lib/auth/permissions";
import { scratchDatabase } from "../helpers/db";

const UNIT_STATES = ["planned", "printing", "green", "washing", "brown", "sintering", "sintered", "ready_for_finishing", "finishing", "done", "on_hold", "scrapped"];

describe("demo shop seed", () => {
  let db: Database;
  let drop: () => Promise<void>;

  beforeAll(async () => {
    const scratch = await scratchDatabase("seed");
    drop = scratch.drop;
    db = createDb(scratch.url, 2).db;
    await migrateToLatest(db);
    expect(await isEmpty(db)).toBe(true);
    await seedDemoShop(db);
  });
  afterAll(async () => {
    await db?.destroy();
    await drop?.();
  });

  it("puts units in every state", async () => {
    const rows = await db.selectFrom("units").select("state").distinct().execute();
    expect(rows.map((r) => r.state).sort()).toEqual([...UNIT_STATES].sort());
  });

  it("has the equipment, materials, orders and one user per role", async () => {
    const count = async (table: "printers" | "wash_stations" | "furnaces" | "materials" | "orders" | "parts" | "sinter_profiles" | "maintenance_windows") =>
      Number((await db.selectFrom(table).select((eb) => eb.fn.countAll<number>().as("n")).executeTakeFirstOrThrow()).n);
    expect(await count("printers")).toBe(4);
    expect(await count("wash_stations")).toBe(2);
    expect(await count("furnaces")).toBe(2);
    expect(await count("materials")).toBe(4);
    expect(await count("sinter_profiles")).toBe(4);
    expect(await count("orders")).toBe(15);
    expect(await count("parts")).toBe(40);
    expect(await count("maintenance_windows")).toBeGreaterThan(0);
    const roles = (await db.selectFrom("users").select("role").execute()).map((r) => r.role).sort();
    expect(roles).toEqual([...ROLES].sort());
    expect(DEMO_USERS).toHaveLength(ROLES.length);
  });

  it("leaves every foreign key valid", async () => {
    // Re-validate each FK constraint: PostgreSQL re-checks every row when a constraint is validated.
    const fks = await sql<{ table: string; name: string }>`
      select conrelid::regclass::text as table, conname as name from pg_constraint where contype = 'f' and connamespace = 'public'::regnamespace`.execute(db);
    expect(fks.rows.length).toBeGreaterThan(20);
    for (const fk of fks.rows) {
      const def = await defOf(fk.name);
      // re-adding the constraint makes PostgreSQL check every existing row against it
      await sql.raw(`alter table ${fk.table} drop constraint "${fk.name}", add constraint "${fk.name}" ${def}`).execute(db);
    }
  });

  async function defOf(name: string): Promise<string> {
    const r = await sql<{ def: string }>`select pg_get_constraintdef(oid) as def from pg_constraint where conname = ${name} limit 1`.execute(db);
    return r.rows[0].def;
  }

  it("keeps seeded shrinkage inside the published 12–21 % range (REFERENCES: MIM industry guides)", async () => {
    const mats = await db.selectFrom("materials").select(["code", "shrink_xy", "shrink_z"]).execute();
    for (const m of mats) {
      expect(m.shrink_xy).toBeGreaterThan(0.12);
      expect(m.shrink_z).toBeLessThan(0.21);
    }
  });

  it("chains each finished unit's bookings in time: print, then wash, then furnace", async () => {
    const rows = await db
      .selectFrom("units")
      .innerJoin("builds", "builds.id", "units.build_id")
      .innerJoin("wash_batches", "wash_batches.id", "units.wash_batch_id")
      .innerJoin("furnace_runs", "furnace_runs.id", "units.furnace_run_id")
      .select(["builds.ends_at as build_end", "wash_batches.starts_at as wash_start", "wash_batches.ends_at as wash_end", "furnace_runs.starts_at as run_start"])
      .execute();
    expect(rows.length).toBeGreaterThan(5);
    for (const r of rows) {
      expect(r.build_end!.getTime()).toBeLessThanOrEqual(r.wash_start!.getTime());
      expect(r.wash_end!.getTime()).toBeLessThanOrEqual(r.run_start!.getTime());
    }
  });
});
