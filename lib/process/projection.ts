import { z } from "zod";
import { ComputationError } from "@/lib/errors";
import { parseInput } from "@/lib/process/validate";
import { nextStaffedTime, timeZoneSchema, weeklyPatternSchema } from "@/lib/process/time-zone";

// Projected completion of a unit through print → wash → drying → furnace → finishing. A step
// that is done or booked keeps its own end; an unbooked step is queued after the step before
// it (and not before `now`), and a start that needs a person waits for staffed hours.

export const STEP_ORDER = ["print", "wash", "drying", "furnace", "finishing"] as const;
export type StepName = (typeof STEP_ORDER)[number];

const dateSchema = z.date().refine((d) => !Number.isNaN(d.getTime()), "an invalid date");

export const stepStateSchema = z.discriminatedUnion("status", [
  /** Finished: `end` is when it actually ended. */
  z.object({ status: z.literal("done"), end: dateSchema }),
  /** On the calendar: the booking's own times are used. */
  z
    .object({ status: z.literal("booked"), start: dateSchema, end: dateSchema })
    .refine((s) => s.start.getTime() < s.end.getTime(), "a booking must end after it starts"),
  /** Not booked yet: estimated from its duration. */
  z.object({ status: z.literal("unbooked"), minutes: z.number().nonnegative() }),
]);
export type StepState = z.infer<typeof stepStateSchema>;

export const staffingSchema = z.object({ pattern: weeklyPatternSchema, timeZone: timeZoneSchema });

export const unitProjectionInputSchema = z.object({
  now: dateSchema,
  dueAt: dateSchema,
  steps: z.object({
    print: stepStateSchema,
    wash: stepStateSchema,
    drying: stepStateSchema,
    furnace: stepStateSchema,
    finishing: stepStateSchema,
  }),
  /** How close to the due date still counts as at risk, minutes. */
  atRiskMarginMinutes: z.number().nonnegative(),
  /** Omit to ignore staffed hours (a shop that has not set them). */
  staffing: staffingSchema.optional(),
});
export type UnitProjectionInput = z.input<typeof unitProjectionInputSchema>;

export type ProjectionStatus = "on_time" | "at_risk" | "late";

export type ProjectedStep = {
  step: StepName;
  source: "done" | "booked" | "estimated";
  start?: Date;
  end: Date;
  /** Booked or estimated to start before the step it follows is projected to end. */
  startsBeforePrevious: boolean;
};

export type UnitProjection = {
  steps: ProjectedStep[];
  projectedEnd: Date;
  dueAt: Date;
  /** Due date minus projected end, minutes (negative = late). */
  slackMinutes: number;
  status: ProjectionStatus;
};

/** Someone must start the printer, load the wash and load and unload the furnace. */
const NEEDS_STAFF_AT_START: Record<StepName, boolean> = {
  print: true,
  wash: true,
  drying: false,
  furnace: true,
  finishing: false,
};

export function projectionStatus(projectedEnd: Date, dueAt: Date, marginMinutes: number): ProjectionStatus {
  const slack = dueAt.getTime() - projectedEnd.getTime();
  if (slack < 0) return "late";
  if (slack < marginMinutes * 60_000) return "at_risk";
  return "on_time";
}

export function projectUnit(input: UnitProjectionInput): UnitProjection {
  const p = parseInput(unitProjectionInputSchema, input, "projection");
  const staffed = (t: number) =>
    p.staffing ? nextStaffedTime(new Date(t), p.staffing.pattern, p.staffing.timeZone).getTime() : t;
  const now = p.now.getTime();
  let cursor = now;
  let previousEnd: number | undefined;
  const steps: ProjectedStep[] = [];
  for (const name of STEP_ORDER) {
    const state = p.steps[name];
    if (state.status === "done") {
      cursor = Math.max(cursor, state.end.getTime());
      steps.push({ step: name, source: "done", end: state.end, startsBeforePrevious: false });
    } else if (state.status === "booked") {
      const start = state.start.getTime();
      steps.push({
        step: name,
        source: "booked",
        start: state.start,
        end: state.end,
        startsBeforePrevious: previousEnd !== undefined && start < previousEnd,
      });
      cursor = state.end.getTime();
    } else {
      let start = Math.max(cursor, now);
      if (state.minutes > 0 && NEEDS_STAFF_AT_START[name]) start = staffed(start);
      let end = start + state.minutes * 60_000;
      // The furnace's parts are out only once someone has unloaded it.
      if (name === "furnace" && state.minutes > 0) end = staffed(end);
      steps.push({ step: name, source: "estimated", start: new Date(start), end: new Date(end), startsBeforePrevious: false });
      cursor = end;
    }
    previousEnd = steps[steps.length - 1].end.getTime();
  }
  const projectedEnd = new Date(Math.max(...steps.map((s) => s.end.getTime())));
  return {
    steps,
    projectedEnd,
    dueAt: p.dueAt,
    slackMinutes: (p.dueAt.getTime() - projectedEnd.getTime()) / 60_000,
    status: projectionStatus(projectedEnd, p.dueAt, p.atRiskMarginMinutes),
  };
}

export type OrderProjection = {
  projectedEnd: Date;
  dueAt: Date;
  slackMinutes: number;
  status: ProjectionStatus;
  /** Index of the unit that finishes last. */
  latestUnitIndex: number;
};

/** An order is done when its last unit is. */
export function projectOrder(dueAt: Date, units: UnitProjection[], atRiskMarginMinutes: number): OrderProjection {
  if (!(dueAt instanceof Date) || Number.isNaN(dueAt.getTime())) {
    throw new ComputationError("the due date is not a valid date", "dueAt");
  }
  if (units.length === 0) throw new ComputationError("an order projection needs at least one unit", "units");
  if (!(atRiskMarginMinutes >= 0)) {
    throw new ComputationError("the at-risk margin must be ≥ 0 minutes", "atRiskMarginMinutes");
  }
  let latestUnitIndex = 0;
  units.forEach((u, i) => {
    if (u.projectedEnd.getTime() > units[latestUnitIndex].projectedEnd.getTime()) latestUnitIndex = i;
  });
  const projectedEnd = units[latestUnitIndex].projectedEnd;
  return {
    projectedEnd,
    dueAt,
    slackMinutes: (dueAt.getTime() - projectedEnd.getTime()) / 60_000,
    status: projectionStatus(projectedEnd, dueAt, atRiskMarginMinutes),
    latestUnitIndex,
  };
}
