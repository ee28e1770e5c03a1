import type { OrderRisk } from "./projection-input";
import type { ResourceKind } from "./schemas";
import type { KindUtilizationRow, QueueRow, ThroughputRow, UtilizationRow, WipState } from "./summary";

// What GET /api/capacity answers with.

export type CapacityView = {
  shop_name: string;
  time_zone: string;
  now: string;
  range: { from: string; to: string; from_at: string; to_at: string };
  resources: Array<{ id: string; kind: ResourceKind; name: string }>;
  utilization: {
    day: { resources: UtilizationRow[]; kinds: KindUtilizationRow[] };
    week: { resources: UtilizationRow[]; kinds: KindUtilizationRow[] };
  };
  queue: QueueRow[];
  backlog: Array<{ kind: ResourceKind; count: number; hours: number | null; what: string }>;
  wip: Array<{ state: WipState; count: number }>;
  throughput: ThroughputRow[];
  orders: OrderRisk[];
  at_risk_margin_minutes: number;
};
