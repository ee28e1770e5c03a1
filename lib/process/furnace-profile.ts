import { z } from "zod";
import { ComputationError } from "@/lib/errors";
import { parseInput, requireValidDate } from "@/lib/process/validate";

// Sinter furnace cycle from a profile of ramp-to-set-point segments with holds and a final
// cool-down. Ramp time is |ΔT|/rate from wherever the previous segment left the furnace. A
// furnace cannot cool faster than it can shed heat, so any downward ramp, and the cool-down,
// runs at the slower of the programmed rate and the furnace's limit.

const ABSOLUTE_ZERO_C = -273.15;

const temperatureSchema = z
  .number()
  .gt(ABSOLUTE_ZERO_C, "a temperature must be above absolute zero")
  .lt(3000, "a set-point above 3000 °C is not a sintering temperature");

export const profileSegmentSchema = z.object({
  rateCPerMin: z.number().positive("a ramp rate must be greater than 0 °C/min"),
  setpointC: temperatureSchema,
  holdMin: z.number().nonnegative("a hold cannot be negative").default(0),
});
export type ProfileSegment = z.input<typeof profileSegmentSchema>;

export const sinterProfileSchema = z.object({
  startTempC: temperatureSchema.default(20),
  segments: z.array(profileSegmentSchema).min(1, "a profile needs at least one segment"),
  coolRateCPerMin: z.number().positive("the cool-down rate must be greater than 0 °C/min"),
  coolToC: temperatureSchema.default(100),
});
export type SinterProfile = z.input<typeof sinterProfileSchema>;

export const furnaceLimitsSchema = z.object({
  maxCoolRateCPerMin: z.number().positive(),
});
export type FurnaceLimits = z.input<typeof furnaceLimitsSchema>;

export type CyclePhase = "ramp" | "hold" | "cool";

export type CyclePiece = {
  phase: CyclePhase;
  startMinute: number;
  endMinute: number;
  fromC: number;
  toC: number;
  /** Rate actually used, °C/min (0 for a hold). */
  rateCPerMin: number;
  /** The furnace's cooling limit slowed this piece below the programmed rate. */
  limitedByFurnace: boolean;
};

export type FurnaceCycle = {
  /** Programmed ramp segments (heating, or a programmed step down). */
  heatMinutes: number;
  holdMinutes: number;
  /** Final cool-down from the last set-point to the cool-to temperature. */
  coolMinutes: number;
  totalMinutes: number;
  peakC: number;
  pieces: CyclePiece[];
};

export function validateProfile(profile: SinterProfile) {
  const p = parseInput(sinterProfileSchema, profile, "sinter profile");
  const last = p.segments[p.segments.length - 1].setpointC;
  if (p.coolToC > last) {
    throw new ComputationError(
      `the cool-down ends at ${p.coolToC} °C, above the last set-point ${last} °C`,
      "coolToC",
    );
  }
  return p;
}

function cyclePieces(profile: SinterProfile, furnace?: FurnaceLimits): CyclePiece[] {
  const p = validateProfile(profile);
  const f = furnace ? parseInput(furnaceLimitsSchema, furnace, "furnace") : undefined;
  const pieces: CyclePiece[] = [];
  let minute = 0;
  let temp = p.startTempC;
  const push = (phase: CyclePhase, minutes: number, toC: number, rate: number, limited: boolean) => {
    pieces.push({
      phase,
      startMinute: minute,
      endMinute: minute + minutes,
      fromC: temp,
      toC,
      rateCPerMin: rate,
      limitedByFurnace: limited,
    });
    minute += minutes;
    temp = toC;
  };
  for (const seg of p.segments) {
    const delta = seg.setpointC - temp;
    // A repeated set-point is a ramp of zero length: the segment then acts as a hold.
    if (delta !== 0) {
      const limit = delta < 0 && f ? f.maxCoolRateCPerMin : Infinity;
      const rate = Math.min(seg.rateCPerMin, limit);
      push("ramp", Math.abs(delta) / rate, seg.setpointC, rate, rate < seg.rateCPerMin);
    }
    if (seg.holdMin > 0) push("hold", seg.holdMin, seg.setpointC, 0, false);
  }
  const drop = temp - p.coolToC;
  if (drop > 0) {
    const rate = Math.min(p.coolRateCPerMin, f ? f.maxCoolRateCPerMin : Infinity);
    push("cool", drop / rate, p.coolToC, rate, rate < p.coolRateCPerMin);
  }
  if (pieces.length === 0) {
    throw new ComputationError("the profile neither ramps, holds nor cools: it has no cycle", "segments");
  }
  return pieces;
}

export function furnaceCycle(profile: SinterProfile, furnace?: FurnaceLimits): FurnaceCycle {
  const pieces = cyclePieces(profile, furnace);
  const sum = (phase: CyclePhase) =>
    pieces.filter((x) => x.phase === phase).reduce((acc, x) => acc + (x.endMinute - x.startMinute), 0);
  const heatMinutes = sum("ramp");
  const holdMinutes = sum("hold");
  const coolMinutes = sum("cool");
  const start = sinterProfileSchema.shape.startTempC.parse(profile.startTempC);
  return {
    heatMinutes,
    holdMinutes,
    coolMinutes,
    totalMinutes: heatMinutes + holdMinutes + coolMinutes,
    peakC: Math.max(start, ...pieces.map((x) => x.toC)),
    pieces,
  };
}

export type CurvePoint = { minute: number; tempC: number; phase: CyclePhase };

/**
 * Temperature against time for charts: every corner of the profile, plus points every
 * `stepMinutes` inside long pieces. A corner carries the phase of the piece it starts; the
 * last point carries the phase of the piece it ends.
 */
export function profileCurve(profile: SinterProfile, furnace?: FurnaceLimits, stepMinutes = 10): CurvePoint[] {
  if (!(stepMinutes > 0) || !Number.isFinite(stepMinutes)) {
    throw new ComputationError(`the sampling step must be greater than 0 min (got ${stepMinutes})`, "stepMinutes");
  }
  const pieces = cyclePieces(profile, furnace);
  const points: CurvePoint[] = [];
  for (const piece of pieces) {
    const length = piece.endMinute - piece.startMinute;
    points.push({ minute: piece.startMinute, tempC: piece.fromC, phase: piece.phase });
    for (let m = Math.floor(piece.startMinute / stepMinutes + 1) * stepMinutes; m < piece.endMinute - 1e-9; m += stepMinutes) {
      const fraction = (m - piece.startMinute) / length;
      points.push({ minute: m, tempC: piece.fromC + (piece.toC - piece.fromC) * fraction, phase: piece.phase });
    }
  }
  const last = pieces[pieces.length - 1];
  points.push({ minute: last.endMinute, tempC: last.toC, phase: last.phase });
  return points;
}

/** When a run started at `start` finishes its cycle. */
export function runEnd(start: Date, profile: SinterProfile, furnace?: FurnaceLimits): Date {
  requireValidDate(start, "start");
  const { totalMinutes } = furnaceCycle(profile, furnace);
  return new Date(start.getTime() + Math.round(totalMinutes * 60_000));
}
