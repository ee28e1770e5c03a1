// Who may read the shared reads (the floor's window, the board, the unscheduled builds, a unit's
// trace): the one copy of the rule, used by the route handlers and by the web server's direct path
// (app/_server/shared-read-direct.ts). A session seal that opens, names an active user, is still
// live for that user (not revoked by a password change or a sign-out everywhere), and a role that
// may read the shop. The read's change stamp comes back from the same round trip: it tells
// nothing to someone who is refused. The requests that arrive together share that round trip
// (lib/live/round-trip-batch.ts), each answered by one sent after it arrived: a session revoked,
// or a user deactivated, before a request arrives is refused to it, as with a query of its own.
import type { Database } from "@/db/client";
import { sessionKeyOf, viewersAndStamps, type Admission, type SessionKey, type StampKind } from "@/db/live/stamps";
import { RoundTripBatch } from "@/lib/live/round-trip-batch";
import { can, type Role } from "@/lib/auth/permissions";
import { unsealSession } from "@/lib/auth/seal-cache";
import { renewalDue, sessionIsLive, type SessionData } from "@/lib/auth/session-config";

export const FLOOR_PERMISSION = "shop:read" as const;
/** Every shared read is the shop's to read. */
export const SHARED_READ_PERMISSION = FLOOR_PERMISSION;

export type FloorAccess =
  | { kind: "signed-out" }
  | { kind: "forbidden"; role: Role }
  /** renewalDue: the cookie's idle lifetime should slide, which only the route handler can do. */
  | { kind: "allowed"; role: Role; stamp: string; renewalDue: boolean };

const batches = new WeakMap<Database, RoundTripBatch<SessionKey, Admission>>();

/** One batch per pool: the web server's and the route handlers' copies of this module each keep theirs. */
function admissionBatch(db: Database): RoundTripBatch<SessionKey, Admission> {
  let batch = batches.get(db);
  if (!batch) {
    batch = new RoundTripBatch<SessionKey, Admission>((keys) => viewersAndStamps(db, keys));
    batches.set(db, batch);
  }
  return batch;
}

export async function authorizeSharedRead(db: Database, stampKind: StampKind, seal: string | undefined, secret: string, now = Date.now()): Promise<FloorAccess> {
  if (!seal) return { kind: "signed-out" };
  let session: SessionData;
  try {
    session = await unsealSession(seal, secret, now);
  } catch {
    return { kind: "signed-out" };
  }
  if (!session.userId) return { kind: "signed-out" };
  const key = { userId: session.userId, sid: session.sid };
  const admission = await admissionBatch(db).ask(key);
  const viewer = admission.viewers.get(sessionKeyOf(key)) ?? null;
  const stamp = admission.stamps[stampKind];
  if (!viewer || !sessionIsLive(session, viewer.sessions_valid_after, now, viewer.session_open)) return { kind: "signed-out" };
  if (!can(viewer.role, SHARED_READ_PERMISSION)) return { kind: "forbidden", role: viewer.role };
  return { kind: "allowed", role: viewer.role, stamp, renewalDue: renewalDue(session, now) };
}

export function authorizeFloorRead(db: Database, seal: string | undefined, secret: string, now = Date.now()): Promise<FloorAccess> {
  return authorizeSharedRead(db, "floor", seal, secret, now);
}
