import { AppError } from "@/lib/errors";
import type { BoardUnit, BoardWashBatch } from "@/lib/batches/types";
import { massLossCheck } from "@/lib/process/wash";
import { listWashBatches, type Db, type ShopContext } from "@/db/batches/reads";

export async function getWash(db: Db, ctx: ShopContext, id: string): Promise<BoardWashBatch> {
  const [w] = await listWashBatches(db, ctx, { ids: [id] });
  if (!w) throw new AppError("not_found", "That wash batch does not exist.");
  return w;
}

export type MassResult = { unit_id: string; serial: string; green_mass_g: number | null; brown_mass_g: number | null; loss_fraction: number | null; min_mass_loss: number; passed: boolean | null };

export function massResults(units: BoardUnit[]): MassResult[] {
  return units.map((u) => {
    const check = u.green_mass_g && u.brown_mass_g && u.brown_mass_g <= u.green_mass_g ? massLossCheck(u.green_mass_g, u.brown_mass_g, u.min_mass_loss) : null;
    return {
      unit_id: u.id, serial: u.serial, green_mass_g: u.green_mass_g, brown_mass_g: u.brown_mass_g,
      loss_fraction: check?.lossFraction ?? null, min_mass_loss: u.min_mass_loss, passed: check ? check.passed : null,
    };
  });
}

export async function getWashBatchDetail(db: Db, ctx: ShopContext, id: string) {
  const batch = await getWash(db, ctx, id);
  return { batch, masses: massResults(batch.units), station: ctx.stations.find((s) => s.id === batch.wash_station_id) ?? null };
}

export async function findWashCode(db: Db, id: string): Promise<string | undefined> {
  const row = await db.selectFrom("wash_batches").select("code").where("id", "=", id).executeTakeFirst();
  return row?.code;
}
