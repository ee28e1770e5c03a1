// Inputs of the batching API, shared by the route handlers and the forms.

import { z } from "zod";
import { boundedInstant, multiLine, rowVersion, singleLine } from "@/lib/input-fields";
import { validateProfile } from "@/lib/process/furnace-profile";
import { CHECKLIST_KEYS } from "./checklist";

const id = z.uuid("not a valid id");
const version = rowVersion();
const instant = boundedInstant("a date and time with its offset, e.g. 2027-01-04T06:00:00Z");
const mass = z.coerce.number().positive("a mass must be greater than 0 g").max(1_000_000, "a mass above 1000 kg is not a part");

export const SCRAP_REASONS = ["print_failure", "crack", "slump", "warp", "out_of_tolerance", "other"] as const;

export const createWashBatchSchema = z.object({
  wash_station_id: id,
  notes: multiLine().max(2000).default(""),
});

export const createFurnaceRunSchema = z.object({
  furnace_id: id,
  profile_id: id,
  notes: multiLine().max(2000).default(""),
});

export const scheduleWashBatchSchema = z.object({
  version,
  starts_at: instant,
  wash_station_id: id.optional(),
});

export const scheduleFurnaceRunSchema = z.object({
  version,
  starts_at: instant,
  furnace_id: id.optional(),
  /** The floor refuses a resize: a run lasts as long as its profile's cycle. */
  ends_at: instant.optional(),
});

export const addUnitSchema = z.object({
  version,
  unit_id: id,
  unit_version: version,
});

export const removeUnitSchema = z.object({
  version,
  unit_version: version.optional(),
});

export const versionSchema = z.object({ version });

export const cancelSchema = z.object({ version, reason: singleLine().max(500).default("") });

export const unitMassSchema = z.object({
  unit_id: id,
  green_mass_g: mass.optional(),
  brown_mass_g: mass.optional(),
});

export const recordMassesSchema = z.object({
  version,
  masses: z.array(unitMassSchema).min(1, "enter at least one mass"),
});

export const finishWashSchema = z.object({
  version,
  masses: z.array(unitMassSchema).default([]),
});

export const startRunSchema = z.object({
  version,
  checklist: z
    .record(z.string(), z.boolean())
    .refine((c) => CHECKLIST_KEYS.every((k) => c[k] === true), {
      message: "every item of the loading checklist must be ticked before the run starts",
    })
    // The refinement is code, which JSON Schema cannot carry: say the same rule in the description.
    .meta({
      description: "Every item of the loading checklist, ticked (true).",
      required: [...CHECKLIST_KEYS],
      properties: Object.fromEntries(CHECKLIST_KEYS.map((k) => [k, { const: true }])),
    }),
});

export const unloadOutcomeSchema = z
  .object({
    unit_id: id,
    outcome: z.enum(["sintered", "scrapped"]),
    scrap_reason: z.enum(SCRAP_REASONS).optional(),
    scrap_note: multiLine().max(500).optional(),
  })
  .refine((o) => o.outcome !== "scrapped" || o.scrap_reason, { message: "a scrapped unit needs a reason", path: ["scrap_reason"] });

export const unloadRunSchema = z.object({
  version,
  outcomes: z.array(unloadOutcomeSchema).min(1, "give an outcome for every unit"),
});

export const suggestSchema = z.object({
  wash: z.boolean().default(true),
  furnace: z.boolean().default(true),
  /** Also plan units still washing whose wash ends within this many hours. */
  horizon_hours: z.coerce.number().min(0).max(24 * 14).default(48),
  /** Only units whose material's default profile is one of these (the board's profile filter). */
  profile_ids: z.array(id).max(50).optional(),
  /** Time the packer's search may take, ms; "search longer" on the board asks for more. */
  budget_ms: z.coerce.number().int().min(200).max(30_000).default(1_000),
});

export const applyProposalSchema = z.object({ proposal_id: id });

export const refuseProposalSchema = z.object({ proposal_id: id, reason: singleLine().max(500).default("") });

// Sinter profiles -----------------------------------------------------------------------------

const temperature = z.coerce.number().gt(-50, "a temperature must be above −50 °C").lt(2000, "a set-point must be below 2000 °C");

export const profileSegmentInputSchema = z.object({
  rate_c_per_min: z.coerce.number().positive("a ramp rate must be greater than 0 °C/min").max(100, "a ramp above 100 °C/min is not a furnace program"),
  setpoint_c: temperature,
  hold_min: z.coerce.number().min(0, "a hold cannot be negative").max(10_000, "a hold above 10 000 min is not a furnace program").default(0),
});

const profileFields = z.object({
  code: singleLine().trim().min(1, "a code is needed").max(40).regex(/^[A-Za-z0-9][A-Za-z0-9._-]*$/, "letters, digits, dot, dash and underscore"),
  name: singleLine().trim().min(1, "a name is needed").max(120),
  atmosphere: singleLine().trim().min(1, "say which atmosphere the run uses").max(200),
  start_temp_c: temperature.default(20),
  cool_rate_c_per_min: z.coerce.number().positive("the cool-down rate must be greater than 0 °C/min").max(100),
  cool_to_c: temperature.default(100),
  notes: multiLine().max(4000).default(""),
  segments: z.array(profileSegmentInputSchema).min(1, "a profile needs at least one segment").max(40),
  material_ids: z.array(id).default([]),
  furnace_ids: z.array(id).default([]),
});

/** Segment arithmetic (a cool-down that ends above the last set-point...) checked by the cycle code itself. */
function checkCycle(p: z.infer<typeof profileFields>, ctx: z.RefinementCtx) {
  try {
    validateProfile({
      startTempC: p.start_temp_c,
      segments: p.segments.map((s) => ({ rateCPerMin: s.rate_c_per_min, setpointC: s.setpoint_c, holdMin: s.hold_min })),
      coolRateCPerMin: p.cool_rate_c_per_min,
      coolToC: p.cool_to_c,
    });
  } catch (err) {
    const field = (err as { field?: string }).field;
    const path = field === "coolToC" ? ["cool_to_c"] : field?.startsWith("segments") ? ["segments"] : [];
    ctx.addIssue({ code: "custom", message: (err as Error).message, path });
  }
  const peak = Math.max(...p.segments.map((s) => s.setpoint_c));
  if (peak <= p.start_temp_c) ctx.addIssue({ code: "custom", message: "a sinter profile must heat above its start temperature", path: ["segments"] });
}

export const createProfileSchema = profileFields.superRefine(checkCycle);
export const updateProfileSchema = profileFields.extend({ version }).superRefine(checkCycle);

export type ProfileInput = z.infer<typeof createProfileSchema>;
export type ProfileFormInput = z.input<typeof createProfileSchema>;
