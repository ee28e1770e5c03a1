import { sql } from "kysely";
import { isUuid } from "@/lib/ids";
import type { Database } from "@/db/client";
import { AppError } from "@/lib/errors";
import { planFinishingChange, type UnitState } from "@/lib/finishing/transitions";
import type { FinishingAction as Action, FinishingActionInput } from "@/lib/finishing/schemas";
import { type Trx, getFinishingCard, latestInspection } from "./reads";
import { requireVersion } from "@/db/versioned";
import { recordEvents } from "@/db/versioned";

/** Locks the unit and checks the version the person saw; the caller holds the transaction. */
export async function lockUnitAtVersion(trx: Trx, unitId: string, version: number) {
  if (!isUuid(unitId)) throw new AppError("not_found", "Unit not found.");
  const unit = await trx
    .selectFrom("units")
    .select(["id", "serial", "state", "held_from", "version", "part_id", "build_id"])
    .where("id", "=", unitId)
    .forUpdate()
    .executeTakeFirst();
  if (!unit) throw new AppError("not_found", "Unit not found.");
  requireVersion(`Unit ${unit.serial}`, unit.version, version, { current_state: unit.state });
  return unit;
}

/** Applies a machinist's action under a row lock; every change is an event and a new version. */
export async function applyFinishingAction(db: Database, unitId: string, input: FinishingActionInput & { action: Action }, actorId: string) {
  await db.transaction().execute(async (trx) => {
    const unit = await lockUnitAtVersion(trx, unitId, input.version);
    const change = planFinishingChange(
      { state: unit.state as UnitState, held_from: unit.held_from as UnitState | null },
      input.action,
      await latestInspection(trx, unitId),
      input.reason,
    );
    const releasing = input.action === "release";
    await trx
      .updateTable("units")
      .set({
        state: change.to,
        held_from: change.to === "on_hold" ? change.held_from : null,
        hold_reason: change.to === "on_hold" ? change.hold_reason : null,
        ...(change.to === "scrapped" ? { scrap_reason: change.scrap_reason, scrap_note: change.scrap_note } : {}),
        version: sql`version + 1`,
        state_changed_at: sql`now()`,
        updated_at: sql`now()`,
      })
      .where("id", "=", unitId)
      .execute();
    await recordEvents(trx, [{
        entity: "unit",
        entity_id: unitId,
        kind: "state",
        from_state: change.from,
        to_state: change.to,
        actor_id: actorId,
        reason: change.reason,
        data: { action: input.action, ...(releasing ? { held_from: unit.held_from } : {}) },
      }]);
  });
  return getFinishingCard(db, unitId);
}
