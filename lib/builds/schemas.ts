import { z } from "zod";
import { boundedInstant, multiLine, rowVersionNumber, singleLine } from "@/lib/input-fields";

const version = rowVersionNumber("the row's version is required");
const instant = boundedInstant("an ISO 8601 time with its offset, e.g. 2026-12-01T08:00:00Z");

export const createBuildSchema = z.object({
  unit_ids: z.array(z.string().uuid("not a unit id"), { error: "choose the units to print" }).min(1, "choose at least one unit").max(200, "at most 200 units on one plate"),
  material_lot: singleLine().trim().max(60).default(""),
  notes: multiLine().trim().max(2000).default(""),
});
export type CreateBuild = z.output<typeof createBuildSchema>;

export const updateBuildSchema = z.object({
  version,
  material_lot: singleLine().trim().max(60).optional(),
  /** The feedstock lot to print from; null leaves the choice to first-expiring-first-out at start. */
  feedstock_lot_id: z.string().uuid("choose a lot").nullable().optional(),
  notes: multiLine().trim().max(2000).optional(),
  /** Replaces the build's units; only while the build is a draft or scheduled. */
  unit_ids: createBuildSchema.shape.unit_ids.optional(),
});
export type UpdateBuild = z.output<typeof updateBuildSchema>;

/** Weighed feedstock the build really used (spool before minus after), replacing the estimate. */
const feedstockUsed = z.coerce.number({ error: "feedstock used must be a number of kg" }).finite().min(0, "cannot be negative").max(1000, "at most 1000 kg").optional();

export const buildActionSchema = z.discriminatedUnion("action", [
  z.object({ action: z.literal("start"), version }),
  z.object({ action: z.literal("complete"), version, feedstock_used_kg: feedstockUsed }),
  z.object({ action: z.literal("fail"), version, reason: singleLine({ error: "say what went wrong" }).trim().min(3, "say what went wrong").max(500), feedstock_used_kg: feedstockUsed }),
  z.object({ action: z.literal("cancel"), version }),
], { error: "action must be start, complete, fail or cancel" });
export type BuildAction = z.output<typeof buildActionSchema>;

/**
 * Put a build on a printer at a start time, or (printer_id null) take it off the floor. The
 * end follows from the printer's estimate, so it is never sent.
 */
export const scheduleBuildSchema = z
  .object({
    version,
    printer_id: z.string().uuid("not a printer id").nullable(),
    starts_at: instant.optional(),
  })
  .superRefine((v, ctx) => {
    if (v.printer_id && !v.starts_at) ctx.addIssue({ code: "custom", path: ["starts_at"], message: "a start time is required" });
  });
export type ScheduleBuild = z.output<typeof scheduleBuildSchema>;

export const BUILD_STATES = ["draft", "scheduled", "running", "complete", "cancelled"] as const;
export type BuildState = (typeof BUILD_STATES)[number];
