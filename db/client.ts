import { Kysely, PostgresDialect } from "kysely";
import pg from "pg";
import { getEnv } from "@/lib/env";
import type { DB } from "./schema";

// numeric → number and int8 (count(), bigserial) → number: every numeric column holds a
// measured quantity far inside double precision, and strings would leak into the domain code.
pg.types.setTypeParser(pg.types.builtins.NUMERIC, (v) => (v === null ? null : Number(v)));
pg.types.setTypeParser(pg.types.builtins.INT8, (v) => (v === null ? null : Number(v)));

export type Database = Kysely<DB>;

const globalForDb = globalThis as unknown as { hearthDb?: Database; hearthPool?: pg.Pool };

export function createDb(connectionString = getEnv().DATABASE_URL, max = getEnv().DB_POOL_MAX): { db: Database; pool: pg.Pool } {
  // A request waits at most DB_CONNECT_TIMEOUT_MS for a connection (node-postgres waits for
  // ever by default): a full pool or a database that is down then answers 503, not a hang.
  const pool = new pg.Pool({ connectionString, max, connectionTimeoutMillis: getEnv().DB_CONNECT_TIMEOUT_MS });
  // An idle client whose server went away (a restart, a failover) emits 'error' on the pool;
  // unheard, that would be an uncaught exception. The pool drops the client and connects anew.
  pool.on("error", (err) => console.error("[db] idle client error", err.message));
  return { db: new Kysely<DB>({ dialect: new PostgresDialect({ pool }) }), pool };
}

/** The process-wide pool, created on first use (shared by route handlers, actions and the worker). */
export function getDb(): Database {
  if (!globalForDb.hearthDb) {
    const { db, pool } = createDb();
    globalForDb.hearthDb = db;
    globalForDb.hearthPool = pool;
  }
  return globalForDb.hearthDb;
}

export async function closeDb() {
  const db = globalForDb.hearthDb;
  globalForDb.hearthDb = undefined;
  globalForDb.hearthPool = undefined;
  if (db) await db.destroy();
}
