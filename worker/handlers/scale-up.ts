import type { Job } from "pg-boss";
import { sql } from "kysely";
import type { Database } from "@/db/client";
import { scaleUpJobSchema, type ScaleUpJob } from "@/lib/jobs/queues";
import { scaleUp } from "@/lib/process/scale-up";

// Recomputes parts' green sizes from their nominal size, stock and their material's shrinkage
// (lib/process/scale-up). Builds are left alone: each keeps the scale_snapshot it was printed
// with. The part's version is not bumped (the green size is derived, and bumping it would turn a
// person's open edit form stale), but each change is logged as a 'scale_up' event.

// Below half the 0.01 mm the sizes are shown to, a difference is rounding, not a change.
const EPS = 0.005;

type Target = ScaleUpJob | { stale: number };

export type ScaleUpOutcome = { checked: number; changed: number; failed: number };

export async function recomputeScaleUp(db: Database, target: Target): Promise<ScaleUpOutcome> {
  return db.transaction().execute(async (trx) => {
    let q = trx
      .selectFrom("parts")
      .innerJoin("materials", "materials.id", "parts.material_id")
      .select([
        "parts.id",
        "parts.part_number",
        "parts.nominal_x_mm",
        "parts.nominal_y_mm",
        "parts.nominal_z_mm",
        "parts.stock_x_neg_mm",
        "parts.stock_x_pos_mm",
        "parts.stock_y_neg_mm",
        "parts.stock_y_pos_mm",
        "parts.stock_z_neg_mm",
        "parts.stock_z_pos_mm",
        "parts.green_x_mm",
        "parts.green_y_mm",
        "parts.green_z_mm",
        "parts.material_id",
        "materials.code as material_code",
        "materials.shrink_xy",
        "materials.shrink_z",
      ]);
    if ("part_id" in target) q = q.where("parts.id", "=", target.part_id);
    else if ("material_id" in target) q = q.where("parts.material_id", "=", target.material_id);
    else {
      q = q
        .where((eb) =>
          // A second's grace: the app stamps scaled_at from its own clock in the same write.
          eb.or([
            eb("parts.scaled_at", "is", null),
            eb("parts.scaled_at", "<", sql<Date>`parts.updated_at - interval '1 second'`),
            eb("parts.scaled_at", "<", sql<Date>`materials.updated_at - interval '1 second'`),
          ]),
        )
        .orderBy("parts.updated_at")
        .limit(target.stale);
    }
    // The part rows stay locked until the new sizes are written, the material row shared: an
    // edit that lands meanwhile waits, and its own recomputation sees the new values.
    const parts = await q.forUpdate("parts").skipLocked().execute();
    if ("material_id" in target && parts.length) {
      await trx.selectFrom("materials").select("id").where("id", "=", target.material_id).forShare().execute();
    }
    let changed = 0;
    let failed = 0;
    for (const p of parts) {
      let result;
      try {
        result = scaleUp({
          nominal: { x: Number(p.nominal_x_mm), y: Number(p.nominal_y_mm), z: Number(p.nominal_z_mm) },
          stock: {
            x_neg: Number(p.stock_x_neg_mm),
            x_pos: Number(p.stock_x_pos_mm),
            y_neg: Number(p.stock_y_neg_mm),
            y_pos: Number(p.stock_y_pos_mm),
            z_neg: Number(p.stock_z_neg_mm),
            z_pos: Number(p.stock_z_pos_mm),
          },
          shrink: { xy: Number(p.shrink_xy), z: Number(p.shrink_z) },
        });
      } catch (err) {
        failed++;
        console.error(`[worker] scale-up of part ${p.part_number} impossible:`, err instanceof Error ? err.message : err);
        continue;
      }
      const green = { x: result.x.green, y: result.y.green, z: result.z.green };
      const before = { x: p.green_x_mm == null ? null : Number(p.green_x_mm), y: p.green_y_mm == null ? null : Number(p.green_y_mm), z: p.green_z_mm == null ? null : Number(p.green_z_mm) };
      const factors = { xy: result.x.factor, z: result.z.factor, shrink_xy: result.x.shrinkage, shrink_z: result.z.shrinkage };
      const differs = (["x", "y", "z"] as const).some((a) => before[a] == null || Math.abs((before[a] as number) - green[a]) > EPS);
      // Sizes kept to the micrometre, as the parts pages store them; unchanged sizes are left as they are.
      const um = (x: number) => Math.round(x * 1000) / 1000;
      await trx
        .updateTable("parts")
        .set(
          differs
            ? { green_x_mm: um(green.x), green_y_mm: um(green.y), green_z_mm: um(green.z), scale_factors: JSON.stringify(factors), scaled_at: sql`now()` }
            : { scaled_at: sql`now()` },
        )
        .where("id", "=", p.id)
        .execute();
      if (differs) {
        changed++;
        await trx
          .insertInto("events")
          .values({
            entity: "part",
            entity_id: p.id,
            kind: "scale_up",
            actor_id: null,
            reason: `Green size recomputed with ${p.material_code} shrinkage XY ${(factors.shrink_xy * 100).toFixed(2)} %, Z ${(factors.shrink_z * 100).toFixed(2)} %`,
            data: JSON.stringify({ before, after: green, factors, material_id: p.material_id }),
          })
          .execute();
      }
    }
    return { checked: parts.length, changed, failed };
  });
}

export function scaleUpHandler(db: Database) {
  return async (jobs: Job<unknown>[]) => {
    for (const job of jobs) {
      const target = scaleUpJobSchema.parse(job.data);
      await recomputeScaleUp(db, target);
    }
  };
}
