// The run-removing search and the shape bounds: plans stay valid, the search is repeatable for a
// seed and never needs more runs than the constructions alone, and the bounds never exceed an
// exact optimum (found here by exhaustive search on tiny instances).

import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { claimedAreaTrayBound, dffTrayBound, shortSideTrayBound, stepDff, epsilonDff } from "@/lib/packing/dual-feasible";
import { packAllOnTray } from "@/lib/packing/tile-search";
import { packTrays, packTraysReported } from "@/lib/packing/trays";
import type { FurnaceRunsInstance } from "@/lib/planning/instances";
import { toInstanceRuns, verifyRuns } from "@/lib/planning/metrics";
import { mulberry32 } from "@/lib/random";
import { asTrayInstance, binInstance } from "@/bench/bin-packing-classes";
import { furnaceMixInstance } from "@/bench/generate-instances";

const DUE = "2027-01-10T00:00:00Z";

function binInput(W: number, H: number, items: [number, number][], clearance = 0): FurnaceRunsInstance {
  return {
    kind: "furnace-runs",
    name: "t",
    clearance_mm: clearance,
    furnaces: [{ id: "B", tray_mm: [W, H], tray_count: 1, usable_height_mm: 10, max_load_g: 1e9, profiles: ["P"] }],
    units: items.map(([w, h], i) => ({ id: `i${i}`, profile: "P", footprint_mm: [w, h] as [number, number], height_mm: 1, mass_g: 1, due: DUE })),
  };
}

// Exact minimum bin count for a handful of integer rectangles (turning allowed): every set
// partition of the items, each part checked by a depth-first placement on the integer grid.
function fitsOneBin(W: number, H: number, items: [number, number][]): boolean {
  const grid = new Uint8Array(W * H);
  const order = [...items].sort((a, b) => b[0] * b[1] - a[0] * a[1]);
  const free = (x: number, y: number, w: number, h: number) => {
    for (let j = y; j < y + h; j++) for (let i = x; i < x + w; i++) if (grid[j * W + i]) return false;
    return true;
  };
  const mark = (x: number, y: number, w: number, h: number, v: number) => {
    for (let j = y; j < y + h; j++) for (let i = x; i < x + w; i++) grid[j * W + i] = v;
  };
  const dfs = (k: number): boolean => {
    if (k === order.length) return true;
    const [a, b] = order[k];
    for (const [w, h] of a === b ? [[a, b]] : [[a, b], [b, a]]) {
      for (let y = 0; y + h <= H; y++) {
        for (let x = 0; x + w <= W; x++) {
          if (!free(x, y, w, h)) continue;
          mark(x, y, w, h, 1);
          if (dfs(k + 1)) return true;
          mark(x, y, w, h, 0);
        }
      }
    }
    return false;
  };
  if (order.reduce((s, [w, h]) => s + w * h, 0) > W * H) return false;
  return dfs(0);
}

function optimumBins(W: number, H: number, items: [number, number][]): number {
  const n = items.length;
  const memo = new Map<number, boolean>();
  const ok = (mask: number) => {
    let v = memo.get(mask);
    if (v === undefined) {
      v = fitsOneBin(W, H, items.filter((_, i) => mask & (1 << i)));
      memo.set(mask, v);
    }
    return v;
  };
  // dp over subsets: fewest bins for the items in mask; the bin holding the lowest item is chosen.
  const dp = new Array<number>(1 << n).fill(Infinity);
  dp[0] = 0;
  for (let mask = 1; mask < 1 << n; mask++) {
    const low = mask & -mask;
    const rest = mask ^ low;
    for (let sub = rest; ; sub = (sub - 1) & rest) {
      const bin = sub | low;
      if (ok(bin)) dp[mask] = Math.min(dp[mask], dp[mask ^ bin] + 1);
      if (sub === 0) break;
    }
  }
  return dp[(1 << n) - 1];
}

describe("dual-feasible functions (Fekete & Schepers 2001)", () => {
  it("u^(1) maps over-half to 1, under-half to 0, and never overstates near an integer", () => {
    const u1 = stepDff(1);
    expect(u1(0.6)).toBe(1);
    expect(u1(0.4)).toBe(0);
    expect(u1(1)).toBe(1);
    expect(u1(0.5)).toBeLessThanOrEqual(0.5);
    // u^(2): 3x = 1.5 → ⌊1.5⌋/2 = 0.5 (worked by hand).
    expect(stepDff(2)(0.5)).toBe(0.5);
    expect(epsilonDff(0.2)(0.85)).toBe(1);
    expect(epsilonDff(0.2)(0.1)).toBe(0);
    expect(epsilonDff(0.2)(0.5)).toBe(0.5);
  });

  it("Σ u(x_i) ≤ 1 whenever Σ x_i ≤ 1, on random sets", () => {
    fc.assert(
      fc.property(fc.array(fc.double({ min: 0.001, max: 1, noNaN: true }), { minLength: 1, maxLength: 8 }), fc.integer({ min: 1, max: 8 }), fc.double({ min: 0.01, max: 0.5, noNaN: true }), (xs, k, eps) => {
        const total = xs.reduce((s, x) => s + x, 0);
        if (total > 1) return;
        for (const u of [stepDff(k), epsilonDff(eps), (x: number) => stepDff(k)(epsilonDff(eps)(x))]) {
          expect(xs.reduce((s, x) => s + u(x), 0)).toBeLessThanOrEqual(1 + 1e-9);
        }
      }),
      { numRuns: 300 },
    );
  });
});

describe("shape bounds against exact optima (exhaustive search, turning allowed)", () => {
  it("never exceed the optimum on 60 tiny instances, square and oblong trays", () => {
    const rnd = mulberry32(2024);
    let tight = 0;
    for (let t = 0; t < 60; t++) {
      const W = 10;
      const H = t % 3 === 0 ? 7 : 10;
      const n = 3 + Math.floor(rnd() * 4);
      const items: [number, number][] = [];
      while (items.length < n) {
        const w = 1 + Math.floor(rnd() * 10);
        const h = 1 + Math.floor(rnd() * 10);
        // Must fit the tray in some orientation.
        if ((w <= W && h <= H) || (h <= W && w <= H)) items.push([w, h]);
      }
      const opt = optimumBins(W, H, items);
      const dff = dffTrayBound(items.map(([w, h]) => ({ w, h, trays: [{ W, D: H }] })));
      const side = shortSideTrayBound(items.map(([w, h]) => ({ w, h })), W, H);
      expect(dff).toBeLessThanOrEqual(opt);
      expect(side).toBeLessThanOrEqual(opt);
      const res = packTrays(binInput(W, H, items));
      expect(res.lowerBound.largest).toBeLessThanOrEqual(opt);
      expect(res.runs.length).toBeGreaterThanOrEqual(opt);
      if (Math.max(dff, side) === opt) tight++;
    }
    // Not a validity condition, but the bounds should be useful: most tiny cases are tight.
    expect(tight).toBeGreaterThan(30);
  });

  it("counts five pieces over half a square tray both ways as five trays, turned or not", () => {
    const items = Array.from({ length: 5 }, () => ({ w: 60, h: 55, trays: [{ W: 100, D: 100 }] }));
    expect(dffTrayBound(items)).toBe(5);
    expect(shortSideTrayBound(items, 100, 100)).toBe(5);
  });
});

/** One W×H tray cut by random guillotine cuts, every piece then trimmed a little: the pieces fit one tray. */
function oneTrayPieces(rnd: () => number, W: number, H: number, pieces: number): { w: number; h: number }[] {
  const parts = [{ w: W, h: H }];
  while (parts.length < pieces) {
    const i = Math.floor(rnd() * parts.length);
    const p = parts[i];
    const alongW = p.w >= p.h ? rnd() < 0.8 : rnd() < 0.2;
    const side = alongW ? p.w : p.h;
    if (side < 2) continue;
    const cut = 1 + Math.floor(rnd() * (side - 1));
    parts.splice(i, 1, ...(alongW ? [{ w: cut, h: p.h }, { w: p.w - cut, h: p.h }] : [{ w: p.w, h: cut }, { w: p.w, h: p.h - cut }]));
  }
  // Trimmed and turned at random: the set still fits one tray (turning allowed).
  return parts.map((p) => {
    const w = Math.max(0.5, p.w - rnd() * 0.5);
    const h = Math.max(0.5, p.h - rnd() * 0.5);
    return rnd() < 0.5 ? { w, h } : { w: h, h: w };
  });
}

describe("claimed-area bound (U^ε on both axes, then Martello–Toth L2; Carlier, Clautiaux & Moukrim 2007)", () => {
  it("three 8×4 strips need two 10×10 trays, though their area fits one (worked by hand)", () => {
    // Stacked they are 12 high; one turned beside two flat ones is 8 + 4 = 12 wide. With q = 4 each
    // strip claims a full band 10×4, 120 in all > 100.
    const strips = [
      { w: 8, h: 4 },
      { w: 4, h: 8 },
      { w: 8, h: 4 },
    ];
    expect(claimedAreaTrayBound(strips, 10, 10)).toBe(2);
    expect(shortSideTrayBound(strips, 10, 10)).toBe(1);
    expect(optimumBins(10, 10, [[8, 4], [4, 8], [8, 4]])).toBe(2);
    expect(dffTrayBound(strips.map((p) => ({ ...p, trays: [{ W: 10, D: 10 }] })))).toBeLessThanOrEqual(2);
  });

  it("pieces cut from one tray always give 1 (the claimed regions of one tray never overlap)", () => {
    const rnd = mulberry32(99);
    for (let t = 0; t < 300; t++) {
      const W = 20 + Math.floor(rnd() * 81);
      const H = t % 2 === 0 ? W : 20 + Math.floor(rnd() * 81);
      const pieces = oneTrayPieces(rnd, W, H, 2 + Math.floor(rnd() * 12));
      expect(claimedAreaTrayBound(pieces, W, H)).toBe(1);
    }
  });

  it("never exceeds the exact optimum on 80 tiny instances of long pieces, wide and tall mixed (classes VII/VIII shrunk to a 10×10 tray)", () => {
    const rnd = mulberry32(77);
    let tight = 0;
    for (let t = 0; t < 80; t++) {
      const W = 10;
      const H = t % 4 === 0 ? 8 : 10;
      const n = 4 + Math.floor(rnd() * 5);
      const items: [number, number][] = [];
      while (items.length < n) {
        const r = rnd();
        // Wide (7–10 × 1–5), tall, large (5–10 both ways) or small (1–5 both ways).
        const long = 7 + Math.floor(rnd() * 4);
        const short = 1 + Math.floor(rnd() * 5);
        const big = () => 5 + Math.floor(rnd() * 6);
        const little = () => 1 + Math.floor(rnd() * 5);
        const [w, h]: [number, number] = r < 0.4 ? [long, short] : r < 0.8 ? [short, long] : r < 0.9 ? [big(), big()] : [little(), little()];
        if ((w <= W && h <= H) || (h <= W && w <= H)) items.push([w, h]);
      }
      const opt = optimumBins(W, H, items);
      const pieces = items.map(([w, h]) => ({ w, h }));
      const claimed = claimedAreaTrayBound(pieces, W, H);
      expect(claimed).toBeLessThanOrEqual(opt);
      const res = packTrays(binInput(W, H, items));
      expect(res.lowerBound.largest).toBeLessThanOrEqual(opt);
      if (claimed === opt) tight++;
    }
    expect(tight).toBeGreaterThan(40);
  });

  it("lifts the bound to the packer's count on a class VII instance (n = 20), which proves that plan optimal", () => {
    // Seed 5 of our class VII generator: area, dual-feasible and short-side bounds all say 5.
    const inst = asTrayInstance(binInstance("VII", 20, 5));
    const pieces = inst.units.map((u) => ({ w: u.footprint_mm[0] - 0.01, h: u.footprint_mm[1] - 0.01 }));
    expect(Math.max(dffTrayBound(pieces.map((p) => ({ ...p, trays: [{ W: 100, D: 100 }] }))), shortSideTrayBound(pieces, 100, 100))).toBe(5);
    expect(claimedAreaTrayBound(pieces, 100, 100)).toBe(6);
    const res = packTrays(inst);
    expect(res.lowerBound.largest).toBe(6);
    expect(res.runs).toHaveLength(6);
  });
});

const small = (min: number, max: number) => fc.integer({ min, max });

const instanceArb = fc
  .record({
    W: small(20, 60),
    H: small(20, 60),
    clearance: fc.constantFrom(0, 0, 1, 2.5),
    trays: small(1, 2),
    load: fc.constantFrom(1e9, 300),
    items: fc.array(fc.tuple(small(2, 40), small(2, 40), small(1, 60)), { minLength: 1, maxLength: 30 }),
  })
  .map(
    (x): FurnaceRunsInstance => ({
      kind: "furnace-runs",
      name: "prop",
      clearance_mm: x.clearance,
      furnaces: [{ id: "F", tray_mm: [x.W, x.H], tray_count: x.trays, usable_height_mm: 50, max_load_g: x.load, profiles: ["P"] }],
      units: x.items.map(([w, h, m], i) => ({ id: `u${i}`, profile: "P", footprint_mm: [w, h], height_mm: 5, mass_g: m, due: DUE })),
    }),
  );

describe("run-removing search", () => {
  it("plans check out, never use more runs than the constructions alone, and repeat for a seed", () => {
    fc.assert(
      fc.property(instanceArb, (inst) => {
        const opts = { search: { seed: 7, work: 8_000 } } as const;
        const a = packTraysReported(inst, opts);
        const b = packTraysReported(inst, opts);
        const before = packTrays(inst, { search: false });
        expect(verifyRuns(inst, toInstanceRuns(a.result.runs), a.result.unplaced).violations).toEqual([]);
        expect(a.result.runs.length).toBeLessThanOrEqual(before.runs.length);
        expect(a.result.runs.length).toBeGreaterThanOrEqual(a.result.lowerBound.largest);
        expect(b.result).toEqual(a.result);
        expect(a.search.start_runs).toBe(before.runs.length);
      }),
      { numRuns: 40 },
    );
  });

  it("finds fewer runs than the constructions on mixed tall and wide pieces (class VIII, n = 100)", () => {
    // Instance picked where the constructions leave a run the search removes (25 → 24 bins).
    const inst = asTrayInstance(binInstance("VIII", 100, 1));
    const rep = packTraysReported(inst, { search: { seed: 1, work: 150_000 } });
    expect(verifyRuns(inst, toInstanceRuns(rep.result.runs), rep.result.unplaced).ok).toBe(true);
    expect(rep.result.runs.length).toBeLessThan(rep.search.start_runs);
  });

  it("where load and room both bind, reaches the bound for every seed tried (generated furnace mixes)", () => {
    // One profile of a generated mix each: A2 of seed 3 (two runs of a 25 kg furnace hold 96 % of
    // their load and 86 % of their trays) and 316L of seed 5 (six runs at 97 % and 94 %). The
    // constructions leave a run too many on both; first-fit repacks alone reached the bound on
    // 3 of 8 seeds and 0 of 8, the dot-product repacks on all of them.
    const cases: [number, string][] = [
      [3, "A2-std"],
      [5, "316L-std"],
    ];
    for (const [mixSeed, profile] of cases) {
      const mix = furnaceMixInstance(mixSeed);
      const inst: FurnaceRunsInstance = { ...mix, units: mix.units.filter((u) => u.profile === profile) };
      for (const seed of [1, 2, 3]) {
        const rep = packTraysReported(inst, { search: { seed, work: 300_000 } });
        expect(rep.search.start_runs).toBe(rep.result.lowerBound.largest + 1);
        expect(rep.result.runs).toHaveLength(rep.result.lowerBound.largest);
        expect(verifyRuns(inst, toInstanceRuns(rep.result.runs), rep.result.unplaced).violations).toEqual([]);
      }
    }
  });

  it("a deadline in the past still returns the constructions' valid plan", () => {
    const inst = asTrayInstance(binInstance("VII", 60, 2));
    let t = 0;
    const rep = packTraysReported(inst, { search: { deadlineMs: 0 }, clock: () => (t += 1) });
    expect(rep.search.stop).toBe("time");
    expect(rep.result.runs.length).toBe(rep.search.start_runs);
    expect(verifyRuns(inst, toInstanceRuns(rep.result.runs), rep.result.unplaced).ok).toBe(true);
  });
});

describe("many pieces that fit one tray", () => {
  it("forty-five pieces cut from one tray, a few trimmed, go back onto one tray for every search seed", () => {
    // The random repacks alone found the layout for 1 seed of 12; the closing move (the emptied
    // run's pieces laid out with the other tray's by the one-tray search) finds it for all.
    const input = binInput(100, 100, PIN_40);
    for (let seed = 1; seed <= 12; seed++) {
      const rep = packTraysReported(input, { search: { seed } });
      expect(rep.result.lowerBound.largest).toBe(1);
      expect(rep.search.start_runs).toBe(2);
      expect(rep.result.runs, `seed ${seed}`).toHaveLength(1);
      expect(verifyRuns(input, toInstanceRuns(rep.result.runs), rep.result.unplaced).violations).toEqual([]);
    }
  });

  it("the one-tray search keeps every piece, leaves at most the spare area empty, and overlaps none", () => {
    const pieces = PIN_40.map(([w, h], i) => ({ w, h, mass: 1, ref: i }));
    const res = packAllOnTray(100, 100, pieces, { tol: 0, workBudget: 1_000_000 });
    expect(res.placements).not.toBeNull();
    const ps = res.placements ?? [];
    expect(new Set(ps.map((p) => p.ref)).size).toBe(PIN_40.length);
    for (const [k, p] of ps.entries()) {
      const [w, h] = PIN_40[p.ref];
      expect(p.rotated ? [p.h, p.w] : [p.w, p.h]).toEqual([w, h]);
      expect(p.x >= 0 && p.y >= 0 && p.x + p.w <= 100 && p.y + p.h <= 100).toBe(true);
      for (const q of ps.slice(k + 1)) {
        const apart = p.x + p.w <= q.x || q.x + q.w <= p.x || p.y + p.h <= q.y || q.y + q.h <= p.y;
        expect(apart).toBe(true);
      }
    }
    // One piece more than the tray's area: no layout, however large the budget.
    const over = packAllOnTray(100, 100, [...pieces, { w: 3, h: 3, mass: 1, ref: -1 }], { tol: 0, workBudget: 1_000_000 });
    expect(over.placements).toBeNull();
  });
});

// A 100×100 tray cut into 45 pieces by guillotine cuts, two of them then trimmed by 1 mm, so the
// tray is no longer tiled exactly. The constructions alone need two trays for it.
const PIN_40: [number, number][] = [[7,5],[4,5],[4,2],[4,3],[4,5],[6,4],[7,6],[4,2],[7,2],[3,2],[5,2],[4,2],[3,5],[7,5],[2,5],[2,5],[4,2],[4,4],[4,4],[7,2],[7,4],[7,4],[3,3],[3,7],[4,4],[6,4],[5,4],[3,4],[3,7],[3,4],[3,3],[7,3],[2,6],[2,2],[5,5],[5,3],[3,5],[3,3],[5,2],[5,6],[5,3],[18,9],[7,24],[25,59],[75,100]];
