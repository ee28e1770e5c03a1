// The join every list of units starts from, under the aliases the unit queries share, so that a
// unit's part, order and material (and the stages it passed through) are reached one way only.
import type { Kysely } from "kysely";
import type { DB } from "@/db/schema";

/** units u with their part p, order o and material m. */
export function unitsWithPart(db: Kysely<DB>) {
  return db
    .selectFrom("units as u")
    .innerJoin("parts as p", "p.id", "u.part_id")
    .innerJoin("orders as o", "o.id", "p.order_id")
    .innerJoin("materials as m", "m.id", "p.material_id");
}

/** As unitsWithPart, and the build b, wash batch w and furnace run r the unit is (or was) in. */
export function unitsWithStages(db: Kysely<DB>) {
  return unitsWithPart(db)
    .leftJoin("builds as b", "b.id", "u.build_id")
    .leftJoin("wash_batches as w", "w.id", "u.wash_batch_id")
    .leftJoin("furnace_runs as r", "r.id", "u.furnace_run_id");
}

/** A part's nominal and green sizes and its stock allowance on each face. */
export const PART_SIZE_COLUMNS = [
  "p.nominal_x_mm", "p.nominal_y_mm", "p.nominal_z_mm", "p.green_x_mm", "p.green_y_mm", "p.green_z_mm",
  "p.stock_x_neg_mm", "p.stock_x_pos_mm", "p.stock_y_neg_mm", "p.stock_y_pos_mm", "p.stock_z_neg_mm", "p.stock_z_pos_mm",
] as const;
