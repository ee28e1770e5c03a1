// The change stamps that let a web process serve one load of a shared read to every page that
// asks for it: a stamp moves whenever anything the read shows may have changed, so a cached
// answer is served only while the stamp it was loaded under still holds. Read in the same round
// trip as the viewer's session check (viewerAndStamp): a shared read costs one query on a hit.
import { sql, type RawBuilder } from "kysely";
import type { Database } from "@/db/client";
import type { Role } from "@/lib/auth/permissions";
import { isUuid, sessionOpenSql } from "@/db/users/reads";

export type StampKind = "floor" | "board" | "shop";

const seq = (name: string) => sql`(select last_value::text || ':' || is_called::text from ${sql.table(name)})`;

// floor_change_seq (migration 202612012302): what the floor's window shows. board_change_seq
// (202612040510): what the batching board shows, parts, orders and settings among it.
// live_change_seq (202612041152): every announcement on hearth_changes (builds, units,
// inspections, feedstock, equipment, …). "shop" is the last two together: the reads that show a
// bit of everything (a unit's trace, the unscheduled builds with every printer's verdict).
const STAMP_SQL: Record<StampKind, RawBuilder<unknown>> = {
  floor: seq("floor_change_seq"),
  board: seq("board_change_seq"),
  shop: sql`(${seq("board_change_seq")} || '/' || ${seq("live_change_seq")})`,
};

export async function changeStamp(db: Database, kind: StampKind): Promise<string> {
  const { rows } = await sql<{ v: string }>`select ${STAMP_SQL[kind]} as v`.execute(db);
  return rows[0].v;
}

export type Viewer = { role: Role; sessions_valid_after: Date | number | null; session_open: boolean };

/**
 * The active user a session names and a change stamp in one round trip: what the web server's
 * direct path needs before it may answer a shared read from its cache.
 */
export async function viewerAndStamp(db: Database, kind: StampKind, userId: string, sid?: string | null): Promise<{ viewer: Viewer | null; stamp: string }> {
  const viewer = isUuid(userId)
    ? sql`(select json_build_object('role', u.role, 'valid_after', floor(extract(epoch from u.sessions_valid_after) * 1000), 'session_open', ${sessionOpenSql("u.id", sid)}) from users u where u.id = ${userId} and u.active)`
    : sql`null::json`;
  const { rows } = await sql<{ viewer: { role: Role; valid_after: number | string | null; session_open: boolean } | null; stamp: string }>`select ${viewer} as viewer, ${STAMP_SQL[kind]} as stamp`.execute(db);
  const v = rows[0].viewer;
  if (!v) return { viewer: null, stamp: rows[0].stamp };
  // Milliseconds, truncated as pg's Date would be; ±infinity (the default is -infinity) arrives
  // in JSON as a string.
  const after = typeof v.valid_after === "string" ? Number(v.valid_after) : v.valid_after;
  return { viewer: { role: v.role, sessions_valid_after: after, session_open: v.session_open === true }, stamp: rows[0].stamp };
}

/** Who a request's session names: the user and the cookie's user_sessions row. */
export type SessionKey = { userId: string; sid?: string | null };

export const sessionKeyOf = (k: SessionKey): string => `${k.userId}|${k.sid ?? ""}`;

export type Admission = {
  stamps: Record<StampKind, string>;
  /** By sessionKeyOf; absent when the user is unknown or inactive. */
  viewers: Map<string, Viewer>;
};

/**
 * viewerAndStamp for many sessions at once, with every stamp: one round trip for all the requests
 * that arrive together (app/_server/floor-access.ts). Each viewer is read exactly as
 * viewerAndStamp reads it (sessionOpenSql's rule: the row is the cookie's, the user's, and not
 * revoked; a sid that is not a uuid is never open).
 */
export async function viewersAndStamps(db: Database, keys: readonly SessionKey[]): Promise<Admission> {
  const asked = [...new Map(keys.filter((k) => isUuid(k.userId)).map((k) => [sessionKeyOf(k), k])).values()];
  const ids = asked.map((k) => k.userId);
  const sids = asked.map((k) => (isUuid(k.sid) ? k.sid : null));
  const { rows } = await sql<{ floor: string; board: string; shop: string; viewers: { i: number; role: Role; valid_after: number | string | null; session_open: boolean }[] }>`
    select ${STAMP_SQL.floor} as floor, ${STAMP_SQL.board} as board, ${STAMP_SQL.shop} as shop,
      (select coalesce(json_agg(json_build_object(
          'i', k.i,
          'role', u.role,
          'valid_after', floor(extract(epoch from u.sessions_valid_after) * 1000),
          'session_open', k.sid is not null and exists (select 1 from user_sessions s where s.id = k.sid and s.user_id = u.id and s.revoked_at is null)
        )), '[]'::json)
        from unnest(${ids}::uuid[], ${sids}::uuid[]) with ordinality as k(uid, sid, i)
        join users u on u.id = k.uid and u.active) as viewers`.execute(db);
  const row = rows[0];
  const viewers = new Map<string, Viewer>();
  for (const v of row.viewers) {
    const after = typeof v.valid_after === "string" ? Number(v.valid_after) : v.valid_after;
    viewers.set(sessionKeyOf(asked[v.i - 1]), { role: v.role, sessions_valid_after: after, session_open: v.session_open === true });
  }
  return { stamps: { floor: row.floor, board: row.board, shop: row.shop }, viewers };
}
