// The batching board's response body, shared by every open board in the process until the
// board's change stamp moves (migration 202612040510) or the live listener hears of a change:
// after each change every open board asks again at once, and one load serves them all.
import { WindowCache } from "@/lib/floor/window-cache";
import type { WindowBody } from "@/lib/floor/window-body";
import type { PreparedBoardUnit, WaitingLane } from "@/lib/batches/board-unit";

// On globalThis for the same reason as the floor's window cache: the route handler and the live
// listener's module copy must share it.
const globalForCache = globalThis as unknown as { hearthBoardCache?: WindowCache<WindowBody>; hearthWaitingWashCache?: WindowCache<WaitingLane>; hearthWaitingWashRowsCache?: WindowCache<PreparedBoardUnit[]> };

export function boardCache(): WindowCache<WindowBody> {
  return (globalForCache.hearthBoardCache ??= new WindowCache<WindowBody>(2_000, 4));
}

/**
 * The units waiting for a wash, projected (db/batches/reads.ts sharedWaitingWash), worked from
 * waitingWashRowsCache. Kept up to ten seconds, not two (then projected again behind the old
 * answer for ten more): its stamp and the live listener end it at any change it shows, so the age
 * only bounds how far its projections' "now" lags the board's (the slack is in whole minutes).
 */
export function waitingWashCache(): WindowCache<WaitingLane> {
  // Past ten seconds (and up to ten more) the list is answered while its reload runs behind it:
  // the boards that ask then do not all wait a third of a second for projections that only aged.
  return (globalForCache.hearthWaitingWashCache ??= new WindowCache<WaitingLane>(10_000, 2, Date.now, 10_000));
}

/**
 * The units waiting for a wash as worked from their rows, before projection (the database's part
 * of the list and most of its CPU). Its stamp and the live listener end it at any change it
 * shows; the age only bounds how long a change made in the instant between its stamp's bump and
 * its commit can go unseen while the listener is down (it resyncs when back): a minute, then
 * loaded again behind the old list for a minute more.
 */
export function waitingWashRowsCache(): WindowCache<PreparedBoardUnit[]> {
  return (globalForCache.hearthWaitingWashRowsCache ??= new WindowCache<PreparedBoardUnit[]>(60_000, 2, Date.now, 60_000));
}
