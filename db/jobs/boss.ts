import PgBoss from "pg-boss";
import { CompiledQuery, type Transaction } from "kysely";
import type { DB } from "@/db/schema";
import { getEnv } from "@/lib/env";

const globalForBoss = globalThis as unknown as { hearthSender?: Promise<PgBoss> };

/** The web app's pg-boss: it only sends (no maintenance, no cron), so many app instances are fine. */
export function getSender(): Promise<PgBoss> {
  if (!globalForBoss.hearthSender) {
    const boss = new PgBoss({ connectionString: getEnv().DATABASE_URL, supervise: false, schedule: false, max: 3 });
    boss.on("error", (err) => console.error("[jobs] sender error", err.message));
    globalForBoss.hearthSender = boss.start().then(() => boss);
  }
  return globalForBoss.hearthSender;
}

/** Lets `send()` join a Kysely transaction, so a job and the write it follows commit together. */
export const inTrx = (trx: Transaction<DB>) => ({
  executeSql: async (text: string, values: unknown[]) => ({
    rows: (await trx.executeQuery(CompiledQuery.raw(text, values))).rows as object[],
  }),
});
