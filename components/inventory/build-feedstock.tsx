"use client";

import Link from "next/link";
import { useRouter } from "next/navigation";
import { useState } from "react";
import { ApiError, getJson, sendJson } from "@/lib/http/client";
import { field, kg } from "./format";

export type BuildFeedstockProps = {
  buildId: string;
  state: string;
  chosenLotId: string | null;
  estimateG: number | null;
  draws: Array<{ lot_id: string; lot_code: string; estimated_g: number; drawn_g: number; corrected_at: string | null }>;
  lots: Array<{ id: string; code: string; remaining_g: number; expires_on: string | null }>;
  canWrite: boolean;
};

/** Which lot the build prints from: chosen here, or first expiring first out when it starts. */
export function BuildFeedstock({ buildId, state, chosenLotId, estimateG, draws, lots, canWrite }: BuildFeedstockProps) {
  const router = useRouter();
  const [message, setMessage] = useState<string | null>(null);
  const open = state === "draft" || state === "scheduled";

  async function choose(lotId: string) {
    try {
      const { build } = await getJson<{ build: { version: number } }>(`/api/builds/${buildId}`);
      await sendJson(`/api/builds/${buildId}`, "PATCH", { version: build.version, feedstock_lot_id: lotId || null });
      setMessage(lotId ? "Lot chosen: the build will draw from it when it starts." : "The build will draw first expiring first out.");
      router.refresh();
    } catch (err) {
      setMessage(err instanceof ApiError ? err.message : String(err));
    }
  }

  return (
    <section aria-labelledby="feedstock-heading" className="mx-4 mb-6 rounded-card bg-white p-4 shadow-card md:mx-8 md:p-5">
      <h2 id="feedstock-heading" className="font-display text-lg font-semibold">Feedstock</h2>
      {estimateG !== null ? <p className="mt-1 text-sm text-soot-700">The units, supports and purge take about {kg(estimateG)}.</p> : null}
      {draws.length ? (
        <ul className="mt-2 space-y-1 text-sm">
          {draws.map((d) => (
            <li key={d.lot_id}>
              Drew <strong>{kg(d.drawn_g)}</strong> from <Link className="font-mono text-clay-800 underline" href={`/inventory/${d.lot_id}`}>{d.lot_code}</Link>
              {d.corrected_at ? ` (weighed; estimated ${kg(d.estimated_g)})` : " (estimated at start)"}
            </li>
          ))}
        </ul>
      ) : open && canWrite ? (
        <label className="mt-2 block max-w-md text-sm">
          Print from lot
          <select className={field} defaultValue={chosenLotId ?? ""} onChange={(e) => void choose(e.target.value)}>
            <option value="">First expiring first out at start</option>
            {lots.map((l) => (
              <option key={l.id} value={l.id}>
                {l.code}: {kg(l.remaining_g)} left{l.expires_on ? `, use by ${l.expires_on}` : ""}
              </option>
            ))}
          </select>
        </label>
      ) : (
        <p className="mt-2 text-sm text-soot-700">{open ? "Chosen when it starts, first expiring first out." : "No feedstock was recorded for this build."}</p>
      )}
      {open && !lots.length ? <p className="mt-2 text-sm text-oxide-700">No released, in-date lot of this material is on the shelf. <Link className="underline" href="/inventory">Receive or release one</Link>.</p> : null}
      <p role="status" aria-live="polite" className="mt-1 text-sm text-soot-800">{message}</p>
    </section>
  );
}
