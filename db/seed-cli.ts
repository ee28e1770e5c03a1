// npm run db:seed [-- --if-empty]
import { createDb } from "./client";
import { isEmpty, seedDemoShop } from "./seed";

async function main() {
  const { db } = createDb(undefined, 2);
  try {
    if (!(await isEmpty(db))) {
      if (process.argv.includes("--if-empty")) {
        console.log("[seed] the database already holds a shop; leaving it as it is");
        return;
      }
      throw new Error("the database is not empty; seed a fresh database (or use --if-empty)");
    }
    const result = await seedDemoShop(db);
    console.log(`[seed] demo shop "Kestrel Sinterworks": ${result.orders} orders, ${result.units} units`);
  } finally {
    await db.destroy();
  }
}

main().catch((err) => {
  console.error("[seed] failed:", err instanceof Error ? err.message : err);
  process.exit(1);
});
