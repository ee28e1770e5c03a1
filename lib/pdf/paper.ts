import { z } from "zod";

// Paper sizes in PDF points (1/72 in). A4 is 210 × 297 mm (ISO 216), Letter 8.5 × 11 in
// (ANSI/ASME Y14.1): 595.28 × 841.89 pt and 612 × 792 pt.

export const PAPERS = ["a4", "letter"] as const;
export type Paper = (typeof PAPERS)[number];

export const PAPER_POINTS: Record<Paper, readonly [number, number]> = {
  a4: [(210 / 25.4) * 72, (297 / 25.4) * 72],
  letter: [612, 792],
};

/** The shop keeps no paper size of its own, so a document without ?paper= comes out on A4. */
export const DEFAULT_PAPER: Paper = "a4";

export const MM = 72 / 25.4;

/** `?paper=a4|letter` on the printable documents; anything else is refused with the field named. */
export const paperQuerySchema = z.object({
  paper: z.enum(PAPERS, { error: "paper must be a4 or letter" }).default(DEFAULT_PAPER),
});
export type PaperQuery = z.infer<typeof paperQuerySchema>;
