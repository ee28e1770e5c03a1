import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { sql } from "kysely";
import { createDb, type Database } from "@/db/client";
import { migrateToLatest, currentMigration } from "@/db/migrate";
import { scratchDatabase } from "../helpers/db";

describe("migrations on a fresh database", () => {
  let db: Database;
  let drop: () => Promise<void>;

  beforeAll(async () => {
    const scratch = await scratchDatabase("migrate");
    drop = scratch.drop;
    db = createDb(scratch.url, 2).db;
    await migrateToLatest(db);
  });
  afterAll(async () => {
    await db?.destroy();
    await drop?.();
  });

  it("reaches the latest migration and a second run applies nothing", async () => {
    const level = await currentMigration(db);
    expect(level.pending).toBe(0);
    expect(level.applied).toMatch(/^\d{12}_/);
    const again = await migrateToLatest(db);
    expect(again.results).toEqual([]);
  });

  async function printer(name: string) {
    const material = await db
      .insertInto("materials")
      .values({ code: `M-${name}`, name, alloy_family: "test", shrink_xy: 0.15, shrink_z: 0.17, green_density_g_cm3: 5, sintered_density_g_cm3: 7.6, theoretical_density_g_cm3: 7.8, solids_loading: 0.6, wash_k_min_per_mm2: 30, min_mass_loss: 0.03 })
      .returning("id")
      .executeTakeFirstOrThrow();
    const p = await db
      .insertInto("printers")
      .values({ name, build_x_mm: 300, build_y_mm: 200, build_z_mm: 180, deposition_cm3_per_h: 20 })
      .returning("id")
      .executeTakeFirstOrThrow();
    return { printerId: p.id, materialId: material.id };
  }

  const book = (ids: { printerId: string; materialId: string }, code: string, start: string, end: string) =>
    db.insertInto("builds").values({ code, material_id: ids.materialId, printer_id: ids.printerId, state: "scheduled", starts_at: new Date(start), ends_at: new Date(end) }).execute();

  it("the exclusion constraint rejects an overlapping booking and accepts a touching one", async () => {
    const ids = await printer("P-overlap");
    await book(ids, "B1", "2027-01-04T06:00:00Z", "2027-01-04T12:00:00Z");
    // touching ranges [start, end) share no instant
    await expect(book(ids, "B2", "2027-01-04T12:00:00Z", "2027-01-04T18:00:00Z")).resolves.toBeDefined();
    await expect(book(ids, "B3", "2027-01-04T11:00:00Z", "2027-01-04T13:00:00Z")).rejects.toMatchObject({ code: "23P01" });
    // a cancelled build does not hold its slot
    await db.updateTable("builds").set({ state: "cancelled" }).where("code", "=", "B2").execute();
    await expect(book(ids, "B4", "2027-01-04T13:00:00Z", "2027-01-04T15:00:00Z")).resolves.toBeDefined();
  });

  it("another printer may run at the same time", async () => {
    const ids = await printer("P-other");
    await expect(book(ids, "B5", "2027-01-04T06:00:00Z", "2027-01-04T12:00:00Z")).resolves.toBeDefined();
  });

  it("CHECK constraints encode the domain", async () => {
    const bad = (values: Record<string, unknown>) =>
      db
        .insertInto("materials")
        .values({ code: `X${Math.random()}`, name: "x", alloy_family: "x", shrink_xy: 0.15, shrink_z: 0.17, green_density_g_cm3: 5, sintered_density_g_cm3: 7.6, theoretical_density_g_cm3: 7.8, solids_loading: 0.6, wash_k_min_per_mm2: 30, min_mass_loss: 0.03, ...values })
        .execute();
    await expect(bad({ shrink_xy: 0.5 })).rejects.toMatchObject({ code: "23514" });
    await expect(bad({ shrink_z: 0 })).rejects.toMatchObject({ code: "23514" });
    await expect(bad({ sintered_density_g_cm3: -1 })).rejects.toMatchObject({ code: "23514" });
    const ids = await printer("P-check");
    await expect(book(ids, "B6", "2027-01-04T12:00:00Z", "2027-01-04T12:00:00Z")).rejects.toMatchObject({ code: "23514" });
    await expect(sql`insert into units (part_id, serial, state) values (gen_random_uuid(), 'u', 'melted')`.execute(db)).rejects.toMatchObject({ code: "22P02" });
  });
});
