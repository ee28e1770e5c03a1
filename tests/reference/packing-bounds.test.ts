import { describe, expect, it } from "vitest";
import { continuousBound, firstFitDecreasing, martelloTothL2 } from "@/lib/packing/one-dimensional";
import { packTrays } from "@/lib/packing/trays";
import type { PackUnit } from "@/lib/packing/types";
import { prng } from "@/bench/generate-instances";

const unit = (id: string, w: number, d: number, mass: number): PackUnit => ({
  id,
  profile: "P",
  footprint_mm: [w, d],
  height_mm: 20,
  mass_g: mass,
  due: "2027-01-10T00:00:00Z",
});

describe("continuous bound L1 (worked example, computed by hand)", () => {
  // 10 parts 60×40 mm (250 g) + 6 parts 80×50 mm (600 g) on a 300×200 mm tray with a 3 kg limit.
  const units = [
    ...Array.from({ length: 10 }, (_, i) => unit(`a${i}`, 60, 40, 250)),
    ...Array.from({ length: 6 }, (_, i) => unit(`b${i}`, 80, 50, 600)),
  ];
  const furnace = { id: "F", tray_mm: [300, 200] as const, tray_count: 1, usable_height_mm: 100, max_load_g: 3000, profiles: ["P"] };

  it("gives area ⌈48000/60000⌉ = 1 and mass ⌈6.1/3.0⌉ = 3", () => {
    expect(continuousBound([...Array(10).fill(2400), ...Array(6).fill(4000)], 60_000)).toBe(1);
    expect(continuousBound([...Array(10).fill(250), ...Array(6).fill(600)], 3000)).toBe(3);
  });

  it("combined bound is 3 runs, and the packer needs exactly 3", () => {
    const res = packTrays({ clearance_mm: 0, furnaces: [furnace], units });
    expect(res.lowerBound.area).toBe(1);
    expect(res.lowerBound.mass).toBe(3);
    expect(res.lowerBound.largest).toBe(3);
    expect(res.runs).toHaveLength(3);
  });
});

// Citation details from memory; the bound and its worked value are checkable by hand.
describe("Martello & Toth L2 (Discrete Applied Mathematics 28, 1990)", () => {
  it("{6, 6, 6, 6} with C = 10: L1 = 3 but L2 = 4 (worked example, computed by hand)", () => {
    expect(continuousBound([6, 6, 6, 6], 10)).toBe(3);
    expect(martelloTothL2([6, 6, 6, 6], 10)).toBe(4);
    expect(firstFitDecreasing([6, 6, 6, 6], 10)).toHaveLength(4);
  });

  it("counts the items over C/2 and what cannot join them", () => {
    // α = 3: J1 = {8} (> 7), J2 = {6} , J3 = {3, 3, 3}; spare room beside J2 is 4, so ⌈(9 − 4)/10⌉ = 1 more.
    expect(martelloTothL2([8, 6, 3, 3, 3], 10)).toBe(3);
    expect(continuousBound([8, 6, 3, 3, 3], 10)).toBe(3);
    expect(martelloTothL2([9, 9, 9, 2], 10)).toBe(4);
  });

  it("rejects an item larger than the bin instead of returning a meaningless bound", () => {
    expect(() => martelloTothL2([11], 10)).toThrow();
    expect(() => continuousBound([1, Number.NaN], 10)).toThrow();
  });
});

/** k full bins of capacity C cut into integer pieces: OPT = k, since the pieces fill k bins exactly. */
function cutBins(seed: number, k: number, C: number): number[] {
  const rnd = prng(seed);
  const items: number[] = [];
  for (let b = 0; b < k; b++) {
    let left = C;
    while (left > 0) {
      const piece = Math.min(left, 1 + Math.floor(rnd() * (C * 0.6)));
      items.push(piece);
      left -= piece;
    }
  }
  return items;
}

// LNCS volume and pages of the ESCAPE paper from memory.
describe("First Fit Decreasing bound FFD ≤ 11/9·OPT + 6/9 (Dósa, ESCAPE 2007; Dósa et al., TCS 510, 2013)", () => {
  it("floors of the bound for small OPT (computed by hand)", () => {
    const bound = (opt: number) => Math.floor((11 / 9) * opt + 6 / 9);
    expect([1, 2, 3, 5, 9, 10].map(bound)).toEqual([1, 3, 4, 6, 11, 12]);
  });

  it("holds on 300 generated instances with a known optimum, and L1 ≤ L2 ≤ OPT there", () => {
    let worst = 0;
    for (let seed = 1; seed <= 300; seed++) {
      const k = 1 + (seed % 12);
      const C = 100;
      const items = cutBins(seed, k, C);
      const ffd = firstFitDecreasing(items, C).length;
      expect(ffd).toBeLessThanOrEqual(Math.floor((11 / 9) * k + 6 / 9));
      const l1 = continuousBound(items, C);
      const l2 = martelloTothL2(items, C);
      expect(l1).toBe(k);
      expect(l2).toBeGreaterThanOrEqual(l1);
      expect(l2).toBeLessThanOrEqual(k);
      worst = Math.max(worst, ffd / k);
    }
    expect(worst).toBeGreaterThanOrEqual(1);
  });

  it("every FFD bin respects the capacity and every item is placed once", () => {
    const items = cutBins(7, 9, 100);
    const bins = firstFitDecreasing(items, 100);
    expect(bins.flat().sort((a, b) => a - b)).toEqual(items.map((_, i) => i));
    for (const b of bins) expect(b.reduce((s, i) => s + items[i], 0)).toBeLessThanOrEqual(100);
  });
});

describe("tray count bound: pieces over half a tray both ways cannot share a tray", () => {
  it("five 160×155 pieces on 300×250 trays, two trays per run → at least ⌈5/2⌉ = 3 runs", () => {
    // Over 150 × 125 in both orientations, so no two can sit side by side or one above the other.
    const units = Array.from({ length: 5 }, (_, i) => unit(`p${i}`, 160, 155, 10));
    const furnace = { id: "F", tray_mm: [300, 250] as const, tray_count: 2, usable_height_mm: 100, max_load_g: 1e6, profiles: ["P"] };
    const res = packTrays({ clearance_mm: 0, furnaces: [furnace], units });
    expect(res.lowerBound.area).toBe(1);
    expect(res.lowerBound.count).toBe(3);
    expect(res.lowerBound.largest).toBe(3);
    expect(res.runs).toHaveLength(3);
  });

  it("a piece that fits beside another once turned does not count", () => {
    // 160×130 turned is 130×160: two side by side need 260 ≤ 300.
    const turned = packTrays({
      clearance_mm: 0,
      furnaces: [{ id: "F", tray_mm: [300, 250], tray_count: 2, usable_height_mm: 100, max_load_g: 1e6, profiles: ["P"] }],
      units: Array.from({ length: 5 }, (_, i) => unit(`t${i}`, 160, 130, 10)),
    });
    expect(turned.lowerBound.count).toBe(0);
    expect(turned.runs).toHaveLength(2);

    const units = Array.from({ length: 4 }, (_, i) => unit(`q${i}`, 160, 120, 10));
    const furnace = { id: "F", tray_mm: [300, 250] as const, tray_count: 1, usable_height_mm: 100, max_load_g: 1e6, profiles: ["P"] };
    const res = packTrays({ clearance_mm: 0, furnaces: [furnace], units });
    expect(res.lowerBound.count).toBe(0);
    expect(res.runs).toHaveLength(2);
  });
});
