import { toCsv } from "@/lib/csv/safe-cell";
import type { CsvTable } from "./schemas";
import type { QueueRow, ThroughputRow, UtilizationRow } from "./summary";
import type { OrderRisk } from "./projection-input";

// The capacity view's tables as CSV, one file per table, with the same columns as on screen.
// Hours and fractions are written plainly (no units in the cells; the header names them).

export type CapacityTables = {
  range: { from: string; to: string };
  time_zone: string;
  utilization: { day: { resources: UtilizationRow[] }; week: { resources: UtilizationRow[] } };
  wip: Array<{ state: string; count: number }>;
  queue: QueueRow[];
  orders: OrderRisk[];
  throughput: ThroughputRow[];
};

const KIND_LABEL: Record<string, string> = { printer: "printer", wash_station: "wash station", furnace: "furnace" };
const r2 = (x: number) => Math.round(x * 100) / 100;
const pct = (x: number | null) => (x === null ? "" : (Math.round(x * 1000) / 10).toFixed(1));

export function capacityCsv(data: CapacityTables, table: CsvTable): { filename: string; csv: string } {
  let rows: Array<Record<string, string | number>>;
  switch (table) {
    case "utilization-day":
    case "utilization-week": {
      const period = table === "utilization-day" ? "day" : "week";
      rows = data.utilization[period].resources.flatMap((r) =>
        r.periods.map((p) => ({
          resource: r.name,
          kind: KIND_LABEL[r.kind],
          [period === "day" ? "day" : "week_starting"]: p.label,
          available_h: r2(p.available_hours),
          busy_h: r2(p.busy_hours),
          maintenance_h: r2(p.maintenance_hours),
          utilization_pct: pct(p.utilization),
        })),
      );
      break;
    }
    case "wip":
      rows = data.wip.map((w) => ({ state: w.state, units: w.count }));
      break;
    case "queue":
      rows = data.queue.map((q) => ({
        resource: q.name,
        kind: KIND_LABEL[q.kind],
        booked_hours_ahead: r2(q.hours_ahead),
        bookings_ahead: q.bookings_ahead,
        booked_until_utc: q.booked_until ?? "",
      }));
      break;
    case "orders":
      rows = data.orders
        .filter((o) => o.status !== "on_time")
        .map((o) => ({
          order: o.code,
          customer: o.customer,
          priority: o.priority,
          due_utc: o.due_at,
          projected_completion_utc: o.projected_end,
          slack_h: r2(o.slack_minutes / 60),
          status: o.status,
          units_done: o.units_done,
          units_total: o.units_total,
          units_scrapped: o.units_scrapped,
          last_unit: o.latest_serial,
          last_unit_state: o.latest_state,
        }));
      break;
    case "throughput":
      rows = data.throughput.map((w) => ({ week_starting: w.week, units_done: w.done, units_sintered: w.sintered }));
      break;
  }
  // An empty table still gets its header, so a spreadsheet shows what was asked for; every cell
  // of text goes through the shared formula guard (lib/csv/safe-cell.ts).
  const csv = toCsv(headerFor(table), rows);
  return { filename: `hearth-${table}-${data.range.from}-to-${data.range.to}.csv`, csv };
}

function headerFor(table: CsvTable): string[] {
  switch (table) {
    case "utilization-day":
      return ["resource", "kind", "day", "available_h", "busy_h", "maintenance_h", "utilization_pct"];
    case "utilization-week":
      return ["resource", "kind", "week_starting", "available_h", "busy_h", "maintenance_h", "utilization_pct"];
    case "wip":
      return ["state", "units"];
    case "queue":
      return ["resource", "kind", "booked_hours_ahead", "bookings_ahead", "booked_until_utc"];
    case "orders":
      return ["order", "customer", "priority", "due_utc", "projected_completion_utc", "slack_h", "status", "units_done", "units_total", "units_scrapped", "last_unit", "last_unit_state"];
    case "throughput":
      return ["week_starting", "units_done", "units_sintered"];
  }
}
