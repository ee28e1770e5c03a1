// Which lots a build may draw from, and in what order.

export type LotState = "quarantine" | "released" | "consumed" | "rejected";
export const LOT_STATES: readonly LotState[] = ["quarantine", "released", "consumed", "rejected"];

/** Who may move a lot where: quarantine is released or rejected after incoming inspection. */
export const LOT_TRANSITIONS: Record<LotState, readonly LotState[]> = {
  quarantine: ["released", "rejected"],
  released: ["quarantine", "rejected", "consumed"],
  consumed: [],
  rejected: [],
};

export type LotForDraw = { id: string; code: string; state: LotState; expires_on: string | null; remaining_g: number; received_on: string };

/** Why a build cannot draw from this lot on `day` (YYYY-MM-DD in the shop's zone), or null. */
export function drawRefusal(lot: LotForDraw, day: string): string | null {
  if (lot.state === "quarantine") return `Lot ${lot.code} is in quarantine: release it after its incoming check before printing from it.`;
  if (lot.state === "rejected") return `Lot ${lot.code} was rejected and cannot be printed from.`;
  if (lot.state === "consumed") return `Lot ${lot.code} is used up.`;
  if (lot.expires_on && lot.expires_on < day) return `Lot ${lot.code} expired on ${lot.expires_on}.`;
  if (!(lot.remaining_g > 0)) return `Lot ${lot.code} is empty.`;
  return null;
}

/** First expiring, first out; lots without a shelf life last, older receipts first. */
export function fefo<T extends LotForDraw>(lots: T[]): T[] {
  return [...lots].sort(
    (a, b) =>
      (a.expires_on ?? "9999-12-31").localeCompare(b.expires_on ?? "9999-12-31") || a.received_on.localeCompare(b.received_on) || a.code.localeCompare(b.code),
  );
}

export type PlannedDraw = { lot_id: string; grams: number };

/**
 * Splits `needed` grams over usable lots in FEFO order. Returns null when together they hold
 * too little; the caller then answers with what is missing.
 */
export function allocate(lots: LotForDraw[], needed: number, day: string): PlannedDraw[] | null {
  let left = Math.round(needed * 10);
  const out: PlannedDraw[] = [];
  for (const lot of fefo(lots.filter((l) => drawRefusal(l, day) === null))) {
    if (left <= 0) break;
    const take = Math.min(left, Math.round(lot.remaining_g * 10));
    out.push({ lot_id: lot.id, grams: take / 10 });
    left -= take;
  }
  return left > 0 ? null : out;
}
