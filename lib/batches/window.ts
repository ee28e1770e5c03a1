import { z } from "zod";

/** A window of the floor: both ends required, at most 62 days, so a lane query stays small. */
export const windowSchema = z
  .object({
    from: z.iso.datetime({ offset: true }),
    to: z.iso.datetime({ offset: true }),
  })
  .refine((w) => Date.parse(w.to) > Date.parse(w.from), { message: "the window must end after it starts", path: ["to"] })
  .refine((w) => Date.parse(w.to) - Date.parse(w.from) <= 62 * 86_400_000, { message: "a window spans at most 62 days", path: ["to"] });
