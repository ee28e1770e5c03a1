// The shared reads: GET endpoints that every open page asks for again after each change it hears
// of (components/live/query-map.ts), so that one change fans out to as many identical requests
// as there are pages open. Each is answered from one load per change stamp (db/live/stamps.ts),
// kept in a process-wide cache that the live listener also clears as soon as a change is
// announced (app/_server/live-hub.ts). A read's cache key holds everything its answer depends
// on: none of these loaders takes the user, so who asks (beyond being allowed to read the shop,
// app/_server/floor-access.ts) changes nothing in the answer; a read whose answer depended on the
// role would have to put the role in its key.
import type { Database } from "@/db/client";
import type { StampKind } from "@/db/live/stamps";
import { floorWindowBody } from "@/db/floor/reads";
import { boardBody } from "@/db/batches/reads";
import { unscheduledBody } from "@/db/floor/unscheduled";
import { unitTraceBody } from "@/db/trace/reads";
import type { WindowBody } from "@/lib/floor/window-body";
import { floorWindowSchema } from "@/lib/floor/schemas";
import { isUuid } from "@/lib/ids";

export type SharedRead = { name: "floor" | "board" | "unscheduled" | "trace"; stamp: StampKind; body: (db: Database, stamp: string) => Promise<WindowBody> };

const TRACE = /^\/api\/units\/([^/]+)\/trace$/;

/**
 * The shared read a request names, or null when it names none or is not its plain form (a window
 * that does not parse, an id that is not one): those go to the route handler, which explains.
 */
export function matchSharedRead(pathname: string, query: URLSearchParams): SharedRead | null {
  switch (pathname) {
    case "/api/floor": {
      const w = floorWindowSchema.safeParse(Object.fromEntries(query));
      return w.success ? { name: "floor", stamp: "floor", body: (db, stamp) => floorWindowBody(db, w.data, stamp) } : null;
    }
    case "/api/batches":
      return { name: "board", stamp: "board", body: boardBody };
    case "/api/floor/unscheduled":
      return { name: "unscheduled", stamp: "shop", body: unscheduledBody };
  }
  const trace = TRACE.exec(pathname);
  if (trace && isUuid(trace[1])) {
    const id = trace[1];
    return { name: "trace", stamp: "shop", body: (db, stamp) => unitTraceBody(db, id, stamp) };
  }
  return null;
}
