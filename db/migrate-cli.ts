// npm run db:migrate
import { createDb } from "./client";
import { migrateToLatest } from "./migrate";

async function main() {
  const { db } = createDb(undefined, 2);
  try {
    const result = await migrateToLatest(db);
    const done = result.results ?? [];
    if (done.length === 0) console.log("[migrate] already at the latest migration");
    for (const r of done) console.log(`[migrate] ${r.status === "Success" ? "applied" : r.status} ${r.migrationName}`);
  } finally {
    await db.destroy();
  }
}

main().catch((err) => {
  console.error("[migrate] failed:", err instanceof Error ? err.message : err);
  process.exit(1);
});
