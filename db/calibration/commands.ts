import { sql } from "kysely";
import { isUuid } from "@/lib/ids";
import type { Database } from "@/db/client";
import { AppError } from "@/lib/errors";
import { getSender, inTrx } from "@/db/jobs/boss";
import { QUEUES } from "@/lib/jobs/queues";
import { MIN_SAMPLES_TO_APPLY, sameSuggestion, summarizeCalibration } from "@/lib/finishing/calibration";
import type { ApplyCalibrationInput } from "@/lib/finishing/schemas";
import { calibrationRows } from "./reads";
import { recordEvents } from "@/db/versioned";

/** Stored to 1e-5 (0.001 % linear): far below what a caliper or CMM resolves on a part. */
const roundShrinkage = (s: number) => Math.round(s * 1e5) / 1e5;

/**
 * Sets the material's shrinkage to the measured means, if nothing moved since the admin looked:
 * the material's version and the suggestion itself must be the ones shown. New scale-ups use
 * the new values; builds keep the scale_snapshot they were printed with.
 */
export async function applyCalibration(db: Database, materialId: string, input: ApplyCalibrationInput, actorId: string) {
  if (!isUuid(materialId)) throw new AppError("not_found", "Material not found.");
  return db.transaction().execute(async (trx) => {
    const material = await trx
      .selectFrom("materials")
      .select(["id", "code", "shrink_xy", "shrink_z", "version"])
      .where("id", "=", materialId)
      .forUpdate()
      .executeTakeFirst();
    if (!material) throw new AppError("not_found", "Material not found.");
    if (material.version !== input.version) {
      throw new AppError("conflict", `${material.code} was changed by someone else (now version ${material.version}); reload to see the current factors.`, undefined, { current_version: material.version });
    }
    const before = { shrink_xy: Number(material.shrink_xy), shrink_z: Number(material.shrink_z) };
    const summary = summarizeCalibration(await calibrationRows(trx, materialId), before);
    const after = { ...before };
    for (const axis of new Set(input.axes)) {
      const suggested = summary.applicable[axis];
      if (suggested === undefined) {
        const msg = `${axis.toUpperCase()}: at least ${MIN_SAMPLES_TO_APPLY} inspections are needed before a suggestion can be applied (${summary.inspections[axis]} so far).`;
        throw new AppError("invalid", msg, { [axis]: [msg] });
      }
      if (!sameSuggestion(input.expected[axis], suggested)) {
        throw new AppError("conflict", "New inspections changed the suggestion since you looked; reload to see it.", undefined, { suggested: summary.applicable });
      }
      after[axis === "xy" ? "shrink_xy" : "shrink_z"] = roundShrinkage(suggested);
    }
    const row = await trx
      .updateTable("materials")
      .set({ shrink_xy: after.shrink_xy, shrink_z: after.shrink_z, version: sql`version + 1`, updated_at: sql`now()` })
      .where("id", "=", materialId)
      .returning(["id", "code", "shrink_xy", "shrink_z", "version"])
      .executeTakeFirstOrThrow();
    const stats = Object.fromEntries(
      (["xy", "z"] as const).map((axis) => {
        const c = summary.calibration[axis];
        return [axis, c ? { count: c.count, mean: c.meanShrinkage, std_dev: c.stdDev ?? null, interval: c.interval?.shrinkage ?? null, factor: c.suggestedFactor } : null];
      }),
    );
    await recordEvents(trx, [{
        entity: "material",
        entity_id: materialId,
        kind: "calibration_applied",
        actor_id: actorId,
        reason: `shrinkage set from ${summary.inspections.xy} (XY) and ${summary.inspections.z} (Z) inspections`,
        data: { axes: input.axes, from: before, to: after, stats },
      }]);
    // Parts not yet printed get their green size from the new factors; builds keep their snapshot.
    const boss = await getSender();
    await boss.send(QUEUES.scaleUp, { material_id: materialId }, { db: inTrx(trx), retryLimit: 5, retryBackoff: true });
    return { material: { ...row, shrink_xy: Number(row.shrink_xy), shrink_z: Number(row.shrink_z) }, from: before, to: after };
  });
}
