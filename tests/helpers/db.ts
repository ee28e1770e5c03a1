import pg from "pg";
import { createDb, type Database } from "@/db/client";

/** A pool on the test database for one test file; close it in afterAll. */
export function testDb(): { db: Database; close: () => Promise<void> } {
  const { db } = createDb(process.env.DATABASE_URL, 4);
  return { db, close: () => db.destroy() };
}

/** A fresh, empty database beside the test database (for migration and seed tests). */
export async function scratchDatabase(tag: string): Promise<{ url: string; drop: () => Promise<void> }> {
  const base = new URL(process.env.DATABASE_URL ?? "postgres://postgres@127.0.0.1:54329/hearth_test");
  const name = `${base.pathname.slice(1)}_${tag}_${process.pid}`;
  const admin = new URL(base);
  admin.pathname = "/postgres";
  const client = new pg.Client({ connectionString: admin.toString() });
  await client.connect();
  await client.query(`drop database if exists "${name}" with (force)`);
  await client.query(`create database "${name}"`);
  await client.end();
  const url = new URL(base);
  url.pathname = `/${name}`;
  return {
    url: url.toString(),
    drop: async () => {
      const c = new pg.Client({ connectionString: admin.toString() });
      await c.connect();
      await c.query(`drop database if exists "${name}" with (force)`);
      await c.end();
    },
  };
}
