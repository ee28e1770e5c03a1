// A benchmark's own database on the server of DATABASE_URL: dropped (closing whatever still
// holds it) and created empty, so every run starts from the same state. `drop` removes it after.
import pg from "pg";

export async function freshDatabase(dbName: string): Promise<{ url: string; drop: () => Promise<void> }> {
  const base = new URL(process.env.DATABASE_URL ?? "postgres://postgres@127.0.0.1:54329/hearth");
  const admin = new URL(base);
  admin.pathname = "/postgres";
  const run = async (q: string) => {
    const c = new pg.Client({ connectionString: admin.toString() });
    await c.connect();
    try {
      await c.query(q);
    } finally {
      await c.end();
    }
  };
  await run(`drop database if exists "${dbName}" with (force)`);
  await run(`create database "${dbName}"`);
  const url = new URL(base);
  url.pathname = `/${dbName}`;
  return { url: url.toString(), drop: () => run(`drop database if exists "${dbName}" with (force)`) };
}
