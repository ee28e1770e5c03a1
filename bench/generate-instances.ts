// Seeded generators for the benchmark and the tests: realistic furnace-run mixes, zero-waste
// instances with a known optimum (recursive guillotine cuts of full trays), and printer plans.

import fs from "node:fs";
import path from "node:path";
import { pathToFileURL } from "node:url";
import type {
  BuildSpec,
  FurnaceRunsInstance,
  FurnaceSpec,
  FurnaceUnit,
  PrinterPlanInstance,
  PrinterSpec,
} from "@/lib/planning/instances";
import { mulberry32 } from "@/lib/random";

/** mulberry32: small, fast, seedable; the same seed gives the same instance on every machine. */
export const prng = mulberry32;

const between = (rnd: () => number, lo: number, hi: number) => lo + (hi - lo) * rnd();
const round = (x: number, digits: number) => Math.round(x * 10 ** digits) / 10 ** digits;
const pick = <T>(rnd: () => number, xs: readonly T[]): T => xs[Math.floor(rnd() * xs.length)];

function shuffle<T>(rnd: () => number, xs: T[]): T[] {
  for (let i = xs.length - 1; i > 0; i--) {
    const j = Math.floor(rnd() * (i + 1));
    [xs[i], xs[j]] = [xs[j], xs[i]];
  }
  return xs;
}

const iso = (ms: number) => new Date(Math.round(ms / 1000) * 1000).toISOString().replace(".000Z", "Z");

export const BENCH_NOW = Date.parse("2027-01-04T06:00:00Z");

export interface ZeroWasteOptions {
  /** Number of full trays the pieces are cut from. */
  trays: number;
  trayCount: number;
  tray_mm?: [number, number];
  /** No piece side shorter than this. */
  minSide?: number;
  name?: string;
}

export interface ZeroWasteInstance extends FurnaceRunsInstance {
  known_optimum_runs: number;
  /** Index of the tray each unit was cut from (same order as `units`); ignored by the schema. */
  cut_from_tray: number[];
}

/**
 * Cuts `trays` full trays into pieces by recursive guillotine cuts (cut positions on a 0.001 mm
 * grid), turns about half of the pieces 90° and shuffles them. The pieces tile the trays exactly,
 * so the area bound ⌈trays / trayCount⌉ is attained: that is the optimum run count.
 */
export function zeroWasteInstance(seed: number, opts: ZeroWasteOptions): ZeroWasteInstance {
  const rnd = prng(seed);
  const [W, D] = opts.tray_mm ?? [300, 250];
  const minSide = opts.minSide ?? 20;
  const pieces: [number, number, number][] = [];
  let tray = 0;
  const cut = (w: number, d: number, depth: number) => {
    const canW = w >= 2 * minSide;
    const canD = d >= 2 * minSide;
    const stop = !canW && !canD ? 1 : depth === 0 ? 0.04 : Math.min(0.85, 0.08 + 0.14 * depth);
    if (rnd() < stop) {
      pieces.push([round(w, 3), round(d, 3), tray]);
      return;
    }
    const alongW = canW && (!canD || rnd() < w / (w + d));
    if (alongW) {
      const x = round(between(rnd, minSide, w - minSide), 3);
      cut(x, d, depth + 1);
      cut(round(w - x, 3), d, depth + 1);
    } else {
      const y = round(between(rnd, minSide, d - minSide), 3);
      cut(w, y, depth + 1);
      cut(w, round(d - y, 3), depth + 1);
    }
  };
  for (tray = 0; tray < opts.trays; tray++) cut(W, D, 0);
  shuffle(rnd, pieces);
  const furnace: FurnaceSpec = {
    id: "F1",
    tray_mm: [W, D],
    tray_count: opts.trayCount,
    usable_height_mm: 100,
    max_load_g: 10_000_000,
    profiles: ["H13-std"],
  };
  const due = iso(BENCH_NOW + 7 * 86_400_000);
  const units: FurnaceUnit[] = pieces.map(([w, d], i) => {
    const turned = rnd() < 0.5;
    return {
      id: `z${String(i).padStart(4, "0")}`,
      profile: "H13-std",
      footprint_mm: turned ? [d, w] : [w, d],
      height_mm: round(between(rnd, 10, 80), 1),
      mass_g: 1,
      due,
    };
  });
  return {
    kind: "furnace-runs",
    name: opts.name ?? `zero-waste-${opts.trays}x${opts.trayCount}-s${seed}`,
    clearance_mm: 0,
    furnaces: [furnace],
    units,
    known_optimum_runs: Math.ceil(opts.trays / opts.trayCount),
    cut_from_tray: pieces.map((p) => p[2]),
  };
}

export const BENCH_FURNACES: FurnaceSpec[] = [
  { id: "F1", tray_mm: [300, 250], tray_count: 3, usable_height_mm: 120, max_load_g: 15_000, profiles: ["H13-std", "174PH-std", "316L-std"] },
  { id: "F2", tray_mm: [400, 300], tray_count: 4, usable_height_mm: 160, max_load_g: 30_000, profiles: ["H13-std", "174PH-std"] },
  { id: "F3", tray_mm: [350, 350], tray_count: 2, usable_height_mm: 200, max_load_g: 25_000, profiles: ["316L-std", "A2-std"] },
];

/**
 * A shop-like mix: four profiles, footprints 15–150 mm (small parts more common), heights
 * 8–110 mm, mass = bounding box × solid fraction (0.2–0.6) × green density (about 5 g/cm³).
 */
export function furnaceMixInstance(seed: number, n = 1000, name = `furnace-mix-${n}-s${seed}`): FurnaceRunsInstance {
  const rnd = prng(seed);
  const profiles = ["H13-std", "174PH-std", "316L-std", "A2-std"];
  const weights = [0.35, 0.3, 0.25, 0.1];
  const density: Record<string, number> = { "H13-std": 5.0, "174PH-std": 5.1, "316L-std": 5.2, "A2-std": 4.9 };
  const units: FurnaceUnit[] = [];
  for (let i = 0; i < n; i++) {
    let r = rnd();
    let p = 0;
    while (p < profiles.length - 1 && r >= weights[p]) r -= weights[p++];
    const profile = profiles[p];
    // Log-uniform sides so that small parts dominate, as in a real queue.
    const side = () => round(Math.exp(between(rnd, Math.log(15), Math.log(150))), 1);
    const w = side();
    const d = Math.min(150, Math.max(15, round(w * between(rnd, 0.4, 1.6), 1)));
    const h = round(Math.min(110, Math.max(8, Math.min(w, d) * between(rnd, 0.3, 1.2))), 1);
    const mass = round(w * d * h * 1e-3 * between(rnd, 0.2, 0.6) * density[profile], 1);
    units.push({
      id: `u${String(i).padStart(4, "0")}`,
      profile,
      footprint_mm: [w, d],
      height_mm: h,
      mass_g: mass,
      due: iso(BENCH_NOW + between(rnd, 1, 30) * 86_400_000),
    });
  }
  return { kind: "furnace-runs", name, clearance_mm: 5, furnaces: BENCH_FURNACES, units };
}

const MATERIALS = ["17-4PH", "316L", "H13", "A2"];
const VOLUMES: [number, number, number][] = [
  [300, 220, 180],
  [350, 300, 250],
  [250, 180, 150],
];

/**
 * A printer fleet and its queue: 3–4 materials, each printer taking 2–3 of them, builds of
 * 4–60 h, a few maintenance windows, due dates spread over the expected horizon.
 */
export function printerPlanInstance(
  seed: number,
  nBuilds = 500,
  nPrinters = 12,
  name = `printer-${nBuilds}x${nPrinters}-s${seed}`,
): PrinterPlanInstance {
  const rnd = prng(seed);
  const materials = MATERIALS.slice(0, nPrinters >= 6 ? 4 : 3);
  const printers: PrinterSpec[] = [];
  for (let i = 0; i < nPrinters; i++) {
    const k = rnd() < 0.5 ? 2 : 3;
    // Rotate through the materials so that every one has printers.
    const mats = new Set<string>([materials[i % materials.length]]);
    while (mats.size < k) mats.add(pick(rnd, materials));
    const available = BENCH_NOW + Math.floor(between(rnd, 0, 12)) * 3_600_000;
    const blocked = [];
    if (rnd() < 0.5) {
      const s = BENCH_NOW + between(rnd, 1, 25) * 86_400_000;
      blocked.push({ start: iso(s), end: iso(s + Math.round(between(rnd, 4, 12)) * 3_600_000) });
    }
    printers.push({
      id: `P${String(i + 1).padStart(2, "0")}`,
      materials: [...mats].sort(),
      build_volume_mm: VOLUMES[i % VOLUMES.length],
      available_from: iso(available),
      blocked,
    });
  }
  const builds: BuildSpec[] = [];
  let totalMin = 0;
  const drafts: Omit<BuildSpec, "due">[] = [];
  for (let i = 0; i < nBuilds; i++) {
    const material = pick(rnd, materials);
    const holders = printers.filter((p) => p.materials.includes(material));
    const vol = pick(rnd, holders).build_volume_mm;
    const size: [number, number, number] = [
      Math.round(between(rnd, 0.2, 1) * vol[0]),
      Math.round(between(rnd, 0.2, 1) * vol[1]),
      Math.round(between(rnd, 0.15, 1) * vol[2]),
    ];
    const duration = Math.round(between(rnd, 4, 60) * 60);
    totalMin += duration;
    drafts.push({ id: `b${String(i).padStart(4, "0")}`, material, size_mm: rnd() < 0.5 ? size : [size[1], size[0], size[2]], duration_min: duration });
  }
  const horizon = (totalMin / nPrinters) * 60_000;
  for (const d of drafts) {
    builds.push({ ...d, due: iso(BENCH_NOW + d.duration_min * 60_000 + between(rnd, 0.05, 0.95) * horizon) });
  }
  return { kind: "printer-plan", name, now: iso(BENCH_NOW), printers, builds };
}

/**
 * Writes the generated benchmark instances as planning-instance files:
 * npx tsx bench/generate-instances.ts OUT_DIR (then npm run bench -- --instances OUT_DIR).
 */
export function writeBenchInstances(dir: string): string[] {
  fs.mkdirSync(dir, { recursive: true });
  const all: { name: string }[] = [
    furnaceMixInstance(1),
    zeroWasteInstance(1004, { trays: 4, trayCount: 2 }),
    zeroWasteInstance(1020, { trays: 20, trayCount: 4 }),
    printerPlanInstance(1),
  ];
  return all.map((inst) => {
    const file = path.join(dir, `${inst.name}.json`);
    fs.writeFileSync(file, JSON.stringify(inst, null, 1) + "\n");
    return file;
  });
}

if (process.argv[1] && import.meta.url === pathToFileURL(process.argv[1]).href) {
  const out = process.argv[2];
  if (!out) {
    console.error("usage: npx tsx bench/generate-instances.ts OUT_DIR");
    process.exit(2);
  }
  for (const f of writeBenchInstances(out)) console.log(f);
}
