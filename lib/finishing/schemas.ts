import { z } from "zod";
import { multiLine, rowVersionNumber } from "@/lib/input-fields";

// Inputs of the finishing queue, inspections and calibration, shared by the route handlers
// and the forms. Lengths arrive in the unit system the person works in and are stored in mm;
// Ra arrives in µm or µin and is stored in µm.

export const AXES = ["x", "y", "z"] as const;
export type Axis = (typeof AXES)[number];

export const unitsSchema = z.enum(["mm", "in"]);

// 5 m and 25 mm Ra are far beyond anything a finishing cell measures: a typo, not a reading.
const length = z.number({ error: "enter a number" }).positive("must be greater than 0").max(5000, "too large for a part");
const axesInput = z
  .object({ x: length.optional(), y: length.optional(), z: length.optional() })
  .default({});

export const createInspectionSchema = z
  .object({
    unit_id: z.uuid("not a unit id"),
    /** The unit's version as the inspector saw it. */
    version: rowVersionNumber(),
    /** Lengths in mm or in; Ra in µm or µin respectively. */
    units: unitsSchema,
    green: axesInput,
    green_source: z.enum(["measured", "planned"]).default("measured"),
    sintered: axesInput,
    finished: axesInput,
    ra: z.number().positive("must be greater than 0").max(1000, "too large for an Ra reading").optional(),
    runout: z.number().nonnegative("cannot be negative").max(50, "too large for a runout reading").optional(),
    runout_axis: z.enum(AXES).optional(),
    passed: z.boolean({ error: "say whether the unit passed" }),
    reason: multiLine().trim().max(500).optional(),
    notes: multiLine().trim().max(2000).default(""),
  })
  .superRefine((v, ctx) => {
    if (!v.passed && !v.reason) {
      ctx.addIssue({ code: "custom", path: ["reason"], message: "a failed inspection needs a reason" });
    }
    if (v.runout !== undefined && !v.runout_axis) {
      ctx.addIssue({ code: "custom", path: ["runout_axis"], message: "say across which axis the runout was measured" });
    }
    for (const axis of AXES) {
      const g = v.green[axis];
      const s = v.sintered[axis];
      if (g !== undefined && s !== undefined) {
        const shrink = 1 - s / g;
        if (!(shrink > 0 && shrink < 0.5)) {
          ctx.addIssue({
            code: "custom",
            path: ["sintered", axis],
            message: `green ${g} → sintered ${s} is a shrinkage of ${(shrink * 100).toFixed(1)} %, outside 0–50 %: check the readings`,
          });
        }
      }
    }
    const anything =
      AXES.some((a) => v.green[a] !== undefined || v.sintered[a] !== undefined || v.finished[a] !== undefined) ||
      v.ra !== undefined ||
      v.runout !== undefined;
    if (!anything) {
      ctx.addIssue({ code: "custom", path: ["finished"], message: "record at least one measurement" });
    }
  });
export type CreateInspectionInput = z.input<typeof createInspectionSchema>;
export type CreateInspection = z.output<typeof createInspectionSchema>;

export const FINISHING_ACTIONS = ["accept", "finish", "scrap", "hold", "release"] as const;
export type FinishingAction = (typeof FINISHING_ACTIONS)[number];

export const finishingActionSchema = z
  .object({
    action: z.enum(FINISHING_ACTIONS),
    version: rowVersionNumber(),
    reason: multiLine().trim().max(500).optional(),
  })
  .superRefine((v, ctx) => {
    if (v.action === "hold" && !v.reason) {
      ctx.addIssue({ code: "custom", path: ["reason"], message: "say why the unit is put on hold" });
    }
  });
export type FinishingActionInput = z.input<typeof finishingActionSchema>;

export const excludeInspectionSchema = z
  .object({
    excluded_from_calibration: z.boolean(),
    reason: multiLine().trim().max(500).optional(),
  })
  .superRefine((v, ctx) => {
    if (v.excluded_from_calibration && !v.reason) {
      ctx.addIssue({ code: "custom", path: ["reason"], message: "say why this measurement is left out" });
    }
  });

export const applyCalibrationSchema = z.object({
  /** The material's version as the admin saw it. */
  version: rowVersionNumber(),
  axes: z.array(z.enum(["xy", "z"])).min(1, "choose at least one axis").max(2),
  /** The suggested shrinkage the admin saw per axis; a newer suggestion is a 409. */
  expected: z.object({ xy: z.number().gt(0).lt(0.5).optional(), z: z.number().gt(0).lt(0.5).optional() }),
});
export type ApplyCalibrationInput = z.input<typeof applyCalibrationSchema>;

// Attachments: photos of the part and PDF reports from the measuring room.
export const ATTACHMENT_TYPES = ["image/jpeg", "image/png", "image/webp", "application/pdf"] as const;
export type AttachmentType = (typeof ATTACHMENT_TYPES)[number];
export const ATTACHMENT_MAX_BYTES = 15 * 1024 * 1024;

/** GET /api/inspections/export: one unit's inspections (the unit's page), one material's, or all. */
export const inspectionExportSchema = z
  .object({
    unit_id: z.uuid("a unit's id").optional(),
    material_id: z.uuid("a material's id").optional(),
  })
  .strict();
export type InspectionExportFilter = z.infer<typeof inspectionExportSchema>;

/** GET /api/calibration/export: the calibration page's material, or every material. */
export const calibrationExportSchema = z.object({ material_id: z.uuid("a material's id").optional() }).strict();
export type CalibrationExportFilter = z.infer<typeof calibrationExportSchema>;
