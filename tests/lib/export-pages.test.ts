import { describe, expect, it } from "vitest";
import { allPages, orderCsvRow } from "@/lib/exports/tables";
import { toCsv } from "@/lib/csv/safe-cell";

describe("exports read every page of a list", () => {
  const rows = Array.from({ length: 450 }, (_, i) => i);
  const pager = (asked: number[]) => async (n: number, size: number) => {
    asked.push(n);
    return { rows: rows.slice((n - 1) * size, n * size), total: rows.length };
  };

  it("asks page after page until the total is reached", async () => {
    const asked: number[] = [];
    const got = await allPages(pager(asked), 200, 10_000);
    expect(got.rows).toEqual(rows);
    expect(asked).toEqual([1, 2, 3]);
  });

  it("stops at the cap and says how many there were", async () => {
    const asked: number[] = [];
    const got = await allPages(pager(asked), 200, 300);
    expect(got.rows).toHaveLength(300);
    expect(got.total).toBe(450);
    expect(asked).toEqual([1, 2]);
  });

  it("writes an order line with its formula text neutralised (OWASP CSV Injection)", () => {
    const csv = toCsv(["code", "customer"], [orderCsvRow({ id: "x", code: "A-1", customer: "+SUM(1)", project: "", due_at: "2027-01-04T00:00:00Z", priority: 3, notes: "", part_count: 0, unit_count: 0, done_count: 0, projection: null })]);
    expect(csv).toBe(`code,customer\r\nA-1,"'+SUM(1)"`);
  });
});
