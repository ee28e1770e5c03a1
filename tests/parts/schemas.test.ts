import { describe, expect, it } from "vitest";
import { createOrderSchema, createPartSchema, csvRowSchema, listUnitsSchema } from "@/lib/parts/schemas";
import { scheduleBuildSchema } from "@/lib/builds/schemas";
import { floorWindowSchema } from "@/lib/floor/schemas";

// The schemas the forms and the API share: form strings and JSON numbers alike, blanks as
// "not given", and a reason on every refused field.

const part = {
  order_id: "6f0c1d8e-3b7a-4c2d-9e1f-0a1b2c3d4e5f", part_number: "KS-1", name: "hub", material_id: "1f0c1d8e-3b7a-4c2d-9e1f-0a1b2c3d4e5f",
  quantity: "2", nominal_x_mm: "30,5", nominal_y_mm: "20", nominal_z_mm: 10, thickest_wall_mm: "4",
};

describe("shared schemas", () => {
  it("takes form strings (with a decimal comma) and JSON numbers; blank optional fields become null", () => {
    const p = createPartSchema.parse({ ...part, target_ra_um: "", tolerance_grade: " it7 ", stock_x_neg_mm: "" });
    expect(p).toMatchObject({ quantity: 2, nominal_x_mm: 30.5, nominal_z_mm: 10, target_ra_um: null, tolerance_grade: "IT7", stock_x_neg_mm: 0, revision: "A" });
  });

  it("names each refused field with a reason", () => {
    const r = createPartSchema.safeParse({ ...part, quantity: "1.5", nominal_x_mm: "wide", thickest_wall_mm: "0", tolerance_grade: "IT20" });
    expect(r.success).toBe(false);
    const fields = new Set(r.error!.issues.map((i) => i.path.join(".")));
    expect(fields).toEqual(new Set(["quantity", "nominal_x_mm", "thickest_wall_mm", "tolerance_grade"]));
  });

  it("reads a calendar date as the end of that day, UTC, and refuses words", () => {
    expect(createOrderSchema.parse({ code: "WO-1", customer: "c", due_at: "2027-01-31" }).due_at.toISOString()).toBe("2027-01-31T23:59:00.000Z");
    expect(createOrderSchema.safeParse({ code: "WO-1", customer: "c", due_at: "next week" }).success).toBe(false);
  });

  it("CSV rows carry the material by code", () => {
    const r = csvRowSchema.parse({ order_code: "WO-1", customer: "c", due_date: "2027-01-31", part_number: "P", name: "n", material: "17-4PH", quantity: "1", nominal_x_mm: "1", nominal_y_mm: "1", nominal_z_mm: "1", thickest_wall_mm: "1" });
    expect(r.material).toBe("17-4PH");
    expect(r.priority).toBe(3);
  });

  it("list queries take only known sorts and reasonable pages", () => {
    expect(listUnitsSchema.parse({ unbuilt: "true", page: "2" })).toMatchObject({ unbuilt: true, page: 2, page_size: 25, sort: "due_at" });
    expect(listUnitsSchema.safeParse({ sort: "drop table" }).success).toBe(false);
    expect(listUnitsSchema.safeParse({ page_size: "5000" }).success).toBe(false);
  });

  it("a booking needs a start when it names a printer, and a floor window is at most 45 days", () => {
    expect(scheduleBuildSchema.safeParse({ version: 1, printer_id: "6f0c1d8e-3b7a-4c2d-9e1f-0a1b2c3d4e5f" }).success).toBe(false);
    expect(scheduleBuildSchema.safeParse({ version: 1, printer_id: null }).success).toBe(true);
    expect(floorWindowSchema.safeParse({ from: "2026-12-01T00:00:00Z", to: "2026-12-08T00:00:00Z" }).success).toBe(true);
    expect(floorWindowSchema.safeParse({ from: "2026-12-08T00:00:00Z", to: "2026-12-01T00:00:00Z" }).success).toBe(false);
    expect(floorWindowSchema.safeParse({ from: "2026-01-01T00:00:00Z", to: "2026-12-01T00:00:00Z" }).success).toBe(false);
  });
});
