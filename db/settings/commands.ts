import { sql } from "kysely";
import type { Database } from "@/db/client";
import type { ShopSettingsInput } from "@/lib/setup/schemas";
import { AppError } from "@/lib/errors";

export async function updateShopSettings(db: Database, input: ShopSettingsInput) {
  const { version, staffed_hours, ...values } = input;
  const row = await db
    .updateTable("shop_settings")
    .set({ ...values, staffed_hours: JSON.stringify(staffed_hours), version: sql`version + 1`, updated_at: sql`now()` })
    .where("id", "=", 1)
    .where("version", "=", version)
    .returningAll()
    .executeTakeFirst();
  if (!row) throw new AppError("conflict", "The settings were changed by someone else; reload to see their change, then apply yours again.");
  return row;
}
