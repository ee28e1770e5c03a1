"use client";

import { useRouter } from "next/navigation";
import { useState } from "react";
import { ApiError, sendJson } from "@/lib/http/client";
import { LOT_TRANSITIONS, type LotState } from "@/lib/inventory/lots";
import { field, primary, secondary, STATE_LABEL } from "./format";

export type LotActionsProps = { lot: { id: string; code: string; state: LotState; version: number; remaining_g: number }; canWrite: boolean; canRecall: boolean };

const VERB: Record<string, string> = { released: "Release for printing", rejected: "Reject", quarantine: "Back to quarantine", consumed: "Mark used up" };

export function LotActions({ lot, canWrite, canRecall }: LotActionsProps) {
  const router = useRouter();
  const [message, setMessage] = useState<string | null>(null);
  const [recall, setRecall] = useState<{ held: { serial: string; from: string }[]; beyond_reach: { serial: string; state: string; order_code: string; customer: string }[] } | null>(null);
  const [busy, setBusy] = useState(false);

  async function run(body: Record<string, unknown>, done: string) {
    setBusy(true);
    try {
      await sendJson(`/api/inventory/lots/${lot.id}`, "PATCH", { version: lot.version, ...body });
      setMessage(done);
      router.refresh();
    } catch (err) {
      setMessage(err instanceof ApiError && err.status === 409 ? `${err.message} Your entry is kept; reload to see the change.` : err instanceof Error ? err.message : String(err));
    } finally {
      setBusy(false);
    }
  }

  async function doRecall(e: React.FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const reason = String(new FormData(e.currentTarget).get("reason") ?? "");
    if (!window.confirm(`Put every unit printed from ${lot.code} that is still in the shop on hold?`)) return;
    setBusy(true);
    try {
      const r = await sendJson<NonNullable<typeof recall>>(`/api/inventory/lots/${lot.id}/recall`, "POST", { version: lot.version, reason });
      setRecall(r);
      setMessage(`${r.held.length} units put on hold; ${r.beyond_reach.length} already finished or scrapped are listed below.`);
      router.refresh();
    } catch (err) {
      setMessage(err instanceof Error ? err.message : String(err));
    } finally {
      setBusy(false);
    }
  }

  return (
    <section aria-labelledby="actions-heading" className="rounded-card bg-white p-4 shadow-card md:p-5">
      <h2 id="actions-heading" className="font-display text-lg font-semibold">What to do with {lot.code}</h2>
      {canWrite ? (
        <div className="mt-3 space-y-3">
          <div className="flex flex-wrap gap-2">
            {LOT_TRANSITIONS[lot.state].filter((s) => s !== "consumed").map((to) => (
              <button key={to} type="button" disabled={busy} className={to === "released" ? primary : secondary} onClick={() => {
                const reason = to === "rejected" ? window.prompt(`Why is ${lot.code} rejected?`) : "";
                if (reason === null) return;
                void run({ state: to, reason: reason ?? "" }, `${lot.code} is now ${STATE_LABEL[to].toLowerCase()}.`);
              }}>
                {VERB[to]}
              </button>
            ))}
          </div>
          <form className="flex flex-wrap items-end gap-2" onSubmit={(e) => {
            e.preventDefault();
            const f = new FormData(e.currentTarget);
            void run({ remaining_kg: f.get("remaining_kg"), reason: "shelf count" }, "Count recorded.");
          }}>
            <label className="text-sm">
              Weighed on the shelf now (kg)
              <input name="remaining_kg" type="number" inputMode="decimal" step="0.01" min="0" defaultValue={(lot.remaining_g / 1000).toFixed(2)} className={field} />
            </label>
            <button type="submit" className={secondary} disabled={busy}>Record count</button>
          </form>
        </div>
      ) : (
        <p className="mt-2 text-sm text-soot-700">Technicians and managers release, reject and count lots.</p>
      )}
      {canRecall ? (
        <form onSubmit={doRecall} className="mt-4 border-t border-soot-200 pt-4">
          <label className="block text-sm">
            Recall: the reason (supplier notice, failed run, test result)
            <input name="reason" required minLength={3} maxLength={300} className={field} />
          </label>
          <button type="submit" className={`${secondary} mt-2 border-oxide-500 text-oxide-700`} disabled={busy}>Recall this lot</button>
        </form>
      ) : null}
      <p role="status" aria-live="polite" className="mt-2 text-sm text-soot-800">{message}</p>
      {recall && recall.beyond_reach.length ? (
        <div className="mt-2">
          <h3 className="text-sm font-semibold">Finished or scrapped: trace with the customer</h3>
          <ul className="mt-1 list-disc pl-5 text-sm">
            {recall.beyond_reach.map((u) => (
              <li key={u.serial}>{u.serial} ({u.state}) — {u.order_code}, {u.customer}</li>
            ))}
          </ul>
        </div>
      ) : null}
    </section>
  );
}
