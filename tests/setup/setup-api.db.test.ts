import { beforeAll, describe, expect, it } from "vitest";
import { testDb } from "../helpers/db";
import { DEMO, api, signIn } from "../helpers/session";

describe("set-up API: equipment, materials, maintenance, settings", () => {
  let admin: string;
  let technician: string;
  const tag = Date.now().toString(36);

  beforeAll(async () => {
    admin = await signIn(DEMO.admin);
    technician = await signIn(DEMO.technician);
  });

  it("adds a printer, then refuses a stale edit with 409 and keeps the newer values", async () => {
    const materials = (await api("/api/materials", { cookie: admin })).body.materials as { id: string; code: string }[];
    const created = await api("/api/printers", {
      method: "POST",
      cookie: admin,
      body: { name: `Test printer ${tag}`, build_x_mm: 200, build_y_mm: 150, build_z_mm: 120, deposition_cm3_per_h: 12, layer_height_mm: 0.2, layer_overhead_s: 6, material_ids: [materials[0].id] },
    });
    expect(created.status).toBe(201);
    const printer = created.body.printer;
    const first = await api(`/api/printers/${printer.id}`, { method: "PATCH", cookie: admin, body: { version: printer.version, deposition_cm3_per_h: 14 } });
    expect(first.status).toBe(200);
    expect(first.body.printer.version).toBe(printer.version + 1);
    const stale = await api(`/api/printers/${printer.id}`, { method: "PATCH", cookie: admin, body: { version: printer.version, deposition_cm3_per_h: 99 } });
    expect(stale.status).toBe(409);
    expect(stale.body.error.message).toMatch(/changed by someone else/);
    const list = (await api("/api/printers", { cookie: technician })).body.printers as { id: string; deposition_cm3_per_h: number; materials: { code: string }[] }[];
    const row = list.find((p) => p.id === printer.id)!;
    expect(row.deposition_cm3_per_h).toBe(14);
    expect(row.materials.map((m) => m.code)).toEqual([materials[0].code]);
  });

  it("answers bad input with 400 or 422 and the field that is wrong", async () => {
    const notJson = await api("/api/printers", { method: "POST", cookie: admin, body: "{not json", headers: { "content-type": "application/json" } });
    expect(notJson.status).toBe(400);
    const bad = await api("/api/printers", { method: "POST", cookie: admin, body: { name: "", build_x_mm: -5, build_y_mm: "wide", build_z_mm: 100, deposition_cm3_per_h: 10, layer_height_mm: 0.2, layer_overhead_s: 5 } });
    expect(bad.status).toBe(422);
    expect(Object.keys(bad.body.error.fieldErrors)).toEqual(expect.arrayContaining(["name", "build_x_mm", "build_y_mm"]));
    const shrink = await api("/api/materials", {
      method: "POST",
      cookie: admin,
      body: { code: `T${tag}`, name: "t", alloy_family: "t", shrink_xy: 0.5, shrink_z: 0.17, green_density_g_cm3: 5, sintered_density_g_cm3: 7.6, theoretical_density_g_cm3: 7.8, solids_loading: 0.6, binder_density_g_cm3: 0.95, wash_k_min_per_mm2: 30, wash_min_minutes: 60, min_mass_loss: 0.03 },
    });
    expect(shrink.status).toBe(422);
    expect(shrink.body.error.fieldErrors.shrink_xy[0]).toMatch(/below 0.5/);
    const badId = await api("/api/printers/not-a-uuid", { method: "PATCH", cookie: admin, body: { version: 1 } });
    expect(badId.status).toBe(404); // an id that is not a uuid names nothing
  });

  it("lets only an admin change the set-up", async () => {
    const res = await api("/api/wash-stations", { method: "POST", cookie: technician, body: { name: "x", solvent: "x", basket_x_mm: 1, basket_y_mm: 1, basket_z_mm: 1, capacity_units: 1, max_load_g: 1 } });
    expect(res.status).toBe(403);
    const signedOut = await api("/api/furnaces");
    expect(signedOut.status).toBe(401);
  });

  it("blocks maintenance windows and refuses one that ends before it starts", async () => {
    const printers = (await api("/api/printers", { cookie: admin })).body.printers as { id: string }[];
    const backwards = await api("/api/maintenance-windows", { method: "POST", cookie: admin, body: { resource: "printer", resource_id: printers[0].id, starts_at: "2027-03-02T10:00:00Z", ends_at: "2027-03-02T08:00:00Z" } });
    expect(backwards.status).toBe(422);
    expect(backwards.body.error.fieldErrors.ends_at).toBeDefined();
    const ok = await api("/api/maintenance-windows", { method: "POST", cookie: admin, body: { resource: "printer", resource_id: printers[0].id, starts_at: "2027-03-02T08:00:00Z", ends_at: "2027-03-02T10:00:00Z", reason: "belt" } });
    expect(ok.status).toBe(201);
    const listed = await api("/api/maintenance-windows?from=2027-03-01T00:00:00Z&to=2027-03-03T00:00:00Z", { cookie: technician });
    expect(listed.body.maintenance_windows.map((w: { id: string }) => w.id)).toContain(ok.body.maintenance_window.id);
    const gone = await api(`/api/maintenance-windows/${ok.body.maintenance_window.id}`, { method: "DELETE", cookie: admin });
    expect(gone.status).toBe(200);
    const again = await api(`/api/maintenance-windows/${ok.body.maintenance_window.id}`, { method: "DELETE", cookie: admin });
    expect(again.status).toBe(404);
  });

  it("validates the shop's time zone and shifts", async () => {
    const { settings } = (await api("/api/shop-settings", { cookie: admin })).body;
    const bad = await api("/api/shop-settings", { method: "PUT", cookie: admin, body: { ...settings, time_zone: "Mars/Olympus", staffed_hours: [{ day: 1, start: "22:00", end: "22:00" }, { day: 2, start: "22:00", end: "06:00" }] } });
    expect(bad.status).toBe(422);
    expect(bad.body.error.fieldErrors.time_zone).toBeDefined();
    expect(bad.body.error.fieldErrors["staffed_hours.0"]).toBeDefined();
    // a night shift runs past midnight and is accepted
    expect(bad.body.error.fieldErrors["staffed_hours.1"]).toBeUndefined();
    const stale = await api("/api/shop-settings", { method: "PUT", cookie: admin, body: { ...settings, version: settings.version + 5 } });
    expect(stale.status).toBe(409);
  });
});

describe("a material's shrinkage change", () => {
  it("is logged as an event and leaves the other fields as they were", async () => {
    const admin = await signIn(DEMO.admin);
    const tag = `M${Date.now().toString(36)}`.slice(0, 12);
    const created = await api("/api/materials", {
      method: "POST",
      cookie: admin,
      body: { code: tag, name: "Test alloy", alloy_family: "test", shrink_xy: 0.15, shrink_z: 0.17, green_density_g_cm3: 5, sintered_density_g_cm3: 7.6, theoretical_density_g_cm3: 7.8, solids_loading: 0.6, binder_density_g_cm3: 0.95, wash_k_min_per_mm2: 30, wash_min_minutes: 60, min_mass_loss: 0.03 },
    });
    expect(created.status).toBe(201);
    const m = created.body.material;
    const changed = await api(`/api/materials/${m.id}`, { method: "PATCH", cookie: admin, body: { version: m.version, shrink_xy: 0.155 } });
    expect(changed.status).toBe(200);
    expect(changed.body.material.shrink_xy).toBe(0.155);
    expect(changed.body.material.min_mass_loss).toBe(0.03);
    const { db, close } = testDb();
    try {
      const events = await db.selectFrom("events").select(["kind", "data"]).where("entity", "=", "material").where("entity_id", "=", m.id).execute();
      expect(events.map((e) => e.kind)).toEqual(["shrinkage_change"]);
    } finally {
      await close();
    }
  });
});
