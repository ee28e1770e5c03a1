// The batching board's response body, shared by every open board in the process until the
// board's change stamp moves (migration 202612040510) or the live listener hears of a change:
// after each change every open board asks again at once, and one load serves them all.
import { WindowCache } from "@/lib/floor/window-cache";
import type { WindowBody } from "@/lib/floor/window-body";
import type { BoardUnit } from "@/lib/batches/types";

// On globalThis for the same reason as the floor's window cache: the route handler and the live
// listener's module copy must share it.
const globalForCache = globalThis as unknown as { hearthBoardCache?: WindowCache<WindowBody>; hearthWaitingWashCache?: WindowCache<BoardUnit[]> };

export function boardCache(): WindowCache<WindowBody> {
  return (globalForCache.hearthBoardCache ??= new WindowCache<WindowBody>(2_000, 4));
}

/**
 * The units waiting for a wash, projected (db/batches/reads.ts sharedWaitingWash): the board's
 * costliest part. Kept up to ten seconds, not two (then reloaded behind the old answer for ten more): its stamp and the live listener end it at
 * any change it shows, so the age only bounds how far its projections' "now" lags the board's
 * (the slack is in whole minutes), and how long a change made in the instant between its stamp's
 * bump and its commit can go unseen while the listener is down (it resyncs when back).
 */
export function waitingWashCache(): WindowCache<BoardUnit[]> {
  // Past ten seconds (and up to ten more) the list is answered while its reload runs behind it:
  // the boards that ask then do not all wait a third of a second for projections that only aged.
  return (globalForCache.hearthWaitingWashCache ??= new WindowCache<BoardUnit[]>(10_000, 2, Date.now, 10_000));
}
