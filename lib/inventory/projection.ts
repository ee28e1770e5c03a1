// On hand, day by day, for one material over the planning horizon: what is on the shelf now,
// less what scheduled builds will draw on the day they start, less lots that expire unused.

export type ProjectionLot = { remaining_g: number; expires_on: string | null; usable: boolean };
export type ProjectionBuild = { id: string; code: string; day: string; grams: number };
export type ProjectionDay = { day: string; drawn_g: number; expired_g: number; on_hand_g: number; builds: string[] };
export type Projection = {
  on_hand_g: number;
  committed_g: number;
  days: ProjectionDay[];
  first_short_day: string | null;
  first_below_reorder_day: string | null;
  /** Builds that start on or after the first short day: their feedstock will not be there. */
  short_builds: string[];
};

const r1 = (g: number) => Math.round(g * 10) / 10;

/** Calendar days from `start` (YYYY-MM-DD), `count` of them, as YYYY-MM-DD. */
export function dayRange(start: string, count: number): string[] {
  const t0 = Date.UTC(+start.slice(0, 4), +start.slice(5, 7) - 1, +start.slice(8, 10));
  return Array.from({ length: count }, (_, i) => new Date(t0 + i * 86_400_000).toISOString().slice(0, 10));
}

/**
 * Builds already past (day before `today`) but not yet started draw today. A lot that expires
 * on day d can still be used on d and is gone from d+1. Draws come out of the total on hand;
 * which lot they take (FEFO) does not change the total, so expiry is counted on what remains of
 * each lot after earlier-expiring lots were used first (an upper bound on usable stock).
 */
export function projectOnHand(input: { today: string; horizon_days: number; lots: ProjectionLot[]; builds: ProjectionBuild[]; reorder_point_g: number }): Projection {
  const days = dayRange(input.today, input.horizon_days);
  const usable = input.lots.filter((l) => l.usable && l.remaining_g > 0);
  // per-lot remaining, consumed FEFO so that expiry removes only what was not drawn
  const lots = usable
    .map((l) => ({ left: l.remaining_g, expires: l.expires_on }))
    .sort((a, b) => (a.expires ?? "9999-12-31").localeCompare(b.expires ?? "9999-12-31"));
  const onHandNow = r1(lots.reduce((s, l) => s + l.left, 0));
  const byDay = new Map<string, ProjectionBuild[]>();
  const last = days[days.length - 1];
  let committed = 0;
  for (const b of input.builds) {
    const day = b.day < input.today ? input.today : b.day;
    if (day > last) continue;
    committed += b.grams;
    const list = byDay.get(day);
    if (list) list.push(b);
    else byDay.set(day, [b]);
  }
  let deficit = 0; // drawn beyond what the shelf held
  let firstShort: string | null = null;
  let firstBelow: string | null = null;
  const short: string[] = [];
  const out: ProjectionDay[] = [];
  for (const day of days) {
    let expired = 0;
    for (const l of lots) {
      if (l.expires && l.expires < day && l.left > 0) {
        expired += l.left;
        l.left = 0;
      }
    }
    const todays = byDay.get(day) ?? [];
    let drawn = 0;
    for (const b of todays) {
      let need = b.grams;
      for (const l of lots) {
        if (need <= 0) break;
        const take = Math.min(need, l.left);
        l.left -= take;
        need -= take;
      }
      deficit += need;
      drawn += b.grams;
      if (need > 1e-9 || firstShort) {
        firstShort ??= day;
        short.push(b.id);
      }
    }
    const onHand = r1(lots.reduce((s, l) => s + l.left, 0) - deficit);
    if (firstBelow === null && onHand < input.reorder_point_g) firstBelow = day;
    out.push({ day, drawn_g: r1(drawn), expired_g: r1(expired), on_hand_g: onHand, builds: todays.map((b) => b.code) });
  }
  return { on_hand_g: onHandNow, committed_g: r1(committed), days: out, first_short_day: firstShort, first_below_reorder_day: firstBelow, short_builds: short };
}

/**
 * Reorder mail goes out once per crossing: when the projection falls below the reorder point within
 * the lead time (the time a delivery takes), and again only after it has recovered.
 */
export function reorderDecision(input: { first_below_reorder_day: string | null; today: string; lead_time_days: number; alerted: boolean }): "alert" | "clear" | "none" {
  const within = input.first_below_reorder_day !== null && dayRange(input.today, input.lead_time_days + 1).includes(input.first_below_reorder_day);
  if (within && !input.alerted) return "alert";
  if (!within && input.alerted) return "clear";
  return "none";
}

/**
 * A material no lot was ever received for has no stock to fall below a reorder point: it is not
 * tracked, and alone it is no reason to mail. Once a scheduled build within the horizon needs it,
 * the shop has to hear once that there is nothing on hand (at whatever lead time: nothing was
 * ever bought); the flag re-arms when no build needs it any more.
 */
export function noStockDecision(input: { first_need_day: string | null; alerted: boolean }): "alert" | "clear" | "none" {
  if (input.first_need_day !== null && !input.alerted) return "alert";
  if (input.first_need_day === null && input.alerted) return "clear";
  return "none";
}
