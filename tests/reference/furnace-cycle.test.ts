import { describe, expect, it } from "vitest";
import { furnaceCycle, runEnd } from "@/lib/process/furnace-profile";
import { formatDuration } from "@/lib/units";

// REFERENCES §5 cycle-time arithmetic (illustrative profile, not a published recipe):
// 20→600 @5, hold 60, →1350 @5, hold 120, cool to 100 @10 = 571 min = 9.517 h.
const profile = {
  startTempC: 20,
  segments: [
    { rateCPerMin: 5, setpointC: 600, holdMin: 60 },
    { rateCPerMin: 5, setpointC: 1350, holdMin: 120 },
  ],
  coolRateCPerMin: 10,
  coolToC: 100,
};

describe("§5 sinter cycle", () => {
  it("totals 571 min: 116 + 60 + 150 + 120 + 125", () => {
    const c = furnaceCycle(profile);
    expect(c.pieces.map((p) => p.endMinute - p.startMinute)).toEqual([116, 60, 150, 120, 125]);
    expect(c.heatMinutes).toBe(266);
    expect(c.holdMinutes).toBe(180);
    expect(c.coolMinutes).toBe(125);
    expect(c.totalMinutes).toBe(571);
    expect(c.totalMinutes / 60).toBeCloseTo(9.517, 3);
    expect(formatDuration(c.totalMinutes)).toBe("9 h 31 min");
  });

  it("a furnace that cools at most 5 °C/min stretches the cool-down to 250 min", () => {
    const c = furnaceCycle(profile, { maxCoolRateCPerMin: 5 });
    expect(c.coolMinutes).toBe(250);
    expect(c.totalMinutes).toBe(696);
    expect(c.pieces[c.pieces.length - 1].limitedByFurnace).toBe(true);
  });

  it("run end = start + cycle", () => {
    const start = new Date("2026-03-02T06:00:00Z");
    expect(runEnd(start, profile).toISOString()).toBe("2026-03-02T15:31:00.000Z");
  });
});
