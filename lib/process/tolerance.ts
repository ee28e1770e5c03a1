import { z } from "zod";
import { ComputationError } from "@/lib/errors";

/**
 * ISO 286-1 standard tolerance grades, taken as the standard's TABLE (the formula
 * i = 0.45·∛D + 0.001·D does not reproduce the tabled values everywhere because of the
 * standard's own rounding). Values in µm; each row covers sizes over `overMm` up to and
 * including `upToMm`. IT01 and IT0 are the extra-fine grades of the same table.
 */
export const IT_GRADES = [
  "IT01", "IT0", "IT1", "IT2", "IT3", "IT4", "IT5", "IT6", "IT7", "IT8", "IT9",
  "IT10", "IT11", "IT12", "IT13", "IT14", "IT15", "IT16", "IT17", "IT18",
] as const;
export type ItGrade = (typeof IT_GRADES)[number];

//                 IT01 IT0  IT1  IT2  IT3  IT4 IT5 IT6 IT7 IT8  IT9 IT10 IT11 IT12 IT13  IT14  IT15  IT16  IT17  IT18
const ROWS: ReadonlyArray<{ overMm: number; upToMm: number; um: readonly number[] }> = [
  { overMm: 0, upToMm: 3, um: [0.3, 0.5, 0.8, 1.2, 2, 3, 4, 6, 10, 14, 25, 40, 60, 100, 140, 250, 400, 600, 1000, 1400] },
  { overMm: 3, upToMm: 6, um: [0.4, 0.6, 1, 1.5, 2.5, 4, 5, 8, 12, 18, 30, 48, 75, 120, 180, 300, 480, 750, 1200, 1800] },
  { overMm: 6, upToMm: 10, um: [0.4, 0.6, 1, 1.5, 2.5, 4, 6, 9, 15, 22, 36, 58, 90, 150, 220, 360, 580, 900, 1500, 2200] },
  { overMm: 10, upToMm: 18, um: [0.5, 0.8, 1.2, 2, 3, 5, 8, 11, 18, 27, 43, 70, 110, 180, 270, 430, 700, 1100, 1800, 2700] },
  { overMm: 18, upToMm: 30, um: [0.6, 1, 1.5, 2.5, 4, 6, 9, 13, 21, 33, 52, 84, 130, 210, 330, 520, 840, 1300, 2100, 3300] },
  { overMm: 30, upToMm: 50, um: [0.6, 1, 1.5, 2.5, 4, 7, 11, 16, 25, 39, 62, 100, 160, 250, 390, 620, 1000, 1600, 2500, 3900] },
  { overMm: 50, upToMm: 80, um: [0.8, 1.2, 2, 3, 5, 8, 13, 19, 30, 46, 74, 120, 190, 300, 460, 740, 1200, 1900, 3000, 4600] },
  { overMm: 80, upToMm: 120, um: [1, 1.5, 2.5, 4, 6, 10, 15, 22, 35, 54, 87, 140, 220, 350, 540, 870, 1400, 2200, 3500, 5400] },
  { overMm: 120, upToMm: 180, um: [1.2, 2, 3.5, 5, 8, 12, 18, 25, 40, 63, 100, 160, 250, 400, 630, 1000, 1600, 2500, 4000, 6300] },
  { overMm: 180, upToMm: 250, um: [2, 3, 4.5, 7, 10, 14, 20, 29, 46, 72, 115, 185, 290, 460, 720, 1150, 1850, 2900, 4600, 7200] },
  { overMm: 250, upToMm: 315, um: [2.5, 4, 6, 8, 12, 16, 23, 32, 52, 81, 130, 210, 320, 520, 810, 1300, 2100, 3200, 5200, 8100] },
  { overMm: 315, upToMm: 400, um: [3, 5, 7, 9, 13, 18, 25, 36, 57, 89, 140, 230, 360, 570, 890, 1400, 2300, 3600, 5700, 8900] },
  { overMm: 400, upToMm: 500, um: [4, 6, 8, 10, 15, 20, 27, 40, 63, 97, 155, 250, 400, 630, 970, 1550, 2500, 4000, 6300, 9700] },
];

export const IT_TABLE_MAX_MM = ROWS[ROWS.length - 1].upToMm;

/** Grade as a number (1–18, 0 for IT0) or as text ("IT7", "it7", "IT01"). */
export const itGradeSchema = z.union([
  z.number().int().min(0).max(18),
  z
    .string()
    .trim()
    .transform((s) => s.toUpperCase())
    .pipe(z.enum(IT_GRADES)),
]);
export type ItGradeInput = z.input<typeof itGradeSchema>;

export const itToleranceInputSchema = z.object({
  nominalMm: z.number().positive().max(IT_TABLE_MAX_MM),
  grade: itGradeSchema,
});

export function normalizeItGrade(grade: ItGradeInput): ItGrade {
  const parsed = itGradeSchema.safeParse(grade);
  if (!parsed.success) {
    throw new ComputationError(`"${String(grade)}" is not an ISO 286-1 grade (IT01, IT0, IT1 … IT18)`, "grade");
  }
  return typeof parsed.data === "number" ? (`IT${parsed.data}` as ItGrade) : parsed.data;
}

export type SizeStep = { overMm: number; upToMm: number };

/** The table row (size step) a nominal size falls in: over `overMm`, up to and including `upToMm`. */
export function itSizeStep(nominalMm: number): SizeStep {
  if (!Number.isFinite(nominalMm) || nominalMm <= 0) {
    throw new ComputationError(`nominal size must be greater than 0 mm (got ${nominalMm})`, "nominalMm");
  }
  const row = ROWS.find((r) => nominalMm > r.overMm && nominalMm <= r.upToMm);
  if (!row) {
    throw new ComputationError(
      `nominal size ${nominalMm} mm is beyond the tabled range (up to ${IT_TABLE_MAX_MM} mm)`,
      "nominalMm",
    );
  }
  return { overMm: row.overMm, upToMm: row.upToMm };
}

/** Standard tolerance in µm for a nominal size (mm) and an IT grade, read from the table. */
export function itToleranceUm(nominalMm: number, grade: ItGradeInput): number {
  const name = normalizeItGrade(grade);
  const step = itSizeStep(nominalMm);
  const index = IT_GRADES.indexOf(name);
  // ISO 286-1 footnote: grades IT14 to IT18 are not used for nominal sizes up to 1 mm.
  if (index >= IT_GRADES.indexOf("IT14") && nominalMm <= 1) {
    throw new ComputationError(`${name} is not used for nominal sizes up to 1 mm`, "grade");
  }
  return ROWS.find((r) => r.overMm === step.overMm)!.um[index];
}

export type ToleranceBand = {
  nominalMm: number;
  grade: ItGrade;
  toleranceUm: number;
  /** Upper and lower limits of size, mm. */
  maxMm: number;
  minMm: number;
};

/**
 * Limits for the zero-deviation positions: shaft "h" (upper deviation 0, lower −IT) and
 * hole "H" (lower deviation 0, upper +IT), e.g. Ø25 h6 = 25.000 / 24.987.
 */
export function basicBand(nominalMm: number, position: "h" | "H", grade: ItGradeInput): ToleranceBand {
  const name = normalizeItGrade(grade);
  const toleranceUm = itToleranceUm(nominalMm, name);
  const t = toleranceUm / 1000;
  return position === "h"
    ? { nominalMm, grade: name, toleranceUm, maxMm: nominalMm, minMm: nominalMm - t }
    : { nominalMm, grade: name, toleranceUm, maxMm: nominalMm + t, minMm: nominalMm };
}
