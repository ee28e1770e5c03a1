import { describe, expect, it } from "vitest";
import { ComputationError } from "@/lib/errors";
import { furnaceCycle, profileCurve, runEnd, validateProfile } from "@/lib/process/furnace-profile";

const base = {
  startTempC: 20,
  segments: [
    { rateCPerMin: 5, setpointC: 600, holdMin: 60 },
    { rateCPerMin: 5, setpointC: 1350, holdMin: 120 },
  ],
  coolRateCPerMin: 10,
  coolToC: 100,
};

describe("profile validation", () => {
  it.each([
    ["no segments", { ...base, segments: [] }],
    ["zero rate", { ...base, segments: [{ rateCPerMin: 0, setpointC: 600 }] }],
    ["negative rate", { ...base, segments: [{ rateCPerMin: -5, setpointC: 600 }] }],
    ["NaN set-point", { ...base, segments: [{ rateCPerMin: 5, setpointC: NaN }] }],
    ["infinite set-point", { ...base, segments: [{ rateCPerMin: 5, setpointC: Infinity }] }],
    ["negative hold", { ...base, segments: [{ rateCPerMin: 5, setpointC: 600, holdMin: -1 }] }],
    ["zero cool rate", { ...base, coolRateCPerMin: 0 }],
    ["cool-to above last set-point", { ...base, coolToC: 1400 }],
  ])("%s is refused", (_name, profile) => {
    expect(() => furnaceCycle(profile as never)).toThrow(ComputationError);
  });

  it("a repeated set-point is allowed and acts as a hold", () => {
    const c = furnaceCycle({
      ...base,
      segments: [
        { rateCPerMin: 5, setpointC: 600 },
        { rateCPerMin: 5, setpointC: 600, holdMin: 30 },
      ],
      coolToC: 100,
    });
    expect(c.heatMinutes).toBe(116);
    expect(c.holdMinutes).toBe(30);
    expect(c.coolMinutes).toBe(50);
  });

  it("defaults: start at 20 °C, cool to 100 °C, holds 0", () => {
    const p = validateProfile({ segments: [{ rateCPerMin: 10, setpointC: 1000 }], coolRateCPerMin: 10 });
    expect(p.startTempC).toBe(20);
    expect(p.coolToC).toBe(100);
    expect(p.segments[0].holdMin).toBe(0);
  });
});

describe("cycle arithmetic", () => {
  it("a programmed step down is a ramp limited by the furnace's cooling", () => {
    const profile = {
      ...base,
      segments: [
        { rateCPerMin: 10, setpointC: 1350, holdMin: 60 },
        { rateCPerMin: 20, setpointC: 1150, holdMin: 30 },
      ],
    };
    const free = furnaceCycle(profile);
    expect(free.heatMinutes).toBeCloseTo(133 + 10, 12);
    const limited = furnaceCycle(profile, { maxCoolRateCPerMin: 4 });
    expect(limited.heatMinutes).toBeCloseTo(133 + 50, 12);
    expect(limited.pieces[2].limitedByFurnace).toBe(true);
    expect(limited.coolMinutes).toBeCloseTo(1050 / 4, 12);
  });

  it("a furnace faster than the programme does not speed it up", () => {
    expect(furnaceCycle(base, { maxCoolRateCPerMin: 50 }).coolMinutes).toBe(125);
  });

  it("starting above the first set-point ramps down to it", () => {
    const c = furnaceCycle({ ...base, startTempC: 700 });
    expect(c.pieces[0].fromC).toBe(700);
    expect(c.pieces[0].endMinute).toBe(20);
  });
});

describe("profile curve", () => {
  it("includes every corner, samples in between, and ends at the cool-to temperature", () => {
    const curve = profileCurve(base, undefined, 10);
    const corners = [0, 116, 176, 326, 446, 571];
    for (const m of corners) expect(curve.some((p) => p.minute === m)).toBe(true);
    expect(curve[0]).toEqual({ minute: 0, tempC: 20, phase: "ramp" });
    expect(curve[curve.length - 1]).toEqual({ minute: 571, tempC: 100, phase: "cool" });
    const at = (m: number) => curve.find((p) => p.minute === m)!;
    expect(at(50).tempC).toBeCloseTo(270, 12);
    expect(at(150).tempC).toBe(600);
    expect(at(200).tempC).toBeCloseTo(720, 12);
    expect(at(150).phase).toBe("hold");
    expect(at(116).phase).toBe("hold");
    for (let i = 1; i < curve.length; i++) expect(curve[i].minute).toBeGreaterThan(curve[i - 1].minute);
    for (let i = 1; i < curve.length; i++) expect(curve[i].minute - curve[i - 1].minute).toBeLessThanOrEqual(10 + 1e-9);
  });

  it("a coarse step still keeps the corners", () => {
    const curve = profileCurve(base, undefined, 1000);
    expect(curve.map((p) => p.minute)).toEqual([0, 116, 176, 326, 446, 571]);
    expect(() => profileCurve(base, undefined, 0)).toThrow(ComputationError);
  });
});

describe("run end", () => {
  it("start + total cycle, with the furnace limit", () => {
    const start = new Date("2026-03-02T06:00:00Z");
    expect(runEnd(start, base, { maxCoolRateCPerMin: 5 }).toISOString()).toBe("2026-03-02T17:36:00.000Z");
    expect(() => runEnd(new Date("nope"), base)).toThrow(ComputationError);
  });
});
