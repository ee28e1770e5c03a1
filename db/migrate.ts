import { promises as fs } from "node:fs";
import path from "node:path";
import { Migrator, sql, type Kysely, type Migration, type MigrationProvider, type MigrationResultSet } from "kysely";

/**
 * Plain-SQL migrations from migrations/*.sql, ordered by their timestamp prefix. Kysely's
 * Migrator runs each in a transaction under its lock, so concurrent starts are safe.
 */
export class SqlFileMigrationProvider implements MigrationProvider {
  constructor(private readonly folder: string) {}

  async getMigrations(): Promise<Record<string, Migration>> {
    const files = (await fs.readdir(this.folder)).filter((f) => f.endsWith(".sql")).sort();
    const migrations: Record<string, Migration> = {};
    for (const file of files) {
      const text = await fs.readFile(path.join(this.folder, file), "utf8");
      migrations[file.replace(/\.sql$/, "")] = {
        // eslint-disable-next-line @typescript-eslint/no-explicit-any
        up: async (db: Kysely<any>) => {
          await sql.raw(text).execute(db);
        },
      };
    }
    return migrations;
  }
}

export const migrationsFolder = path.resolve(process.cwd(), "migrations");

// eslint-disable-next-line @typescript-eslint/no-explicit-any
export async function migrateToLatest(db: Kysely<any>, folder = migrationsFolder): Promise<MigrationResultSet> {
  // Unordered: branches land migrations with earlier timestamps after later ones have run.
  const migrator = new Migrator({ db, provider: new SqlFileMigrationProvider(folder), allowUnorderedMigrations: true });
  const result = await migrator.migrateToLatest();
  if (result.error) throw result.error;
  return result;
}

/** Name of the newest applied migration, or null on an empty database. */
// eslint-disable-next-line @typescript-eslint/no-explicit-any
export async function currentMigration(db: Kysely<any>): Promise<{ applied: string | null; pending: number }> {
  const migrator = new Migrator({ db, provider: new SqlFileMigrationProvider(migrationsFolder), allowUnorderedMigrations: true });
  const all = await migrator.getMigrations();
  const applied = all.filter((m) => m.executedAt);
  return { applied: applied.at(-1)?.name ?? null, pending: all.length - applied.length };
}
