import { sql } from "kysely";
import type { Database } from "@/db/client";
import { pageFor, type ScanHit, type ScanKind } from "@/lib/scan/codes";

/**
 * Finds what a printed code names: a unit serial, a build, wash batch or furnace run code
 * (case-insensitive, exact). A code can only be one of them in a sane shop; if two tables ever
 * share one, every match is returned and the page lets the person choose.
 */
export async function findByCode(db: Database, code: string): Promise<ScanHit[]> {
  const c = code.trim().toUpperCase();
  const [units, builds, washes, runs] = await Promise.all([
    db.selectFrom("units").select(["id", "serial as code", "state", "version"]).where(sql<string>`upper(serial)`, "=", c).execute(),
    db.selectFrom("builds").select(["id", "code", "state", "version"]).where(sql<string>`upper(code)`, "=", c).execute(),
    db.selectFrom("wash_batches").select(["id", "code", "state", "version"]).where(sql<string>`upper(code)`, "=", c).execute(),
    db.selectFrom("furnace_runs").select(["id", "code", "state", "version"]).where(sql<string>`upper(code)`, "=", c).execute(),
  ]);
  const hit = (kind: ScanKind) => (r: { id: string; code: string; state: string; version: number }): ScanHit => ({
    kind,
    id: r.id,
    code: r.code,
    state: r.state,
    version: r.version,
    href: pageFor(kind, r.id),
  });
  return [...units.map(hit("unit")), ...builds.map(hit("build")), ...washes.map(hit("wash_batch")), ...runs.map(hit("furnace_run"))];
}

/** The same answer for a record named by its page (a scanned address). */
export async function findById(db: Database, kind: ScanKind, id: string): Promise<ScanHit | undefined> {
  const r =
    kind === "unit"
      ? await db.selectFrom("units").select(["id", "serial as code", "state", "version"]).where("id", "=", id).executeTakeFirst()
      : kind === "build"
        ? await db.selectFrom("builds").select(["id", "code", "state", "version"]).where("id", "=", id).executeTakeFirst()
        : kind === "wash_batch"
          ? await db.selectFrom("wash_batches").select(["id", "code", "state", "version"]).where("id", "=", id).executeTakeFirst()
          : await db.selectFrom("furnace_runs").select(["id", "code", "state", "version"]).where("id", "=", id).executeTakeFirst();
  return r ? { kind, id: r.id, code: r.code, state: r.state, version: r.version, href: pageFor(kind, r.id) } : undefined;
}
