"use client";

import { ScrollRegion } from "@/components/ui/scroll-region";
import { useState } from "react";
import { useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import { can, type Role } from "@/lib/auth/permissions";
import { washGauges } from "@/lib/batches/rules";
import type { BoardStation, BoardWashBatch } from "@/lib/batches/types";
import { massLossCheck } from "@/lib/process/wash";
import { ApiError, getJson, sendJson } from "./client";
import { duration, shopTime } from "./format";
import { GaugeBar } from "./gauge";
import { BatchesQueryProvider } from "./query-provider";
import { useLivePoll } from "@/components/live/live-updates";

type MassResult = { unit_id: string; serial: string; green_mass_g: number | null; brown_mass_g: number | null; loss_fraction: number | null; min_mass_loss: number; passed: boolean | null };
type Detail = { batch: BoardWashBatch; masses: MassResult[]; station: BoardStation | null };

export type WashViewProps = { batchId: string; role: Role; timeZone: string };

const STATE_WORDS: Record<string, string> = { draft: "Draft", scheduled: "Booked", running: "Washing", complete: "Complete", cancelled: "Cancelled" };
const pct = (x: number) => `${(x * 100).toFixed(2)} %`;

export function WashView(props: WashViewProps) {
  return (
    <BatchesQueryProvider>
      <WashViewInner {...props} />
    </BatchesQueryProvider>
  );
}

function WashViewInner({ batchId, role, timeZone }: WashViewProps) {
  const qc = useQueryClient();
  const poll = useLivePoll();
  const q = useQuery({ queryKey: ["wash-batch", batchId], queryFn: () => getJson<Detail>(`/api/wash-batches/${batchId}`), refetchInterval: poll(30_000) });
  const [edits, setEdits] = useState<Record<string, { green?: string; brown?: string }>>({});
  const [flash, setFlash] = useState<{ tone: "danger" | "success"; text: string; fields?: Record<string, string[]> } | null>(null);
  const act = useMutation({
    mutationFn: (c: { url: string; method: "POST" | "PUT"; body: unknown; done: string }) => sendJson(c.url, c.method, c.body),
    onSuccess: (_r, c) => {
      setFlash({ tone: "success", text: c.done });
      setEdits({});
    },
    onError: (err) =>
      setFlash({ tone: "danger", text: err instanceof ApiError ? err.message : "The server could not be reached; nothing was changed.", fields: err instanceof ApiError ? err.fieldErrors : undefined }),
    onSettled: () => void qc.invalidateQueries({ queryKey: ["wash-batch", batchId] }),
  });

  if (q.isError) return <p role="alert" className="text-sm text-oxide-700">{(q.error as Error).message}</p>;
  const d = q.data;
  if (!d) return <p className="text-sm text-soot-500">Loading the wash batch…</p>;
  const { batch, station } = d;
  const mayRecord = can(role, "wash:record") && (batch.state === "running" || batch.state === "complete" || batch.state === "draft" || batch.state === "scheduled");
  const mayBrown = batch.state === "running" || batch.state === "complete";
  const slowest = batch.units.reduce<(typeof batch.units)[number] | null>((s, u) => (!s || u.wash_minutes > s.wash_minutes ? u : s), null);

  const valueOf = (unitId: string, kind: "green" | "brown", saved: number | null) => edits[unitId]?.[kind] ?? (saved === null ? "" : String(saved));
  const masses = () =>
    Object.entries(edits)
      .map(([unit_id, e]) => ({
        unit_id,
        ...(e.green !== undefined && e.green !== "" ? { green_mass_g: Number(e.green) } : {}),
        ...(e.brown !== undefined && e.brown !== "" ? { brown_mass_g: Number(e.brown) } : {}),
      }))
      .filter((m) => "green_mass_g" in m || "brown_mass_g" in m);

  return (
    <div className="space-y-5">
      {flash ? (
        <div role={flash.tone === "danger" ? "alert" : "status"} data-testid="wash-flash" className={`rounded-card border px-3 py-2 text-sm ${flash.tone === "danger" ? "border-oxide-500/40 bg-oxide-100 text-oxide-700" : "border-verdigris-400/40 bg-verdigris-100 text-verdigris-700"}`}>
          {flash.text}
          {flash.fields && Object.keys(flash.fields).length > 1 ? (
            <ul className="mt-1 list-disc pl-5 text-xs">
              {Object.values(flash.fields)
                .flat()
                .slice(0, 12)
                .map((m, i) => (
                  <li key={i}>{m}</li>
                ))}
            </ul>
          ) : null}
        </div>
      ) : null}
      <section className="grid grid-cols-1 gap-3 sm:grid-cols-2 lg:grid-cols-4" aria-label="Wash summary">
        <Fact label="State" value={STATE_WORDS[batch.state]} testId="wash-state" />
        <Fact label="Station" value={station?.name ?? "—"} note={station ? `${station.solvent} · basket ${station.basket_x_mm}×${station.basket_y_mm}×${station.basket_z_mm} mm` : ""} />
        <Fact label="Wash time" value={duration(batch.est_minutes)} note={slowest ? `set by ${slowest.serial} (wall ${slowest.thickest_wall_mm} mm)` : "no units"} />
        <Fact label={batch.started_at ? "In the solvent" : "Booked"} value={batch.starts_at ? `${shopTime(batch.starts_at, timeZone)} → ${shopTime(batch.ends_at, timeZone, false)}` : "Not booked"} note={batch.finished_at ? `out ${shopTime(batch.finished_at, timeZone)}` : ""} />
      </section>
      {station ? (
        <section className="grid grid-cols-1 gap-1.5 rounded-card border border-soot-200 bg-white p-4 shadow-card sm:grid-cols-3">
          {washGauges(batch.units, station).map((g) => (
            <GaugeBar key={g.key} gauge={g} />
          ))}
        </section>
      ) : null}
      <section className="rounded-card border border-soot-200 bg-white p-4 shadow-card">
        <h2 className="text-sm font-semibold text-soot-800">Weighings</h2>
        <p className="text-2xs text-soot-500">
          Mass loss = (green − brown) / green, against the material&apos;s minimum. A unit short of it is held when the wash is finished, with the reason, and goes back for another wash.
        </p>
        <ScrollRegion label="Masses"><table className="mt-2 w-full text-left text-xs" data-testid="mass-table">
          <thead className="text-2xs text-soot-500">
            <tr>
              <th className="py-1 font-medium">Unit</th>
              <th className="py-1 font-medium">Material</th>
              <th className="py-1 font-medium">Wall</th>
              <th className="py-1 font-medium">Wash</th>
              <th className="py-1 font-medium">Green (g)</th>
              <th className="py-1 font-medium">Brown (g)</th>
              <th className="py-1 font-medium">Mass loss</th>
              <th className="py-1 font-medium">Minimum</th>
              <th className="py-1 font-medium">Check</th>
            </tr>
          </thead>
          <tbody>
            {batch.units.map((u) => {
              const g = Number(valueOf(u.id, "green", u.green_mass_g));
              const b = Number(valueOf(u.id, "brown", u.brown_mass_g));
              let check: ReturnType<typeof massLossCheck> | null = null;
              let problem: string | null = null;
              if (g > 0 && b > 0) {
                try {
                  check = massLossCheck(g, b, u.min_mass_loss);
                } catch (err) {
                  problem = (err as Error).message;
                }
              }
              const field = (kind: "green" | "brown", saved: number | null, enabled: boolean) => (
                <input
                  type="number"
                  step="0.1"
                  min="0"
                  inputMode="decimal"
                  aria-label={`${kind === "green" ? "Green" : "Brown"} mass of ${u.serial}`}
                  value={valueOf(u.id, kind, saved)}
                  disabled={!enabled}
                  onChange={(e) => setEdits({ ...edits, [u.id]: { ...edits[u.id], [kind]: e.target.value } })}
                  className="w-24 rounded border border-soot-200 px-1.5 py-0.5 tabular disabled:bg-soot-50"
                />
              );
              return (
                <tr key={u.id} className="border-t border-soot-100" data-unit-id={u.id}>
                  <td className="py-1 font-mono">{u.serial}</td>
                  <td className="py-1">{u.material_code}</td>
                  <td className="tabular py-1">{u.thickest_wall_mm} mm</td>
                  <td className="tabular py-1">{duration(u.wash_minutes)}</td>
                  <td className="py-1">{field("green", u.green_mass_g, mayRecord && u.state !== "on_hold")}</td>
                  <td className="py-1">{field("brown", u.brown_mass_g, mayRecord && mayBrown && u.state === "washing")}</td>
                  <td className="tabular py-1">{check ? pct(check.lossFraction) : "—"}</td>
                  <td className="tabular py-1">{pct(u.min_mass_loss)}</td>
                  <td className="py-1" data-testid="mass-check">
                    {problem ? (
                      <span className="text-oxide-700">{problem}</span>
                    ) : u.state === "on_hold" ? (
                      <span className="rounded bg-oxide-100 px-1 text-oxide-700" title={u.hold_reason ?? ""}>Held: {u.hold_reason}</span>
                    ) : check ? (
                      check.passed ? (
                        <span className="rounded bg-verdigris-100 px-1 text-verdigris-700">Passes</span>
                      ) : (
                        <span className="rounded bg-oxide-100 px-1 text-oxide-700">Short by {check.shortByG.toFixed(1)} g</span>
                      )
                    ) : (
                      <span className="text-soot-500">{u.state.replace(/_/g, " ")}</span>
                    )}
                  </td>
                </tr>
              );
            })}
          </tbody>
        </table></ScrollRegion>
        <div className="mt-3 flex flex-wrap gap-2">
          {mayRecord ? (
            <button
              type="button"
              disabled={act.isPending || masses().length === 0}
              onClick={() => act.mutate({ url: `/api/wash-batches/${batch.id}/masses`, method: "PUT", body: { version: batch.version, masses: masses() }, done: "Weighings saved." })}
              className="rounded-md border border-soot-300 bg-white px-3 py-1.5 text-sm font-semibold text-soot-800 hover:bg-soot-50 disabled:opacity-50"
            >
              Save weighings
            </button>
          ) : null}
          {can(role, "wash:write") && (batch.state === "draft" || batch.state === "scheduled") ? (
            <button
              type="button"
              disabled={act.isPending || batch.units.length === 0}
              onClick={() => act.mutate({ url: `/api/wash-batches/${batch.id}/start`, method: "POST", body: { version: batch.version }, done: `${batch.code} is in the solvent.` })}
              className="rounded-md bg-clay-600 px-3 py-1.5 text-sm font-semibold text-white hover:bg-clay-700 disabled:opacity-50"
            >
              Start wash now
            </button>
          ) : null}
          {can(role, "wash:record") && batch.state === "running" ? (
            <button
              type="button"
              disabled={act.isPending}
              onClick={() => act.mutate({ url: `/api/wash-batches/${batch.id}/finish`, method: "POST", body: { version: batch.version, masses: masses() }, done: `${batch.code} is finished; see each unit's check.` })}
              className="rounded-md bg-clay-600 px-3 py-1.5 text-sm font-semibold text-white hover:bg-clay-700 disabled:opacity-50"
              data-testid="finish-wash"
            >
              Finish wash
            </button>
          ) : null}
        </div>
      </section>
    </div>
  );
}

function Fact({ label, value, note, testId }: { label: string; value: string; note?: string; testId?: string }) {
  return (
    <div className="rounded-card border border-soot-200 bg-white px-3 py-2 shadow-card">
      <div className="text-2xs text-soot-500">{label}</div>
      <div className="font-display text-base font-semibold text-soot-900" data-testid={testId}>
        {value}
      </div>
      {note ? <div className="text-2xs text-soot-500">{note}</div> : null}
    </div>
  );
}
