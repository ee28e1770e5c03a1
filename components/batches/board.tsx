"use client";

import { useMemo, useState } from "react";
import {
  DndContext,
  DragOverlay,
  KeyboardSensor,
  MouseSensor,
  TouchSensor,
  pointerWithin,
  rectIntersection,
  useDroppable,
  useSensor,
  useSensors,
  type CollisionDetection,
  type DragEndEvent,
  type DragOverEvent,
  type DragStartEvent,
  type KeyboardCoordinateGetter,
} from "@dnd-kit/core";
import { useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import { can, type Role } from "@/lib/auth/permissions";
import { checkFurnaceAdd, checkWashAdd, profileLabel } from "@/lib/batches/rules";
import Link from "next/link";
import type { Board, BoardActive, BoardFurnaceRun, BoardUnit, BoardWashBatch } from "@/lib/batches/types";
import { shopTime } from "./format";
import { ApiError, getJson, sendJson } from "./client";
import { QueryProvider } from "@/components/floor/query-provider";
import { LiveIndicator, useLivePoll } from "@/components/live/live-updates";
import { SuggestPanel } from "./suggest-panel";
import { RunTarget, WashTarget, type HoverVerdict } from "./targets";
import { UnitCard, UnitCardBody, type DragData } from "./unit-card";

export type BatchesBoardProps = { role: Role; unitPref: "mm" | "in" };

type Lane = "furnace" | "wash";
type Flash = { tone: "danger" | "success" | "info"; text: string } | null;

const collision: CollisionDetection = (args) => {
  const hits = pointerWithin(args);
  return hits.length ? hits : rectIntersection(args);
};

/**
 * Arrow keys jump the picked-up card from one drop target to the next (in reading order), so
 * the board needs no mouse: space to pick up, arrows to choose, space to drop, escape to undo.
 */
const jumpBetweenTargets: KeyboardCoordinateGetter = (event, { context }) => {
  const forward = ["ArrowRight", "ArrowDown"].includes(event.code);
  const backward = ["ArrowLeft", "ArrowUp"].includes(event.code);
  if (!forward && !backward) return undefined;
  event.preventDefault();
  const { droppableRects, droppableContainers, collisionRect, over } = context;
  if (!collisionRect) return undefined;
  const targets = droppableContainers
    .getEnabled()
    .map((c) => ({ id: c.id, rect: droppableRects.get(c.id) }))
    .filter((t): t is { id: string; rect: NonNullable<typeof t.rect> } => Boolean(t.rect))
    .sort((a, b) => a.rect.top - b.rect.top || a.rect.left - b.rect.left);
  if (!targets.length) return undefined;
  const at = over ? targets.findIndex((t) => t.id === over.id) : -1;
  const next = targets[(at + (forward ? 1 : -1) + targets.length) % targets.length];
  return { x: next.rect.left + next.rect.width / 2 - collisionRect.width / 2, y: next.rect.top + Math.min(40, next.rect.height / 2) - collisionRect.height / 2 };
};

export function BatchesBoard(props: BatchesBoardProps) {
  return (
    <QueryProvider>
      <BoardInner {...props} />
    </QueryProvider>
  );
}

function WaitingColumn({ lane, children, count, listed, total }: { lane: Lane; children: React.ReactNode; count: number; listed: number; total: number }) {
  const { setNodeRef, isOver } = useDroppable({ id: `waiting:${lane}` });
  return (
    <section
      ref={setNodeRef}
      aria-label={lane === "furnace" ? "Brown units waiting for a furnace run" : "Green units waiting for a wash"}
      data-testid={`waiting-${lane}`}
      className={`rounded-card border bg-soot-50/60 p-3 md:sticky md:top-2 md:self-start ${isOver ? "border-clay-400" : "border-soot-200"}`}
    >
      <h2 className="text-sm font-semibold text-soot-800">
        {lane === "furnace" ? "Waiting for a furnace" : "Waiting for a wash"} <span className="font-normal text-soot-500">({count})</span>
      </h2>
      <p className="mb-2 text-2xs text-soot-500">Most at risk first. Drop a unit back here to take it out of its {lane === "furnace" ? "run" : "batch"}.</p>
      {total > listed ? (
        <p className="mb-2 text-2xs text-soot-600" data-testid={`waiting-${lane}-more`}>
          Listed: the {listed} most at risk of {total} waiting. Suggestions consider them all.
        </p>
      ) : null}
      <div className="flex max-h-[70vh] flex-col gap-1.5 overflow-y-auto pr-1" role="region" aria-label={lane === "furnace" ? "Brown units" : "Green units"} tabIndex={0}>{children}</div>
    </section>
  );
}

function BoardInner({ role, unitPref }: BatchesBoardProps) {
  const qc = useQueryClient();
  const poll = useLivePoll();
  const board = useQuery({ queryKey: ["batches-board"], queryFn: () => getJson<Board>("/api/batches"), refetchInterval: poll(20_000) });
  const [lane, setLane] = useState<Lane>(role === "technician" ? "wash" : "furnace");
  const [flash, setFlash] = useState<Flash>(null);
  const [hover, setHover] = useState<HoverVerdict | null>(null);
  const [dragging, setDragging] = useState<DragData | null>(null);
  const [filters, setFilters] = useState({ material: "", profile: "", due: "" });
  const [busy, setBusy] = useState(false);
  const [showSuggest, setShowSuggest] = useState(false);
  // Mouse and touch apart (dnd-kit's sensors guide): a finger must press and hold a card for a
  // quarter second before it lifts, so that a swipe still scrolls the list on a phone.
  const sensors = useSensors(
    useSensor(MouseSensor, { activationConstraint: { distance: 4 } }),
    useSensor(TouchSensor, { activationConstraint: { delay: 250, tolerance: 5 } }),
    useSensor(KeyboardSensor, { coordinateGetter: jumpBetweenTargets }),
  );

  const canFurnace = can(role, "furnace:write");
  const canWash = can(role, "wash:write");
  const data = board.data;

  const fail = (err: unknown) => {
    if (err instanceof ApiError && err.status === 409) setFlash({ tone: "danger", text: `${err.message} The board has been reloaded; nothing else you did was lost.` });
    else if (err instanceof ApiError) setFlash({ tone: "danger", text: err.message });
    else setFlash({ tone: "danger", text: "The server could not be reached; nothing was changed." });
    void qc.invalidateQueries({ queryKey: ["batches-board"] });
  };

  /** Runs a change, with the board updated at once and put back if the server refuses. */
  const change = useMutation({
    mutationFn: async (c: { url: string; method: "POST" | "PUT" | "PATCH" | "DELETE"; body?: unknown; optimistic?: (b: Board) => Board; done?: string }) =>
      sendJson<unknown>(c.url, c.method, c.body),
    onMutate: async (c) => {
      setBusy(true);
      await qc.cancelQueries({ queryKey: ["batches-board"] });
      const before = qc.getQueryData<Board>(["batches-board"]);
      if (before && c.optimistic) qc.setQueryData(["batches-board"], c.optimistic(before));
      return { before };
    },
    onError: (err, _c, ctx) => {
      if (ctx?.before) qc.setQueryData(["batches-board"], ctx.before);
      fail(err);
    },
    onSuccess: (r, c) => {
      // The answer is the batch or run as saved: take its version at once, so the next action on
      // it does not wait for the refetch (and is not refused as stale).
      const saved = r as Partial<BoardFurnaceRun & BoardWashBatch> | null;
      if (saved && typeof saved.id === "string" && typeof saved.version === "number" && Array.isArray(saved.units)) {
        qc.setQueryData<Board>(["batches-board"], (b) =>
          b && {
            ...b,
            furnace_runs: b.furnace_runs.map((x) => (x.id === saved.id ? { ...x, ...(saved as BoardFurnaceRun) } : x)),
            wash_batches: b.wash_batches.map((x) => (x.id === saved.id ? { ...x, ...(saved as BoardWashBatch) } : x)),
          },
        );
      }
      if (c.done) setFlash({ tone: "success", text: c.done });
    },
    onSettled: () => {
      setBusy(false);
      void qc.invalidateQueries({ queryKey: ["batches-board"] });
    },
  });

  const filtered = useMemo(() => {
    if (!data) return { wash: [], furnace: [] };
    const keep = (u: BoardUnit) =>
      (!filters.material || u.material_id === filters.material) &&
      (!filters.profile || u.profile_id === filters.profile || u.compatible_profile_ids.includes(filters.profile)) &&
      (!filters.due || u.due_at.slice(0, 10) <= filters.due);
    return { wash: data.wash_waiting.filter(keep), furnace: data.furnace_waiting.filter(keep) };
  }, [data, filters]);

  if (board.isError) return <p role="alert" className="text-sm text-oxide-700">The board could not be loaded: {(board.error as Error).message}</p>;
  if (!data) return <p className="text-sm text-soot-500">Loading the board…</p>;

  const runById = new Map(data.furnace_runs.map((r) => [r.id, r]));
  const washById = new Map(data.wash_batches.map((w) => [w.id, w]));

  const verdictFor = (drag: DragData, targetId: string): HoverVerdict | null => {
    const [kind, id] = targetId.split(":");
    if (kind === "run") {
      const run = runById.get(id);
      const furnace = data.furnaces.find((f) => f.id === run?.furnace_id);
      if (!run || !furnace) return null;
      if (drag.from.kind === "run" && drag.from.id === id) return null;
      if (drag.lane !== "furnace") return { targetId, ok: false, reason: `${drag.unit.serial} is green; it needs a wash before a furnace run`, unit: drag.unit };
      const v = checkFurnaceAdd(run, run.units, drag.unit, furnace, data.profiles, data.clearance_mm);
      return v.ok ? { targetId, ok: true, layout: v.layout, unit: drag.unit } : { targetId, ok: false, reason: v.reason, unit: drag.unit };
    }
    if (kind === "wash") {
      const batch = washById.get(id);
      const station = data.stations.find((s) => s.id === batch?.wash_station_id);
      if (!batch || !station) return null;
      if (drag.from.kind === "wash" && drag.from.id === id) return null;
      if (drag.lane !== "wash") return { targetId, ok: false, reason: `${drag.unit.serial} has been washed already`, unit: drag.unit };
      const v = checkWashAdd(batch, batch.units, drag.unit, station);
      return v.ok ? { targetId, ok: true, unit: drag.unit } : { targetId, ok: false, reason: v.reason, unit: drag.unit };
    }
    return null;
  };

  const onDragStart = (e: DragStartEvent) => {
    setFlash(null);
    setDragging(e.active.data.current as DragData);
  };
  const onDragOver = (e: DragOverEvent) => {
    const drag = e.active.data.current as DragData;
    setHover(e.over ? verdictFor(drag, String(e.over.id)) : null);
  };

  const moveUnit = (b: Board, unit: BoardUnit, target: { kind: "run" | "wash"; id: string }, layout?: BoardFurnaceRun["tray_layout"]): Board => {
    const strip = <T extends BoardFurnaceRun | BoardWashBatch>(xs: T[]) => xs.map((x) => ({ ...x, units: x.units.filter((u) => u.id !== unit.id) }));
    const next = { ...b, furnace_waiting: b.furnace_waiting.filter((u) => u.id !== unit.id), wash_waiting: b.wash_waiting.filter((u) => u.id !== unit.id) };
    if (target.kind === "run") {
      next.furnace_runs = strip(b.furnace_runs).map((r) => (r.id === target.id ? { ...r, units: [...r.units, unit], tray_layout: layout ?? r.tray_layout } : r));
    } else {
      next.wash_batches = strip(b.wash_batches).map((w) => (w.id === target.id ? { ...w, units: [...w.units, unit] } : w));
    }
    return next;
  };

  const onDragEnd = (e: DragEndEvent) => {
    const drag = e.active.data.current as DragData;
    setDragging(null);
    setHover(null);
    if (!e.over) return;
    dropOn(drag, String(e.over.id));
  };

  /** A drop, from a drag (mouse, finger or keyboard) or from the "Move to…" menu: the same checks and calls. */
  const dropOn = (drag: DragData, targetId: string) => {
    const [kind, id] = targetId.split(":");
    if (kind === "waiting") {
      if (drag.from.kind !== "waiting") removeUnit(drag.unit, drag.from);
      return;
    }
    const verdict = verdictFor(drag, targetId);
    if (!verdict) return;
    if (!verdict.ok) {
      // Refused before it lands: the card never leaves its place.
      setFlash({ tone: "danger", text: `Not added. ${verdict.reason}.` });
      return;
    }
    if (kind === "run") {
      const run = runById.get(id)!;
      change.mutate({
        url: `/api/furnace-runs/${run.id}/units`,
        method: "POST",
        body: { version: run.version, unit_id: drag.unit.id, unit_version: drag.unit.version },
        optimistic: (b) => moveUnit(b, drag.unit, { kind: "run", id }, verdict.layout),
        done: `${drag.unit.serial} is on the trays of ${run.code}.`,
      });
    } else {
      const batch = washById.get(id)!;
      change.mutate({
        url: `/api/wash-batches/${batch.id}/units`,
        method: "POST",
        body: { version: batch.version, unit_id: drag.unit.id, unit_version: drag.unit.version },
        optimistic: (b) => moveUnit(b, drag.unit, { kind: "wash", id }),
        done: `${drag.unit.serial} is in wash batch ${batch.code}.`,
      });
    }
  };

  const removeUnit = (unit: BoardUnit, from: { kind: "run" | "wash"; id: string }) => {
    const target = from.kind === "run" ? runById.get(from.id) : washById.get(from.id);
    if (!target) return;
    const base = from.kind === "run" ? `/api/furnace-runs/${from.id}` : `/api/wash-batches/${from.id}`;
    change.mutate({
      url: `${base}/units/${unit.id}`,
      method: "DELETE",
      body: { version: target.version, unit_version: unit.version },
      optimistic: (b) => ({
        ...b,
        furnace_runs: b.furnace_runs.map((r) => (r.id === from.id ? { ...r, units: r.units.filter((u) => u.id !== unit.id) } : r)),
        wash_batches: b.wash_batches.map((w) => (w.id === from.id ? { ...w, units: w.units.filter((u) => u.id !== unit.id) } : w)),
        furnace_waiting: from.kind === "run" ? [unit, ...b.furnace_waiting] : b.furnace_waiting,
        wash_waiting: from.kind === "wash" ? [unit, ...b.wash_waiting] : b.wash_waiting,
      }),
      done: `${unit.serial} is waiting again.`,
    });
  };

  const profileName = (id: string | null) => {
    const p = data.profiles.find((x) => x.id === id);
    return p ? profileLabel(p) : undefined;
  };

  const waiting = lane === "furnace" ? filtered.furnace : filtered.wash;
  const moveTargets =
    lane === "furnace"
      ? data.furnace_runs.filter((r) => r.state === "draft" || r.state === "scheduled").map((r) => ({ id: `run:${r.id}`, label: r.code }))
      : data.wash_batches.filter((w) => w.state === "draft" || w.state === "scheduled").map((w) => ({ id: `wash:${w.id}`, label: w.code }));
  const canLane = lane === "furnace" ? canFurnace : canWash;

  return (
    <div className="space-y-4">
      <div className="flex flex-wrap items-center justify-between gap-3">
        <div role="tablist" aria-label="Board" className="inline-flex rounded-md border border-soot-200 bg-white p-0.5">
          {(["furnace", "wash"] as const).map((l) => (
            <button
              key={l}
              role="tab"
              type="button"
              aria-selected={lane === l}
              onClick={() => setLane(l)}
              className={`rounded px-3 py-1.5 text-sm font-semibold ${lane === l ? "bg-soot-900 text-soot-50" : "text-soot-600 hover:bg-soot-100"}`}
            >
              {l === "furnace" ? `Furnace runs (${data.furnace_runs.length})` : `Wash batches (${data.wash_batches.length})`}
            </button>
          ))}
        </div>
        <LiveIndicator />
        <div className="flex flex-wrap items-end gap-2 text-2xs text-soot-600">
          <label>
            Material
            <select value={filters.material} onChange={(e) => setFilters({ ...filters, material: e.target.value })} className="mt-0.5 block rounded border border-soot-200 bg-white px-1.5 py-1 text-xs" aria-label="Filter by material">
              <option value="">All</option>
              {data.materials.map((m) => (
                <option key={m.id} value={m.id}>
                  {m.code}
                </option>
              ))}
            </select>
          </label>
          <label>
            Profile
            <select value={filters.profile} onChange={(e) => setFilters({ ...filters, profile: e.target.value })} className="mt-0.5 block rounded border border-soot-200 bg-white px-1.5 py-1 text-xs" aria-label="Filter by sinter profile">
              <option value="">All</option>
              {data.profiles.map((p) => (
                <option key={p.id} value={p.id}>
                  {p.label}
                </option>
              ))}
            </select>
          </label>
          <label>
            Due by
            <input type="date" value={filters.due} onChange={(e) => setFilters({ ...filters, due: e.target.value })} className="mt-0.5 block rounded border border-soot-200 bg-white px-1.5 py-1 text-xs" aria-label="Filter by due date" />
          </label>
          {canWash ? (
            <button type="button" onClick={() => setShowSuggest(true)} className="rounded-md bg-clay-600 px-3 py-1.5 text-sm font-semibold text-white hover:bg-clay-700" data-testid="suggest-open">
              Suggest batches
            </button>
          ) : null}
        </div>
      </div>

      {flash ? (
        <div
          role={flash.tone === "danger" ? "alert" : "status"}
          data-testid="board-flash"
          className={`flex items-start justify-between gap-3 rounded-card border px-3 py-2 text-sm ${
            flash.tone === "danger" ? "border-oxide-500/40 bg-oxide-100 text-oxide-700" : flash.tone === "success" ? "border-verdigris-400/40 bg-verdigris-100 text-verdigris-700" : "border-slate2-400/40 bg-slate2-100 text-slate2-600"
          }`}
        >
          <span>{flash.text}</span>
          <button type="button" onClick={() => setFlash(null)} className="text-xs underline" aria-label="Dismiss message">
            Dismiss
          </button>
        </div>
      ) : null}

      {showSuggest ? (
        <SuggestPanel
          board={data}
          role={role}
          profileId={filters.profile || undefined}
          onClose={() => setShowSuggest(false)}
          onApplied={(text) => {
            setShowSuggest(false);
            setFlash({ tone: "success", text });
            void qc.invalidateQueries({ queryKey: ["batches-board"] });
          }}
        />
      ) : null}

      <ActiveStrip items={data.active.filter((a) => (lane === "furnace" ? a.kind === "furnace_run" : a.kind === "wash_batch"))} timeZone={data.time_zone} lane={lane} />

      <DndContext sensors={sensors} collisionDetection={collision} onDragStart={onDragStart} onDragOver={onDragOver} onDragEnd={onDragEnd} onDragCancel={() => (setDragging(null), setHover(null))}
        accessibility={{
          screenReaderInstructions: {
            draggable: "To move a unit: press space or enter to pick it up, arrow keys to go from one batch or run to the next, space or enter to drop it, escape to put it back. On a touch screen, press and hold the card, then drag it.",
          },
          announcements: {
            onDragStart: ({ active }) => `Picked up ${(active.data.current as DragData).unit.serial}.`,
            onDragOver: ({ active, over }) => {
              if (!over) return `${(active.data.current as DragData).unit.serial} is over no target.`;
              const v = verdictFor(active.data.current as DragData, String(over.id));
              return v ? (v.ok ? `${v.unit.serial} fits ${String(over.id).split(":")[0]} target.` : `Refused: ${v.reason}.`) : `Over ${String(over.id).split(":")[0]}.`;
            },
            onDragEnd: ({ active, over }) => `Dropped ${(active.data.current as DragData).unit.serial}${over ? "" : " outside any target; nothing changed"}.`,
            onDragCancel: ({ active }) => `${(active.data.current as DragData).unit.serial} put back.`,
          },
        }}
      >
        <div className="grid grid-cols-1 gap-4 md:grid-cols-[minmax(14rem,18rem)_minmax(0,1fr)] lg:grid-cols-[minmax(16rem,22rem)_minmax(0,1fr)]">
          <WaitingColumn
            lane={lane}
            count={waiting.length}
            listed={lane === "furnace" ? data.furnace_waiting.length : data.wash_waiting.length}
            total={lane === "furnace" ? data.furnace_waiting_total : data.wash_waiting_total}
          >
            {waiting.length === 0 ? <p className="text-xs text-soot-500">Nothing waiting{filters.material || filters.profile || filters.due ? " that matches the filters" : ""}.</p> : null}
            {waiting.map((u) => (
              <UnitCard
                key={u.id}
                unit={u}
                from={{ kind: "waiting" }}
                lane={lane}
                timeZone={data.time_zone}
                unitPref={unitPref}
                profileLabel={profileName(u.profile_id)}
                disabled={!canLane}
                moveTargets={moveTargets}
                onMove={(targetId) => dropOn({ unit: u, from: { kind: "waiting" }, lane }, targetId)}
              />
            ))}
          </WaitingColumn>
          <div className="space-y-3">
            {lane === "furnace" ? (
              <>
                {canFurnace ? <NewRunForm board={data} busy={busy} onCreate={(body) => change.mutate({ url: "/api/furnace-runs", method: "POST", body, done: "New draft run opened." })} /> : null}
                <div className="grid grid-cols-1 gap-3 xl:grid-cols-2" data-testid="run-targets">
                  {data.furnace_runs.length === 0 ? <p className="text-sm text-soot-500">No open furnace runs. Open one, or let Hearth suggest them.</p> : null}
                  {data.furnace_runs.map((r) => (
                    <RunTarget
                      key={r.id}
                      run={r}
                      furnace={data.furnaces.find((f) => f.id === r.furnace_id)}
                      furnaces={data.furnaces}
                      profile={data.profiles.find((p) => p.id === r.profile_id)}
                      clearance_mm={data.clearance_mm}
                      timeZone={data.time_zone}
                      unitPref={unitPref}
                      hover={hover}
                      canEdit={canFurnace}
                      busy={busy}
                      now={data.now}
                      onRemove={(u) => removeUnit(u, { kind: "run", id: r.id })}
                      onSchedule={(starts_at, furnace_id) =>
                        change.mutate({ url: `/api/furnace-runs/${r.id}/schedule`, method: "PATCH", body: { version: r.version, starts_at, furnace_id }, done: `${r.code} is booked.` })
                      }
                      onCancel={() => change.mutate({ url: `/api/furnace-runs/${r.id}/cancel`, method: "POST", body: { version: r.version }, done: `${r.code} is cancelled; its units wait again.` })}
                    />
                  ))}
                </div>
              </>
            ) : (
              <>
                {canWash ? <NewWashForm board={data} busy={busy} onCreate={(body) => change.mutate({ url: "/api/wash-batches", method: "POST", body, done: "New draft wash batch opened." })} /> : null}
                <div className="grid grid-cols-1 gap-3 xl:grid-cols-2" data-testid="wash-targets">
                  {data.wash_batches.length === 0 ? <p className="text-sm text-soot-500">No open wash batches. Open one, or let Hearth suggest them.</p> : null}
                  {data.wash_batches.map((w) => (
                    <WashTarget
                      key={w.id}
                      batch={w}
                      station={data.stations.find((s) => s.id === w.wash_station_id)}
                      stations={data.stations}
                      timeZone={data.time_zone}
                      unitPref={unitPref}
                      hover={hover}
                      canEdit={canWash}
                      busy={busy}
                      now={data.now}
                      onRemove={(u) => removeUnit(u, { kind: "wash", id: w.id })}
                      onSchedule={(starts_at, wash_station_id) =>
                        change.mutate({ url: `/api/wash-batches/${w.id}/schedule`, method: "PATCH", body: { version: w.version, starts_at, wash_station_id }, done: `${w.code} is booked.` })
                      }
                      onStart={() => change.mutate({ url: `/api/wash-batches/${w.id}/start`, method: "POST", body: { version: w.version }, done: `${w.code} is washing.` })}
                      onCancel={() => change.mutate({ url: `/api/wash-batches/${w.id}/cancel`, method: "POST", body: { version: w.version }, done: `${w.code} is cancelled; its units wait again.` })}
                    />
                  ))}
                </div>
              </>
            )}
          </div>
        </div>
        <DragOverlay dropAnimation={null}>
          {dragging ? (
            <div className="w-72 rotate-1 rounded-md border border-clay-400 bg-white px-2.5 py-1.5 shadow-lg">
              <UnitCardBody unit={dragging.unit} timeZone={data.time_zone} unitPref={unitPref} profileLabel={profileName(dragging.unit.profile_id)} />
            </div>
          ) : null}
        </DragOverlay>
      </DndContext>
    </div>
  );
}

function ActiveStrip({ items, timeZone, lane }: { items: BoardActive[]; timeZone: string; lane: Lane }) {
  if (!items.length) return null;
  return (
    <section aria-label={lane === "furnace" ? "Runs in the furnace" : "Washes in the solvent"} className="rounded-card border border-soot-200 bg-white px-3 py-2" data-testid="active-strip">
      <h2 className="text-xs font-semibold text-soot-700">{lane === "furnace" ? "In the furnace" : "In the solvent"}</h2>
      <ul className="mt-1 flex flex-wrap gap-2">
        {items.map((a) => (
          <li key={a.id}>
            <Link
              href={a.kind === "furnace_run" ? `/furnace-runs/${a.id}` : `/batches/wash/${a.id}`}
              className={`tap-target inline-flex items-center gap-2 rounded-md border px-2 py-1 text-xs hover:bg-soot-50 ${a.needs === "unload" ? "border-brass-400 bg-brass-100/60" : "border-soot-200"}`}
            >
              <span className="font-semibold text-soot-900">{a.code}</span>
              <span className="text-soot-600">
                {a.resource_name} · {a.unit_count} units · until {shopTime(a.ends_at, timeZone)}
              </span>
              {a.needs === "unload" ? <span className="font-semibold text-brass-600">record unload</span> : a.needs === "weighing" ? <span className="text-slate2-600">weigh and finish</span> : null}
            </Link>
          </li>
        ))}
      </ul>
    </section>
  );
}

function NewRunForm({ board, busy, onCreate }: { board: Board; busy: boolean; onCreate: (b: { furnace_id: string; profile_id: string }) => void }) {
  const [furnaceId, setFurnaceId] = useState(board.furnaces[0]?.id ?? "");
  const furnace = board.furnaces.find((f) => f.id === furnaceId);
  const profiles = board.profiles.filter((p) => furnace?.profile_ids.includes(p.id));
  const [profileId, setProfileId] = useState("");
  const chosen = profiles.some((p) => p.id === profileId) ? profileId : (profiles[0]?.id ?? "");
  return (
    <form
      className="flex flex-wrap items-end gap-2 rounded-card border border-dashed border-soot-300 bg-white px-3 py-2"
      onSubmit={(e) => {
        e.preventDefault();
        if (furnaceId && chosen) onCreate({ furnace_id: furnaceId, profile_id: chosen });
      }}
    >
      <span className="text-sm font-semibold text-soot-800">New furnace run</span>
      <label className="min-w-0 max-w-full text-2xs text-soot-600">
        Furnace
        <select aria-label="Furnace for the new run" value={furnaceId} onChange={(e) => setFurnaceId(e.target.value)} className="mt-0.5 block w-full max-w-full rounded border border-soot-200 px-1.5 py-1 text-xs">
          {board.furnaces.map((f) => (
            <option key={f.id} value={f.id}>
              {f.name} ({f.tray_count} × {f.tray_x_mm}×{f.tray_y_mm} mm, {f.usable_height_mm} mm high)
            </option>
          ))}
        </select>
      </label>
      <label className="min-w-0 max-w-full text-2xs text-soot-600">
        Sinter profile
        <select aria-label="Sinter profile for the new run" value={chosen} onChange={(e) => setProfileId(e.target.value)} className="mt-0.5 block w-full max-w-full rounded border border-soot-200 px-1.5 py-1 text-xs">
          {profiles.map((p) => (
            <option key={p.id} value={p.id}>
              {p.label} · {p.name}
            </option>
          ))}
        </select>
      </label>
      <button type="submit" disabled={busy || !chosen} className="rounded border border-clay-600 px-2.5 py-1 text-xs font-semibold text-clay-700 hover:bg-clay-50 disabled:opacity-50">
        Open run
      </button>
    </form>
  );
}

function NewWashForm({ board, busy, onCreate }: { board: Board; busy: boolean; onCreate: (b: { wash_station_id: string }) => void }) {
  const [stationId, setStationId] = useState(board.stations[0]?.id ?? "");
  return (
    <form
      className="flex flex-wrap items-end gap-2 rounded-card border border-dashed border-soot-300 bg-white px-3 py-2"
      onSubmit={(e) => {
        e.preventDefault();
        if (stationId) onCreate({ wash_station_id: stationId });
      }}
    >
      <span className="text-sm font-semibold text-soot-800">New wash batch</span>
      <label className="min-w-0 max-w-full text-2xs text-soot-600">
        Wash station
        <select aria-label="Wash station for the new batch" value={stationId} onChange={(e) => setStationId(e.target.value)} className="mt-0.5 block w-full max-w-full rounded border border-soot-200 px-1.5 py-1 text-xs">
          {board.stations.map((s) => (
            <option key={s.id} value={s.id}>
              {s.name} ({s.capacity_units} units, {s.basket_x_mm}×{s.basket_y_mm}×{s.basket_z_mm} mm)
            </option>
          ))}
        </select>
      </label>
      <button type="submit" disabled={busy || !stationId} className="rounded border border-clay-600 px-2.5 py-1 text-xs font-semibold text-clay-700 hover:bg-clay-50 disabled:opacity-50">
        Open batch
      </button>
    </form>
  );
}
