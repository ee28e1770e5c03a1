// What the floor's wash-station and furnace lanes allow, kept here so the floor only hooks it in.
// A booked (not yet running) wash batch or furnace run may be dragged along its lane or to
// another lane of the same kind; a furnace run only to a furnace that runs its profile. Its
// length never changes by hand: the profile's cycle (or the slowest unit's wash) sets it, and
// the server refuses a resize.

export type LaneEventProps = {
  kind: "build" | "wash_batch" | "furnace_run";
  id: string;
  version: number;
  title: string;
  state: string;
  profile_id?: string;
};

export type LaneResourceProps = { kind: "printer" | "wash_station" | "furnace"; title: string; profile_ids?: string[] };

export type LanePermissions = { wash: boolean; furnace: boolean };

/** Whether this user may drag this booking on the floor. */
export function laneEditable(e: Pick<LaneEventProps, "kind" | "state">, perms: LanePermissions): boolean {
  if (e.state !== "scheduled") return false;
  if (e.kind === "wash_batch") return perms.wash;
  if (e.kind === "furnace_run") return perms.furnace;
  return false;
}

/** Why the booking may not be dropped on that lane, or null when it may. */
export function laneMoveRefusal(e: LaneEventProps, r: LaneResourceProps): string | null {
  const code = e.title.split(" ")[0];
  if (e.kind === "wash_batch") return r.kind === "wash_station" ? null : `${code} is a wash batch: it goes on a wash-station lane, not ${r.title}.`;
  if (e.kind === "furnace_run") {
    if (r.kind !== "furnace") return `${code} is a furnace run: it goes on a furnace lane, not ${r.title}.`;
    if (e.profile_id && r.profile_ids && !r.profile_ids.includes(e.profile_id)) return `${r.title} does not run the sinter profile of ${code}.`;
    return null;
  }
  return null;
}

export type LaneMoveResult = { ok: boolean; text: string };

/** Books the moved batch or run through its schedule route; the floor reverts the drag when it is refused. */
export async function moveLaneBooking(e: LaneEventProps, resourceId: string, startsAt: string, endsAt: string | null | undefined, timeZone: string): Promise<LaneMoveResult> {
  const code = e.title.split(" ")[0];
  const url = e.kind === "furnace_run" ? `/api/furnace-runs/${e.id}/schedule` : `/api/wash-batches/${e.id}/schedule`;
  const body =
    e.kind === "furnace_run"
      ? { version: e.version, starts_at: startsAt, furnace_id: resourceId, ...(endsAt ? { ends_at: endsAt } : {}) }
      : { version: e.version, starts_at: startsAt, wash_station_id: resourceId };
  try {
    const res = await fetch(url, { method: "PATCH", headers: { "content-type": "application/json", accept: "application/json" }, body: JSON.stringify(body) });
    const json = await res.json().catch(() => null);
    if (!res.ok) {
      const why = res.status === 409 ? "Refused (conflict)" : res.status === 422 ? "Refused" : "Not saved";
      return { ok: false, text: `${why}: ${json?.error?.message ?? `the server answered ${res.status}`}` };
    }
    const start = new Date(json.starts_at);
    const end = new Date(json.ends_at);
    const f = (d: Date) => d.toLocaleString(undefined, { weekday: "short", hour: "2-digit", minute: "2-digit", hourCycle: "h23", timeZone });
    return { ok: true, text: `${code} is booked ${f(start)} – ${f(end)}.` };
  } catch {
    return { ok: false, text: "Not saved: the server could not be reached." };
  }
}
