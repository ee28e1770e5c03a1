// The ten classes of the classic two-dimensional bin-packing benchmark, regenerated here from
// their published definitions with our own seeds (the original instance files are not used).
//
// Classes I–VI: J.O. Berkey & P.Y. Wang, "Two-dimensional finite bin-packing algorithms",
// J. Oper. Res. Soc. 38(5):423–429 (1987). Item sides uniform integers in [lo, hi], square bins:
//   I   [1, 10]  bin 10      II  [1, 10]  bin 30
//   III [1, 35]  bin 40      IV  [1, 35]  bin 100
//   V   [1, 100] bin 100     VI  [1, 100] bin 300
// Classes VII–X: S. Martello & D. Vigo, "Exact solution of the two-dimensional finite bin packing
// problem", Management Science 44(3):388–399 (1998). Bin W = H = 100; four item types
//   type 1 (wide):  w in [2/3·W, W], h in [1, 1/2·H]
//   type 2 (tall):  w in [1, 1/2·W], h in [2/3·H, H]
//   type 3 (large): w in [1/2·W, W], h in [1/2·H, H]
//   type 4 (small): w in [1, 1/2·W], h in [1, 1/2·H]
// class VII draws type 1 with probability 70 % and each other type with 10 %; VIII favours
// type 2, IX type 3, X type 4 in the same way.
// The definitions are as restated in A. Lodi, S. Martello & D. Vigo, "Heuristic and metaheuristic
// approaches for a class of two-dimensional bin packing problems", INFORMS J. Computing 11(4):
// 345–357 (1999) [from memory; the ranges match the 2DPackLib distribution of these classes].
// Here the items may turn 90° (the "R" variant of that paper), so VII and VIII are mirror images.

import type { FurnaceRunsInstance } from "@/lib/planning/instances";
import { mulberry32 } from "@/lib/random";

export const CLASS_NAMES = ["I", "II", "III", "IV", "V", "VI", "VII", "VIII", "IX", "X"] as const;
export type BinClass = (typeof CLASS_NAMES)[number];

export interface BinItem {
  w: number;
  h: number;
}

export interface BinInstance {
  cls: BinClass;
  n: number;
  seed: number;
  W: number;
  H: number;
  items: BinItem[];
}

const BERKEY_WANG: Record<"I" | "II" | "III" | "IV" | "V" | "VI", { lo: number; hi: number; bin: number }> = {
  I: { lo: 1, hi: 10, bin: 10 },
  II: { lo: 1, hi: 10, bin: 30 },
  III: { lo: 1, hi: 35, bin: 40 },
  IV: { lo: 1, hi: 35, bin: 100 },
  V: { lo: 1, hi: 100, bin: 100 },
  VI: { lo: 1, hi: 100, bin: 300 },
};

const MV_FAVOURED: Record<"VII" | "VIII" | "IX" | "X", number> = { VII: 1, VIII: 2, IX: 3, X: 4 };

const intIn = (rnd: () => number, lo: number, hi: number) => lo + Math.floor(rnd() * (hi - lo + 1));

function martelloVigoItem(rnd: () => number, type: number, W: number, H: number): BinItem {
  // Integer bounds of the fractional ranges: ⌈2W/3⌉ and ⌊W/2⌋, ⌈W/2⌉.
  switch (type) {
    case 1:
      return { w: intIn(rnd, Math.ceil((2 * W) / 3), W), h: intIn(rnd, 1, Math.floor(H / 2)) };
    case 2:
      return { w: intIn(rnd, 1, Math.floor(W / 2)), h: intIn(rnd, Math.ceil((2 * H) / 3), H) };
    case 3:
      return { w: intIn(rnd, Math.ceil(W / 2), W), h: intIn(rnd, Math.ceil(H / 2), H) };
    default:
      return { w: intIn(rnd, 1, Math.floor(W / 2)), h: intIn(rnd, 1, Math.floor(H / 2)) };
  }
}

/** One instance of `cls` with `n` items; the same (cls, n, seed) gives the same items everywhere. */
export function binInstance(cls: BinClass, n: number, seed: number): BinInstance {
  const classNo = CLASS_NAMES.indexOf(cls) + 1;
  const rnd = mulberry32((seed * 1_000_003) ^ (classNo * 7919) ^ (n * 104_729));
  if (cls in BERKEY_WANG) {
    const { lo, hi, bin } = BERKEY_WANG[cls as keyof typeof BERKEY_WANG];
    const items = Array.from({ length: n }, () => ({ w: intIn(rnd, lo, hi), h: intIn(rnd, lo, hi) }));
    return { cls, n, seed, W: bin, H: bin, items };
  }
  const W = 100;
  const H = 100;
  const fav = MV_FAVOURED[cls as keyof typeof MV_FAVOURED];
  const items = Array.from({ length: n }, () => {
    const r = rnd();
    // 70 % the favoured type, 10 % each of the other three.
    const others = [1, 2, 3, 4].filter((t) => t !== fav);
    const type = r < 0.7 ? fav : others[Math.min(2, Math.floor((r - 0.7) / 0.1))];
    return martelloVigoItem(rnd, type, W, H);
  });
  return { cls, n, seed, W, H, items };
}

/**
 * The instance as a furnace-run problem: one tray per run of W×H, no clearance, no load or height
 * limit that binds, one profile. The run count is then the bin count.
 */
export function asTrayInstance(inst: BinInstance): FurnaceRunsInstance {
  return {
    kind: "furnace-runs",
    name: `2bp-${inst.cls}-n${inst.n}-s${inst.seed}`,
    clearance_mm: 0,
    furnaces: [{ id: "BIN", tray_mm: [inst.W, inst.H], tray_count: 1, usable_height_mm: 100, max_load_g: 1e9, profiles: ["P"] }],
    units: inst.items.map((it, i) => ({
      id: `i${i}`,
      profile: "P",
      footprint_mm: [it.w, it.h],
      height_mm: 1,
      mass_g: 1,
      due: "2027-01-10T00:00:00Z",
    })),
  };
}
