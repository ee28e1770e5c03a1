// Plan metrics and independent checkers. The checkers read a plan in the exchange shape of the
// planning instances (runs with tray placements, build assignments) and re-derive every rule from
// the instance alone, so they also catch mistakes in the planners that produced the plan.

import { GEOMETRY_EPS } from "@/lib/packing/rectangles";
import { FIT_TOLERANCE_MM } from "@/lib/packing/tray-model";
import type { TrayRun } from "@/lib/packing/types";
import type { FurnaceRunsInstance, PrinterPlanInstance } from "./instances";
import { StaffedCalendar } from "./staffed-hours";

const MINUTE_MS = 60_000;

export interface InstanceRunPlacement {
  unit: string;
  /** 0-based tray index. */
  tray: number;
  /** Footprint corner nearest the tray origin; clearance lies outside the footprint. */
  x: number;
  y: number;
  /** Turned 90°: occupies [d, w]. */
  rotated: boolean;
}

export interface InstanceRun {
  furnace: string;
  profile: string;
  placements: InstanceRunPlacement[];
}

export interface InstanceAssignment {
  build: string;
  printer: string;
  start: string;
  end: string;
}

export interface Verification {
  ok: boolean;
  violations: string[];
}

export function toInstanceRuns(runs: readonly TrayRun[]): InstanceRun[] {
  return runs.map((r) => ({
    furnace: r.furnace,
    profile: r.profile,
    placements: r.trays.flatMap((t) =>
      t.placements.map((p) => ({ unit: p.unit, tray: t.index, x: p.x, y: p.y, rotated: p.rotated })),
    ),
  }));
}

export function latenessMinutes(end: string, due: string): number {
  return (Date.parse(end) - Date.parse(due)) / MINUTE_MS;
}

/** Minutes from `now` to the latest end (0 for an empty plan). */
export function makespanMinutes(now: string, ends: readonly string[]): number {
  const t0 = Date.parse(now);
  let last = t0;
  for (const e of ends) last = Math.max(last, Date.parse(e));
  return (last - t0) / MINUTE_MS;
}

/** max(end − due) over the pairs in minutes, or null when there are none. */
export function maxLatenessMinutes(pairs: readonly { end: string; due: string }[]): number | null {
  if (pairs.length === 0) return null;
  return Math.max(...pairs.map((p) => latenessMinutes(p.end, p.due)));
}

function finite(...xs: number[]): boolean {
  return xs.every((x) => Number.isFinite(x));
}

/**
 * Checks furnace runs against their instance: furnace and profile exist and match, each unit at
 * most once (and, when `unplaced` is given, every unit either placed or reported), footprints
 * inside their tray with the clearance to the edges and to each other (fit tolerance allowed),
 * heights and run loads within limits.
 */
export function verifyRuns(
  instance: FurnaceRunsInstance,
  runs: readonly InstanceRun[],
  unplaced?: readonly { unit: string }[],
): Verification {
  const v: string[] = [];
  // Float noise on top of the fit tolerance.
  const tol = FIT_TOLERANCE_MM + GEOMETRY_EPS;
  const c = instance.clearance_mm;
  const furnaces = new Map(instance.furnaces.map((f) => [f.id, f]));
  const units = new Map(instance.units.map((u) => [u.id, u]));
  const seen = new Set<string>();
  runs.forEach((run, ri) => {
    const f = furnaces.get(run.furnace);
    if (!f) {
      v.push(`run ${ri}: unknown furnace ${run.furnace}`);
      return;
    }
    if (!f.profiles.includes(run.profile)) v.push(`run ${ri}: furnace ${f.id} does not take profile ${run.profile}`);
    let mass = 0;
    const perTray = new Map<number, { id: string; x: number; y: number; w: number; d: number }[]>();
    for (const p of run.placements) {
      const u = units.get(p.unit);
      if (!u) {
        v.push(`run ${ri}: unknown unit ${p.unit}`);
        continue;
      }
      if (seen.has(u.id)) v.push(`unit ${u.id} is placed more than once`);
      seen.add(u.id);
      if (u.profile !== run.profile) v.push(`unit ${u.id} (${u.profile}) is in a ${run.profile} run`);
      if (!Number.isInteger(p.tray) || p.tray < 0 || p.tray >= f.tray_count) {
        v.push(`unit ${u.id}: tray ${p.tray} does not exist on ${f.id}`);
        continue;
      }
      const w = p.rotated ? u.footprint_mm[1] : u.footprint_mm[0];
      const d = p.rotated ? u.footprint_mm[0] : u.footprint_mm[1];
      if (!finite(p.x, p.y)) {
        v.push(`unit ${u.id}: coordinates are not numbers`);
        continue;
      }
      if (p.x < c - tol || p.y < c - tol || p.x + w > f.tray_mm[0] - c + tol || p.y + d > f.tray_mm[1] - c + tol) {
        v.push(`unit ${u.id}: footprint leaves the tray or its edge clearance`);
      }
      if (u.height_mm > f.usable_height_mm + 1e-9) v.push(`unit ${u.id}: taller than ${f.id} allows`);
      mass += u.mass_g;
      const list = perTray.get(p.tray) ?? [];
      list.push({ id: u.id, x: p.x, y: p.y, w, d });
      perTray.set(p.tray, list);
    }
    if (mass > f.max_load_g * (1 + 1e-12)) v.push(`run ${ri}: ${mass.toFixed(1)} g exceeds the load limit of ${f.id}`);
    for (const [tray, list] of perTray) {
      for (let i = 0; i < list.length; i++) {
        for (let j = i + 1; j < list.length; j++) {
          const a = list[i];
          const b = list[j];
          const gx = Math.max(b.x - (a.x + a.w), a.x - (b.x + b.w));
          const gy = Math.max(b.y - (a.y + a.d), a.y - (b.y + b.d));
          if (gx < c - tol && gy < c - tol) v.push(`run ${ri} tray ${tray}: ${a.id} and ${b.id} are closer than the clearance`);
        }
      }
    }
  });
  if (unplaced) {
    for (const u of unplaced) {
      if (seen.has(u.unit)) v.push(`unit ${u.unit} is both placed and unplaced`);
      seen.add(u.unit);
    }
    for (const u of instance.units) if (!seen.has(u.id)) v.push(`unit ${u.id} is neither placed nor reported`);
  }
  return { ok: v.length === 0, violations: v };
}

/**
 * Checks build assignments against their instance: known build and printer, material and build
 * volume (X/Y may swap), the build's duration, no start before `now` or the printer's
 * availability, no overlap with another build or a blocked window on the same printer, a staffed
 * start when the instance sets staffed hours, and, when `unplaced` is given, every build covered.
 */
export function verifyPlan(
  instance: PrinterPlanInstance,
  assignments: readonly InstanceAssignment[],
  unplaced?: readonly { build: string }[],
): Verification {
  const v: string[] = [];
  const now = Date.parse(instance.now);
  const printers = new Map(instance.printers.map((p) => [p.id, p]));
  const builds = new Map(instance.builds.map((b) => [b.id, b]));
  const seen = new Set<string>();
  const cal = instance.staffed_hours ? new StaffedCalendar(instance.staffed_hours, now) : null;
  const byPrinter = new Map<string, { id: string; s: number; e: number }[]>();
  for (const a of assignments) {
    const b = builds.get(a.build);
    const p = printers.get(a.printer);
    if (!b || !p) {
      v.push(`assignment ${a.build} → ${a.printer}: unknown build or printer`);
      continue;
    }
    if (seen.has(b.id)) v.push(`build ${b.id} is assigned more than once`);
    seen.add(b.id);
    const s = Date.parse(a.start);
    const e = Date.parse(a.end);
    if (!finite(s, e)) {
      v.push(`build ${b.id}: start or end is not a time`);
      continue;
    }
    if (!p.materials.includes(b.material)) v.push(`build ${b.id}: printer ${p.id} does not take ${b.material}`);
    const [x, y, z] = b.size_mm;
    const [X, Y, Z] = p.build_volume_mm;
    if (!(z <= Z && ((x <= X && y <= Y) || (y <= X && x <= Y)))) v.push(`build ${b.id}: does not fit printer ${p.id}`);
    if (Math.abs(e - s - b.duration_min * MINUTE_MS) > 1) v.push(`build ${b.id}: runs ${(e - s) / MINUTE_MS} min, needs ${b.duration_min}`);
    const avail = Math.max(now, p.available_from ? Date.parse(p.available_from) : now);
    if (s < avail) v.push(`build ${b.id}: starts before printer ${p.id} is available`);
    for (const w of p.blocked ?? []) {
      if (s < Date.parse(w.end) && Date.parse(w.start) < e) v.push(`build ${b.id}: overlaps a blocked window on ${p.id}`);
    }
    if (cal && !cal.isStaffed(s)) v.push(`build ${b.id}: starts outside staffed hours`);
    const list = byPrinter.get(p.id) ?? [];
    list.push({ id: b.id, s, e });
    byPrinter.set(p.id, list);
  }
  for (const [pid, list] of byPrinter) {
    list.sort((a, b) => a.s - b.s);
    for (let i = 1; i < list.length; i++) {
      if (list[i].s < list[i - 1].e) v.push(`printer ${pid}: ${list[i - 1].id} and ${list[i].id} overlap`);
    }
  }
  if (unplaced) {
    for (const u of unplaced) {
      if (seen.has(u.build)) v.push(`build ${u.build} is both assigned and unplaced`);
      seen.add(u.build);
    }
    for (const b of instance.builds) if (!seen.has(b.id)) v.push(`build ${b.id} is neither assigned nor reported`);
  }
  return { ok: v.length === 0, violations: v };
}
