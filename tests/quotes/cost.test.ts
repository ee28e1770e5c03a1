import fc from "fast-check";
import { quantileSorted } from "simple-statistics";
import { describe, expect, it } from "vitest";
import { lineCost, type CostLineInput, type CostRates } from "@/lib/quotes/cost";
import { formatMoney, parseMajor, roundMinor } from "@/lib/quotes/money";
import { materialYield, quantityToStart, wilsonInterval, Z95 } from "@/lib/quotes/yield";
import { spreadFrom } from "@/lib/quotes/promise";
import { feedstockDensity } from "@/lib/process/scale-up";

// Wrought 17-4 PH, 7.75 g/cm³: azom.com ArticleID 6778 (as listed in the shared reference
// file, §3). Binder 0.95 g/cm³ and φ = 0.60 are the reference file's §1 worked feedstock.
const RHO_174PH = 7.75;
const RHO_BINDER = 0.95;
const PHI = 0.6;

const rates: CostRates = {
  printer_rate_minor_per_h: 1800,
  wash_batch_cost_minor: 5000,
  wash_batch_volume_cm3: 1000,
  furnace_run_cost_minor: 20000,
  furnace_gas_cost_minor: 5000,
  furnace_energy_cost_minor: 5000,
  finishing_rate_minor_per_h: 6000,
  finishing_min_per_cm2: 0.5,
  inspection_rate_minor_per_h: 6000,
  inspection_min_per_unit: 12,
  overhead_bp: 1500,
  margin_bp: 2000,
};

const input: CostLineInput = {
  quantity: 10,
  yield: materialYield(9, 1, 0.9),
  green_volume_mm3: 10_000,
  green_mm: { x: 30, y: 20, z: 20 },
  nominal_mm: { x: 25, y: 16, z: 16 },
  stock: { x_neg: 0, x_pos: 0, y_neg: 0, y_pos: 0, z_neg: 0, z_pos: 0.3 },
  target_ra_um: 0.8,
  tolerance_um: 20,
  material: {
    code: "17-4PH", feedstock_minor_per_kg: 20_000, infill_fraction: 0.8, support_fraction: 0.2,
    solids_loading: PHI, theoretical_density_g_cm3: RHO_174PH, binder_density_g_cm3: RHO_BINDER,
  },
  printer: { name: "P1", deposition_cm3_per_h: 20, layer_height_mm: 0.2, layer_overhead_s: 6, rate_minor_per_h: null },
  units_per_plate: 10,
  furnace: { name: "F1", tray_x_mm: 300, tray_y_mm: 200, tray_count: 2, run_cost_minor: null, gas_cost_minor: null, energy_cost_minor: null },
  tray_clearance_mm: 5,
};

describe("feedstock density", () => {
  it("is the volume-weighted mix of metal and binder", () => {
    // 0.60 × 7.75 + 0.40 × 0.95 = 4.650 + 0.380 = 5.030 g/cm³
    expect(feedstockDensity(PHI, RHO_174PH, RHO_BINDER)).toBeCloseTo(5.03, 12);
    // The reference file's §1 example with 7.78 g/cm³ gives its stated 5.05 g/cm³ (rounded).
    expect(feedstockDensity(0.6, 7.78, 0.95)).toBeCloseTo(5.05, 2);
  });
});

describe("line cost: a worked example by hand", () => {
  const c = lineCost(input, rates);
  const fig = (k: string) => c.figures.find((f) => f.key === k)!.minor;

  it("starts enough units for the measured yield", () => {
    // yield 9 / (9 + 1) = 0.9; start = ⌈10 / 0.9⌉ = ⌈11.11⌉ = 12
    expect(c.quantity_to_start).toBe(12);
  });
  it("prices every figure as computed by hand", () => {
    // feedstock: V_feed = 10 cm³ × (0.8 + 0.2) = 10 cm³; mass = 10 × 5.03 = 50.3 g;
    //   per unit 0.0503 kg × 20 000 = 1006; × 10 = 10 060
    expect(fig("feedstock")).toBe(10_060);
    // printing: 10 cm³ / 20 cm³/h × 60 = 30 min; layers ⌈20 / 0.2⌉ = 100; 100 × 6 s / 60 / 10 units = 1 min;
    //   31 min / 60 × 1800 = 930 per unit; × 10 = 9300
    expect(fig("printing")).toBe(9_300);
    // wash: 10 cm³ / 1000 cm³ = 0.01 of a batch × 5000 = 50 per unit; × 10 = 500
    expect(fig("wash")).toBe(500);
    // furnace: (30 + 10)(20 + 10) = 1200 mm² of 300 × 200 × 2 = 120 000 mm² → 0.01;
    //   × (20 000 + 5000 + 5000) = 300 per unit; × 10 = 3000
    expect(fig("furnace")).toBe(3_000);
    // finishing: stock on z+ only → 25 × 16 = 400 mm² = 4 cm²; 4 × 0.5 = 2 min; Ra 0.8 → ×2, ±20 µm → ×1.5 → 6 min;
    //   10 × 6 = 60 min × 6000 / 60 = 6000
    expect(fig("finishing")).toBe(6_000);
    // inspection: 10 × 12 min × 6000 / 60 = 12 000
    expect(fig("inspection")).toBe(12_000);
    // scrap: (12 − 10) × (1006 + 930 + 50 + 300) = 2 × 2286 = 4572
    expect(fig("scrap")).toBe(4_572);
    // direct: 10 060 + 9300 + 500 + 3000 + 6000 + 12 000 + 4572 = 45 432
    expect(fig("subtotal")).toBe(45_432);
    // overhead: 45 432 × 15 % = 6814.8 → 6815 (rounded once, halves up)
    expect(fig("overhead")).toBe(6_815);
    // margin: (45 432 + 6815) × 20 % = 52 247 × 0.2 = 10 449.4 → 10 449
    expect(fig("margin")).toBe(10_449);
    // total: 45 432 + 6815 + 10 449 = 62 696; per unit 6269.6 → 6270
    expect(c.total_minor).toBe(62_696);
    expect(c.unit_price_minor).toBe(6_270);
  });
  it("shows each figure's formula and inputs", () => {
    for (const f of c.figures) expect(f.formula.length).toBeGreaterThan(5);
    expect(c.figures.find((f) => f.key === "feedstock")!.inputs.rho_feed_g_cm3).toBe(5.03);
  });
});

describe("line cost: a printer's and a furnace's own rates, by hand", () => {
  // The same line as above on a printer with its own rate of 2400 per hour and a furnace whose
  // own run cost is 26 000 and gas 7000, its energy left to the shop (5000).
  const own = lineCost(
    {
      ...input,
      printer: { ...input.printer, name: "Big P", rate_minor_per_h: 2400 },
      furnace: { ...input.furnace, name: "Big F", run_cost_minor: 26_000, gas_cost_minor: 7000, energy_cost_minor: null },
    },
    rates,
  );
  const fig = (k: string) => own.figures.find((f) => f.key === k)!;

  it("prices printing and the furnace share with the machine's rates and says whose rate it used", () => {
    // printing: 31 min per unit (as above) / 60 × 2400 = 1240 per unit; × 10 = 12 400
    expect(fig("printing").minor).toBe(12_400);
    expect(fig("printing").inputs).toMatchObject({ rate_minor_per_h: 2400, rate_source: "Big P's own rate" });
    expect(fig("printing").formula).toContain("Big P's own rate");
    // furnace: share 0.01 (as above) × (26 000 + 7000 + 5000 = 38 000) = 380 per unit; × 10 = 3800
    expect(fig("furnace").minor).toBe(3_800);
    expect(fig("furnace").inputs).toMatchObject({ run_minor: 26_000, run_source: "Big F", gas_minor: 7000, gas_source: "Big F", energy_minor: 5000, energy_source: "shop" });
    expect(fig("furnace").formula).toContain("energy: shop");
  });
  it("carries the machine's rates into the scrap allowance and the totals", () => {
    // scrap: (12 − 10) × (1006 + 1240 + 50 + 380 = 2676) = 5352
    expect(fig("scrap").minor).toBe(5_352);
    // direct: 10 060 + 12 400 + 500 + 3800 + 6000 + 12 000 + 5352 = 50 112
    expect(fig("subtotal").minor).toBe(50_112);
    // overhead: 50 112 × 15 % = 7516.8 → 7517; margin: (50 112 + 7517) × 20 % = 11 525.8 → 11 526
    expect(fig("overhead").minor).toBe(7_517);
    expect(fig("margin").minor).toBe(11_526);
    // total: 50 112 + 7517 + 11 526 = 69 155; per unit 6915.5 → 6916 (halves up)
    expect(own.total_minor).toBe(69_155);
    expect(own.unit_price_minor).toBe(6_916);
  });
  it("falls back to the shop's rate and says so", () => {
    const shop = lineCost(input, rates).figures.find((f) => f.key === "printing")!;
    expect(shop.inputs).toMatchObject({ rate_minor_per_h: 1800, rate_source: "shop rate (P1 has none of its own)" });
  });
});

describe("money in minor units", () => {
  it("rounds once, halves up, and keeps decimal halves that binary floats blur", () => {
    expect(roundMinor(0.5)).toBe(1);
    expect(roundMinor(2.5)).toBe(3);
    expect(roundMinor(2.4999)).toBe(2);
    // 1.005 × 100 is 100.49999999999999 in binary floating point; the decimal half rounds up.
    expect(roundMinor(1.005 * 100)).toBe(101);
    expect(roundMinor(6814.8)).toBe(6815);
  });
  it("parses typed amounts exactly and formats with the currency's digits", () => {
    expect(parseMajor("12.50", 2)).toBe(1250);
    expect(parseMajor("0,07", 2)).toBe(7);
    expect(parseMajor("1.005", 2)).toBeNull();
    expect(parseMajor("1200", 0)).toBe(1200);
    expect(formatMoney(123456, "EUR", 2)).toContain("1,234.56");
  });
  it("every figure is a whole number and the total is the sum of the rounded figures", () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 500 }), fc.double({ min: 100, max: 200_000, noNaN: true }), fc.integer({ min: 0, max: 5000 }), (q, vol, bp) => {
        const c = lineCost({ ...input, quantity: q, green_volume_mm3: vol }, { ...rates, overhead_bp: bp, margin_bp: bp });
        for (const f of c.figures) expect(Number.isInteger(f.minor)).toBe(true);
        const direct = c.figures.filter((f) => !["subtotal", "overhead", "margin", "total"].includes(f.key)).reduce((s, f) => s + f.minor, 0);
        const get = (k: string) => c.figures.find((f) => f.key === k)!.minor;
        expect(get("subtotal")).toBe(direct);
        expect(c.total_minor).toBe(direct + get("overhead") + get("margin"));
      }),
      { numRuns: 200 },
    );
  });
});

describe("yield and its Wilson score interval", () => {
  // E. B. Wilson (1927), J. Am. Stat. Assoc. 22:209–212: the interval is the set of p for which
  // the score statistic |p̂ − p| / √(p(1 − p)/n) ≤ z. Checked here by that definition, not by the formula.
  it("its bounds are where the score statistic equals z", () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 2000 }), fc.double({ min: 0, max: 1, noNaN: true }), (n, f) => {
        const k = Math.round(f * n);
        const w = wilsonInterval(k, n);
        const p = k / n;
        const score = (x: number) => Math.abs(p - x) / Math.sqrt((x * (1 - x)) / n);
        if (w.low > 1e-9) expect(score(w.low)).toBeCloseTo(Z95, 6);
        if (w.high < 1 - 1e-9) expect(score(w.high)).toBeCloseTo(Z95, 6);
        expect(w.low).toBeLessThanOrEqual(p + 1e-12);
        expect(w.high).toBeGreaterThanOrEqual(p - 1e-12);
      }),
      { numRuns: 300 },
    );
  });
  it("with no failures in n the upper bound is 1 and the lower is n/(n + z²)", () => {
    // k = n = 10: low = 10 / (10 + 3.8415) = 0.72247
    const w = wilsonInterval(10, 10);
    expect(w.high).toBe(1);
    expect(w.low).toBeCloseTo(10 / (10 + Z95 * Z95), 12);
  });
  it("falls back when nothing is recorded, and starts the right count", () => {
    expect(materialYield(0, 0, 0.85)).toMatchObject({ estimate: 0.85, source: "fallback", interval: null });
    expect(quantityToStart(9, 0.9)).toBe(10);
    expect(quantityToStart(10, 1)).toBe(10);
    expect(quantityToStart(100, 0.95)).toBe(106);
  });
});

describe("spread of real durations", () => {
  it("is the p90 of actual ÷ planned, the same as simple-statistics' quantile (type 7)", () => {
    fc.assert(
      fc.property(fc.array(fc.double({ min: 0.5, max: 3, noNaN: true }), { minLength: 5, maxLength: 60 }), (xs) => {
        const sorted = [...xs].sort((a, b) => a - b);
        expect(spreadFrom(xs, 1.25).p90_ratio).toBeCloseTo(Math.max(1, quantileSorted(sorted, 0.9)), 12);
      }),
    );
  });
  it("uses the fallback, marked as such, with too little history", () => {
    expect(spreadFrom([1.1, 1.2], 1.25)).toEqual({ p90_ratio: 1.25, samples: 2, source: "fallback" });
  });
});
