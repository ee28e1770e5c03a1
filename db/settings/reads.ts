import type { Database } from "@/db/client";
import { AppError } from "@/lib/errors";

export type Shift = { day: number; start: string; end: string };

export async function getShopSettings(db: Database) {
  const row = await db.selectFrom("shop_settings").selectAll().where("id", "=", 1).executeTakeFirst();
  if (!row) throw new AppError("not_found", "The shop has no settings yet; run the seed or create them under Set-up.");
  return { ...row, staffed_hours: row.staffed_hours as Shift[] };
}
