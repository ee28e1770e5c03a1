export type RecallResult = {
  held: Array<{ unit_id: string; serial: string; from: string }>;
  beyond_reach: Array<{ unit_id: string; serial: string; state: string; order_code: string; customer: string }>;
};
