import Papa from "papaparse";
import { describe, expect, it } from "vitest";
import { safeCell, toCsv } from "@/lib/csv/safe-cell";
import { capacityCsv, type CapacityTables } from "@/lib/capacity/csv";

// OWASP "CSV Injection": cells starting with = + - @ tab or CR are prefixed with ' and quoted.
describe("CSV cells", () => {
  it.each(["=HYPERLINK(\"http://evil.example\")", "+1+cmd|' /C calc'!A0", "-2+3", "@SUM(A1)", "\t=1", "\r=1", "\n=1"])("neutralises text %j", (v) => {
    expect(safeCell(v)).toBe(`'${v}`);
    const line = toCsv(["c"], [{ c: v }]).split("\r\n").slice(1).join("\r\n");
    expect(line.startsWith(`"'`)).toBe(true);
    // a CSV reader gets the quoted text back, prefix included
    expect(Papa.parse<string[]>(toCsv(["c"], [{ c: v }]), { newline: "\r\n" }).data[1][0]).toBe(`'${v}`);
  });

  it("keeps numbers numeric and plain text plain", () => {
    expect(safeCell(-3.5)).toBe(-3.5);
    expect(toCsv(["n", "t"], [{ n: -3.5, t: "Acme Sintering" }])).toBe("n,t\r\n-3.5,Acme Sintering");
    expect(safeCell(null)).toBe(null);
    expect(safeCell(Number.NaN)).toBe(null);
  });

  it("the capacity export neutralises a customer name and an order code", () => {
    const data: CapacityTables = {
      range: { from: "2031-02-03", to: "2031-02-09" },
      time_zone: "UTC",
      utilization: { day: { resources: [] }, week: { resources: [] } },
      wip: [{ state: "=cmd", count: 2 }],
      queue: [],
      throughput: [],
      orders: [
        {
          code: "WO-1",
          customer: "=HYPERLINK(\"http://evil.example\",\"x\")",
          priority: 1,
          due_at: "2031-02-05T00:00:00Z",
          projected_end: "2031-02-06T00:00:00Z",
          slack_minutes: -90,
          status: "late",
          units_done: 0,
          units_total: 1,
          units_scrapped: 0,
          latest_serial: "@x",
          latest_state: "planned",
        } as unknown as CapacityTables["orders"][number],
      ],
    };
    const orders = capacityCsv(data, "orders").csv;
    expect(orders).toContain(`"'=HYPERLINK(""http://evil.example"",""x"")"`);
    expect(orders).toContain(`"'@x"`);
    expect(orders).toContain(",-1.5,"); // slack in hours: a number, not neutralised
    expect(capacityCsv(data, "wip").csv).toBe(`state,units\r\n"'=cmd",2`);
  });
});

describe("the inventory exports use the same guard", () => {
  it("neutralises a multi-line formula in a genealogy customer", async () => {
    const { genealogyCsv } = await import("@/lib/inventory/csv");
    const csv = genealogyCsv([
      { serial: "S-1", state: "done", build_code: "B-1", printer: null, wash_batch_code: null, furnace_run_code: null, profile_code: null, inspections: 2, passed: true, part_number: "P-1", order_code: "WO-1", customer: "=1+1\nmore" },
    ]);
    expect(csv).toContain(`"'=1+1\nmore"`);
    expect(csv).toContain(",2,true");
  });
});
