// A unit as the batching board shows it, in two parts: what follows from its rows (sizes, mass,
// wash time, the steps still ahead of it), worked once per load, and its projection (slack,
// status, when it is ready), which moves with the clock. The board keeps the ten thousand units
// waiting for a wash apart (db/batches/reads.ts) and projects them again as time passes: from
// their prepared form that is a lookup per unit, where working them from the rows again held the
// web process for a third of a second.
import type { BoardFurnace, BoardProfile, BoardUnit, UnitState } from "@/lib/batches/types";
import { furnaceCycle, type SinterProfile } from "@/lib/process/furnace-profile";
import { projectionStatus, projectUnit, type StepState } from "@/lib/process/projection";
import { washMinutes } from "@/lib/process/wash";
import type { Staffing } from "@/lib/batches/staffed";

/** What the projection reads of the shop (db/batches/reads.ts ShopContext has all of it). */
export interface BoardUnitContext {
  now: Date;
  staffing: Staffing;
  drying_minutes: number;
  finishing_lead_minutes: number;
  at_risk_margin_minutes: number;
  profiles: BoardProfile[];
}

/** The columns of a unit's row that the board reads (db/batches/reads.ts unitQuery). */
export interface BoardUnitRow {
  id: string;
  serial: string;
  version: number;
  state: string;
  green_mass_g: unknown;
  brown_mass_g: unknown;
  wash_passed: boolean | null;
  hold_reason: string | null;
  wash_batch_id: string | null;
  furnace_run_id: string | null;
  part_id: string;
  part_number: string;
  part_name: string;
  thickest_wall_mm: unknown;
  volume_mm3: unknown;
  nominal_x_mm: unknown;
  nominal_y_mm: unknown;
  nominal_z_mm: unknown;
  green_x_mm: unknown;
  green_y_mm: unknown;
  green_z_mm: unknown;
  stock_x_neg_mm: unknown;
  stock_x_pos_mm: unknown;
  stock_y_neg_mm: unknown;
  stock_y_pos_mm: unknown;
  stock_z_neg_mm: unknown;
  stock_z_pos_mm: unknown;
  order_code: string;
  due_at: Date | string;
  priority: number;
  material_id: string;
  material_code: string;
  default_profile_id: string | null;
  shrink_xy: unknown;
  shrink_z: unknown;
  green_density_g_cm3: unknown;
  wash_k_min_per_mm2: unknown;
  wash_min_minutes: unknown;
  min_mass_loss: unknown;
  wb_state: string | null;
  wb_starts_at: Date | null;
  wb_ends_at: Date | null;
  fr_state: string | null;
  fr_starts_at: Date | null;
  fr_ends_at: Date | null;
}

/** The steps still ahead of a unit, without the clock: "done" steps end at the projection's now. */
type StepPlan = {
  afterWash: boolean;
  wash: { start: number; end: number } | number;
  furnace: { start: number; end: number } | number;
};

type Projected = Pick<BoardUnit, "ready_at" | "slack_minutes" | "projection_status">;

/** A unit worked from its rows, waiting for a clock to be projected against. */
export interface PreparedBoardUnit {
  /** Every field but the projected ones (projectBoardUnit adds those). */
  readonly base: Omit<BoardUnit, keyof Projected>;
  readonly plan: StepPlan;
  /** The plan as a string: units with the same plan share one projection. */
  readonly planKey: string;
  readonly dueMs: number;
  /** The end of the unit's open wash batch, for a washing unit's ready time. */
  readonly washEndsMs: number | null;
}

const num = (v: unknown): number => Number(v);
const numOrNull = (v: unknown): number | null => (v === null || v === undefined ? null : Number(v));

export function profileForCycle(p: BoardProfile): SinterProfile {
  return {
    startTempC: p.start_temp_c,
    segments: p.segments.map((s) => ({ rateCPerMin: s.rate_c_per_min, setpointC: s.setpoint_c, holdMin: s.hold_min })),
    coolRateCPerMin: p.cool_rate_c_per_min,
    coolToC: p.cool_to_c,
  };
}

/** A run's cycle on a furnace, whole minutes (bookings line up on minutes). */
export function cycleMinutesFor(p: BoardProfile, f?: Pick<BoardFurnace, "max_cool_rate_c_per_min">): number {
  return Math.ceil(furnaceCycle(profileForCycle(p), f ? { maxCoolRateCPerMin: f.max_cool_rate_c_per_min } : undefined).totalMinutes);
}

// Per context (one load): a profile's cycle, a material's compatible profiles, a plan's end.
type Memo = { cycles: Map<string, number>; compatible: Map<string, string[]>; ends: Map<string, Date | null> };
const memos = new WeakMap<BoardUnitContext, Memo>();

function memoOf(ctx: BoardUnitContext): Memo {
  let m = memos.get(ctx);
  if (!m) memos.set(ctx, (m = { cycles: new Map(), compatible: new Map(), ends: new Map() }));
  return m;
}

function profileCycle(ctx: BoardUnitContext, p: BoardProfile): number {
  const memo = memoOf(ctx).cycles;
  let m = memo.get(p.id);
  if (m === undefined) {
    try {
      m = cycleMinutesFor(p);
    } catch {
      m = 0;
    }
    memo.set(p.id, m);
  }
  return m;
}

function compatibleProfiles(ctx: BoardUnitContext, materialId: string): string[] {
  const memo = memoOf(ctx).compatible;
  let ids = memo.get(materialId);
  if (!ids) memo.set(materialId, (ids = ctx.profiles.filter((p) => p.material_ids.includes(materialId)).map((p) => p.id)));
  // Shared by the prepared units of one material; projectBoardUnit gives each answer its own copy.
  return ids;
}

const bookedOrNull = (s: Date | null, e: Date | null): { start: number; end: number } | null => {
  if (!s || !e) return null;
  const start = new Date(s).getTime();
  const end = new Date(e).getTime();
  return start < end ? { start, end } : null;
};

const stepKey = (s: { start: number; end: number } | number) => (typeof s === "number" ? `u${s}` : `b${s.start}-${s.end}`);

/** Works everything about a unit that does not move with the clock. */
export function prepareBoardUnit(r: BoardUnitRow, ctx: BoardUnitContext): PreparedBoardUnit {
  // The worker keeps parts' green sizes current; a part not scaled yet is scaled here the same way.
  const sxy = num(r.shrink_xy);
  const sz = num(r.shrink_z);
  const gx = numOrNull(r.green_x_mm) ?? (num(r.nominal_x_mm) + num(r.stock_x_neg_mm) + num(r.stock_x_pos_mm)) / (1 - sxy);
  const gy = numOrNull(r.green_y_mm) ?? (num(r.nominal_y_mm) + num(r.stock_y_neg_mm) + num(r.stock_y_pos_mm)) / (1 - sxy);
  const gz = numOrNull(r.green_z_mm) ?? (num(r.nominal_z_mm) + num(r.stock_z_neg_mm) + num(r.stock_z_pos_mm)) / (1 - sz);
  const green = numOrNull(r.green_mass_g);
  const brown = numOrNull(r.brown_mass_g);
  let mass: number;
  let source: BoardUnit["mass_source"];
  if (brown) {
    mass = brown;
    source = "brown";
  } else if (green) {
    mass = green;
    source = "green";
  } else {
    // Finished volume scaled to green size; a part without geometry is taken as half its box.
    const vol = numOrNull(r.volume_mm3);
    const greenVol = vol ? vol * (gx / num(r.nominal_x_mm)) * (gy / num(r.nominal_y_mm)) * (gz / num(r.nominal_z_mm)) : gx * gy * gz * 0.5;
    mass = Math.round((greenVol / 1000) * num(r.green_density_g_cm3) * 10) / 10;
    source = "estimate";
  }
  const k = num(r.wash_k_min_per_mm2);
  const tMin = num(r.wash_min_minutes);
  const wall = num(r.thickest_wall_mm);
  const wash = washMinutes({ thickestWallMm: wall, kMinPerMm2: k, minMinutes: tMin });
  const state = r.state as UnitState;
  const profile = r.default_profile_id === null ? undefined : ctx.profiles.find((p) => p.id === r.default_profile_id);
  const cycle = profile ? profileCycle(ctx, profile) : 0;
  const washOpen = r.wb_state === "scheduled" || r.wb_state === "running" ? bookedOrNull(r.wb_starts_at, r.wb_ends_at) : null;
  const runOpen = r.fr_state === "scheduled" || r.fr_state === "running" ? bookedOrNull(r.fr_starts_at, r.fr_ends_at) : null;
  const afterWash = ["brown", "sintering", "sintered", "ready_for_finishing", "finishing", "done"].includes(state);
  const plan: StepPlan = { afterWash, wash: washOpen ?? wash, furnace: runOpen ?? cycle };
  const dueMs = new Date(r.due_at).getTime();
  return {
    base: {
      id: r.id,
      serial: r.serial,
      version: r.version,
      state,
      part_id: r.part_id,
      part_number: r.part_number,
      part_name: r.part_name,
      order_code: r.order_code,
      due_at: new Date(dueMs).toISOString(),
      priority: r.priority,
      material_id: r.material_id,
      material_code: r.material_code,
      profile_id: r.default_profile_id,
      compatible_profile_ids: compatibleProfiles(ctx, r.material_id),
      green_x_mm: Math.round(gx * 100) / 100,
      green_y_mm: Math.round(gy * 100) / 100,
      green_z_mm: Math.round(gz * 100) / 100,
      mass_g: mass,
      mass_source: source,
      green_mass_g: green,
      brown_mass_g: brown,
      wash_passed: r.wash_passed,
      min_mass_loss: num(r.min_mass_loss),
      thickest_wall_mm: wall,
      wash_minutes: Math.round(wash),
      wash_k_min_per_mm2: k,
      wash_min_minutes: tMin,
      wash_batch_id: r.wash_batch_id,
      furnace_run_id: r.furnace_run_id,
      hold_reason: r.hold_reason,
    },
    plan,
    planKey: `${afterWash ? 1 : 0}|${stepKey(plan.wash)}|${stepKey(plan.furnace)}`,
    dueMs,
    washEndsMs: state === "washing" && r.wb_ends_at ? new Date(r.wb_ends_at).getTime() : null,
  };
}

/** The plan's projected end at ctx.now (once per plan and context: units share a handful). */
function projectedEnd(ctx: BoardUnitContext, u: PreparedBoardUnit): Date | null {
  const memo = memoOf(ctx).ends;
  const hit = memo.get(u.planKey);
  if (hit !== undefined || memo.has(u.planKey)) return hit ?? null;
  const now = ctx.now;
  const step = (s: { start: number; end: number } | number): StepState =>
    typeof s === "number" ? { status: "unbooked", minutes: s } : { status: "booked", start: new Date(s.start), end: new Date(s.end) };
  const done: StepState = { status: "done", end: now };
  const steps = {
    print: done,
    wash: u.plan.afterWash ? done : step(u.plan.wash),
    drying: u.plan.afterWash ? done : ({ status: "unbooked", minutes: ctx.drying_minutes } as StepState),
    furnace: step(u.plan.furnace),
    finishing: { status: "unbooked", minutes: ctx.finishing_lead_minutes } as StepState,
  };
  let end: Date | null = null;
  try {
    end = projectUnit({ now, dueAt: now, steps, atRiskMarginMinutes: ctx.at_risk_margin_minutes, staffing: ctx.staffing ?? undefined }).projectedEnd;
  } catch {
    end = null;
  }
  memo.set(u.planKey, end);
  return end;
}

/** Projected due date minus projected completion at ctx.now, whole minutes. */
function slackOf(u: PreparedBoardUnit, ctx: BoardUnitContext): number {
  const end = projectedEnd(ctx, u);
  return Math.round((u.dueMs - (end ? end.getTime() : ctx.now.getTime())) / 60_000);
}

/** The unit as the board shows it at ctx.now. */
export function projectBoardUnit(u: PreparedBoardUnit, ctx: BoardUnitContext): BoardUnit {
  const nowMs = ctx.now.getTime();
  let readyAt: string | null = null;
  if (u.base.state === "brown") readyAt = ctx.now.toISOString();
  else if (u.washEndsMs !== null) readyAt = new Date(Math.max(nowMs, u.washEndsMs + ctx.drying_minutes * 60_000)).toISOString();
  const end = projectedEnd(ctx, u);
  const slack = slackOf(u, ctx);
  const status: BoardUnit["projection_status"] = end ? projectionStatus(end, new Date(u.dueMs), ctx.at_risk_margin_minutes) : slack < 0 ? "late" : "on_time";
  return { ...u.base, compatible_profile_ids: [...u.base.compatible_profile_ids], ready_at: readyAt, slack_minutes: slack, projection_status: status };
}

/**
 * The `limit` units most at risk at ctx.now, in byRisk's order, and how many there are: what the
 * board shows of a lane. Only those few become answers; the rest are ranked by their slack alone
 * (a number per unit), where projecting every one of ten thousand units into a new object took
 * a fifth of a second, most of it the garbage collector's.
 */
/** A lane of waiting units as the board shows it: the most at risk, and how many wait in all. */
export type WaitingLane = { units: BoardUnit[]; total: number };

export function mostAtRisk(units: readonly PreparedBoardUnit[], ctx: BoardUnitContext, limit: number): WaitingLane {
  const slack = units.map((u) => slackOf(u, ctx));
  // Indices in the units' own order: the sort is stable, so equal units keep it, as listBoardUnits's do.
  const order = units.map((_, i) => i);
  order.sort((a, b) => slack[a] - slack[b] || byDueThenSerial(units[a], units[b]));
  return { units: order.slice(0, limit).map((i) => projectBoardUnit(units[i], ctx)), total: units.length };
}

// The ISO due dates byRisk compares are all of one form, so they order as their instants do.
const byDueThenSerial = (a: PreparedBoardUnit, b: PreparedBoardUnit) => a.dueMs - b.dueMs || collator.compare(a.base.serial, b.base.serial);

export function toBoardUnit(r: BoardUnitRow, ctx: BoardUnitContext): BoardUnit {
  return projectBoardUnit(prepareBoardUnit(r, ctx), ctx);
}

// One collator for every comparison: String.prototype.localeCompare without arguments compares as
// a default Intl.Collator does (ECMA-402 §19.1.1), but builds its collation each call.
const collator = new Intl.Collator();

/** Most at risk first: least slack, then the earlier due date, then the serial. */
export function byRisk(a: BoardUnit, b: BoardUnit): number {
  return a.slack_minutes - b.slack_minutes || collator.compare(a.due_at, b.due_at) || collator.compare(a.serial, b.serial);
}
