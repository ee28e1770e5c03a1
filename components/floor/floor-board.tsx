"use client";

import FullCalendar from "@fullcalendar/react";
import luxonPlugin from "@fullcalendar/luxon3";
import interactionPlugin, { Draggable, type DateClickArg, type EventReceiveArg } from "@fullcalendar/interaction";
import resourceTimelinePlugin from "@fullcalendar/resource-timeline";
import type { CalendarOptions, DateSpanApi, DatesSetArg, EventApi, EventContentArg, EventDropArg, EventInput } from "@fullcalendar/core";
import { keepPreviousData, useQuery, useQueryClient } from "@tanstack/react-query";
import Link from "next/link";
import { useRouter } from "next/navigation";
import { useCallback, useEffect, useMemo, useRef, useState, useSyncExternalStore } from "react";
import type { FloorData, FloorEvent, FloorResource, UnscheduledBuild } from "@/lib/floor/schemas";
import { ApiError, apiJson } from "./api";
import { useCalendarA11y } from "./calendar-a11y";
import { PlanPanel, type Proposal } from "./plan-panel";
import { ScheduleForm } from "./schedule-form";
import { formatDay, formatSlot, minutesLabel } from "./format";
import { FLOOR_DATA_MARK, floorUrl, openingScrollTime, openingWeek, takeOpeningFetch, type FloorRange } from "./opening-week";
import { LiveIndicator, useLivePoll } from "@/components/live/live-updates";
import { laneEditable, laneMoveRefusal, moveLaneBooking, type LaneEventProps, type LanePermissions } from "@/components/furnace/lane-interactions";

export type FloorBoardProps = {
  /** The shop's IANA time zone: the timeline, its labels, drops and the now line all read it. */
  timeZone: string;
  canSchedule: boolean; canPropose: boolean; canApply: boolean; canWash?: boolean; canFurnace?: boolean };

type Message = { tone: "success" | "danger" | "info"; text: string } | null;
type Slot = { printer_id: string | null; starts_at: string | null };
export type LastMove = { build_id: string; code: string; version: number; before: Slot; after: Slot };
type ScheduleResponse = { build: { id: string; code: string; state: string; version: number; printer_id: string | null; starts_at: string | null; ends_at: string | null } };
type BuildVerdicts = { verdicts: { printer_id: string; printer_name: string; ok: boolean; reason: string | null }[]; build: { material_id: string } };

const COLORS: Record<string, { bg: string; border: string; text: string }> = {
  scheduled: { bg: "#f5e3d6", border: "#c46535", text: "#5a2c21" },
  running: { bg: "#ff8a3d", border: "#d0520a", text: "#1b1916" },
  complete: { bg: "#e9e6e1", border: "#8d8273", text: "#403a33" },
  failed: { bg: "#f8dcd8", border: "#c0392b", text: "#8e2a20" },
  wash_batch: { bg: "#e2e8ef", border: "#4a6076", text: "#2b2723" },
  furnace_run: { bg: "#f6ecd0", border: "#9c7a1f", text: "#2b2723" },
  proposed: { bg: "#dcefe9", border: "#2f8a72", text: "#1e5c4c" },
};

const STATE_WORDS: Record<FloorEvent["kind"], Record<string, string>> = {
  build: { scheduled: "booked", running: "printing", complete: "done" },
  wash_batch: { scheduled: "booked", running: "washing", complete: "done" },
  furnace_run: { scheduled: "booked", running: "firing", complete: "done" },
};

// FullCalendar re-renders every event when an option's identity changes, so options live here
// or in memos, never inline. The Luxon plugin gives FullCalendar real named time zones: without
// it a named zone is "UTC-coercion", and the Date objects of drops and clicks are not instants.
const PLUGINS = [resourceTimelinePlugin, interactionPlugin, luxonPlugin];
const HEADER = { left: "prev,today,next", center: "title", right: "resourceTimelineDay,resourceTimelineWeek" };
// Worded arrows instead of FullCalendar's icon font: its icons are role="img" spans without a
// name (axe-core role-img-alt), and words read aloud and on a phone alike.
const BUTTONS = { today: "Now", prev: "‹ Earlier", next: "Later ›", resourceTimelineDay: "Day", resourceTimelineWeek: "Week" };
const VIEWS: CalendarOptions["views"] = {
  resourceTimelineDay: { slotDuration: { hours: 1 }, slotLabelFormat: { hour: "2-digit", minute: "2-digit", hour12: false } },
  resourceTimelineWeek: { slotDuration: { hours: 6 }, slotLabelFormat: [{ weekday: "short", day: "numeric" }, { hour: "2-digit", hour12: false }] },
};
/** On a phone a day's hour slots are about 18 px wide: "06" fits there, "06:00" ran into its neighbour. */
const PHONE_VIEWS: CalendarOptions["views"] = { ...VIEWS, resourceTimelineDay: { slotDuration: { hours: 1 }, slotLabelFormat: { hour: "2-digit", hour12: false } } };
const SNAP = { minutes: 15 };
/** Press-and-hold before a finger drags a booking, so that a swipe still scrolls the timeline. */
const LONG_PRESS_MS = 250;
/** With live updates on, the feedstock marks are still refetched this often (expiry and the date move them). */
const SHORTFALLS_FALLBACK_MS = 10 * 60_000;
const PHONE_QUERY = "(max-width: 767px)";
const LANE_GROUPS = [
  ["printer", "Printers"],
  ["wash_station", "Wash stations"],
  ["furnace", "Furnaces"],
] as const;
type LaneGroup = (typeof LANE_GROUPS)[number][0];

/** Below the md breakpoint the floor shows one day and one group of lanes at a time. */
function usePhone(): boolean {
  return useSyncExternalStore(
    (cb) => {
      const m = window.matchMedia(PHONE_QUERY);
      m.addEventListener("change", cb);
      return () => m.removeEventListener("change", cb);
    },
    () => window.matchMedia(PHONE_QUERY).matches,
    () => false,
  );
}
const CALENDAR_STYLE = {
  "--fc-border-color": "#e9e6e1", "--fc-today-bg-color": "rgba(242,106,18,0.06)", "--fc-now-indicator-color": "#d0520a", "--fc-neutral-bg-color": "#f6f5f3",
  "--fc-button-bg-color": "#403a33", "--fc-button-border-color": "#403a33", "--fc-button-hover-bg-color": "#2b2723", "--fc-button-hover-border-color": "#2b2723",
  "--fc-button-active-bg-color": "#a84f2a", "--fc-button-active-border-color": "#a84f2a", "--fc-bg-event-opacity": "0.35",
} as React.CSSProperties;

/** A DOM element with classes, text and data attributes (textContent, so nothing is parsed as HTML). */
function el(tag: string, className: string, text?: string | null, data: Record<string, string> = {}): HTMLElement {
  const node = document.createElement(tag);
  node.className = className;
  if (text) node.textContent = text;
  for (const [k, v] of Object.entries(data)) node.dataset[k] = v;
  return node;
}

/**
 * A finished booking is history: nothing can move it. It is drawn as a block in its lane's
 * background, which FullCalendar neither measures nor stacks (on a busy week about half the
 * bookings, and a tenth of the first render), and a click on it opens the build (onDateClick).
 */
const isHistory = (e: Pick<FloorEvent, "state" | "failed">) => e.state === "complete" && !e.failed;

function toEvent(e: FloorEvent, lanes: LanePermissions, short: ReadonlyMap<string, string> = new Map()): EventInput {
  const lane = e.kind !== "build";
  const c = e.failed ? COLORS.failed : e.kind === "build" ? (COLORS[e.state] ?? COLORS.scheduled) : COLORS[e.kind];
  const history = isHistory(e);
  return {
    id: e.id,
    resourceId: e.resource_id,
    title: e.title,
    start: e.start,
    end: e.end,
    editable: lane ? e.editable && laneEditable(e, lanes) : e.editable,
    ...(lane ? { resourceEditable: e.editable && laneEditable(e, lanes) } : {}),
    durationEditable: false,
    ...(history ? { display: "background" } : {}),
    backgroundColor: c.bg,
    borderColor: c.border,
    textColor: c.text,
    classNames: [`hearth-${e.kind}`, `hearth-state-${e.state}`, ...(history ? ["hearth-history"] : []), ...(short.has(e.id) ? ["hearth-feedstock-short"] : [])],
    extendedProps: { ...e, build_id: e.kind === "build" ? e.id : undefined, feedstock_short: short.get(e.id) },
  };
}

export function FloorBoard({ timeZone, canSchedule, canPropose, canApply, canWash = false, canFurnace = false }: FloorBoardProps) {
  const qc = useQueryClient();
  const router = useRouter();
  const [range, setRange] = useState<FloorRange | null>(() => openingWeek(timeZone));
  const [scrollTime] = useState(() => openingScrollTime(timeZone));
  const [message, setMessage] = useState<Message>(null);
  const [lastMove, setLastMove] = useState<LastMove | null>(null);
  const [proposal, setProposal] = useState<Proposal | null>(null);
  const [busy, setBusy] = useState(false);
  const dragging = useRef(false);
  const hintRef = useRef<HTMLDivElement>(null);
  const listRef = useRef<HTMLUListElement>(null);
  const calendarRef = useRef<FullCalendar>(null);

  const poll = useLivePoll();
  const floorKey = useMemo(() => ["floor", range?.from, range?.to] as const, [range]);
  const floor = useQuery({
    queryKey: floorKey,
    queryFn: async ({ signal }) => {
      const url = floorUrl(range!);
      const data = (await takeOpeningFetch<FloorData>(url)) ?? (await apiJson<FloorData>(url, { signal }));
      // A User Timing mark (devtools, the floor benchmark): when the calendar first had its data.
      if (!performance.getEntriesByName(FLOOR_DATA_MARK).length) performance.mark(FLOOR_DATA_MARK);
      return data;
    },
    enabled: range !== null,
    placeholderData: keepPreviousData,
    // Someone else's change arrives live (components/live); the old polling only while the
    // stream is down. Never while a drag is in the air.
    refetchInterval: () => (dragging.current ? false : poll(10_000)),
    meta: { liveHold: () => dragging.current },
  });
  const unscheduled = useQuery({
    queryKey: ["unscheduled"],
    queryFn: ({ signal }) => apiJson<{ builds: UnscheduledBuild[] }>("/api/floor/unscheduled", { signal }),
    refetchInterval: () => (dragging.current ? false : poll(15_000)),
    meta: { liveHold: () => dragging.current },
  });
  // Scheduled builds whose feedstock will not be on the shelf when they start (the projection).
  // A change to a build, a unit, a lot or a material refetches it live (components/live); the
  // minute's poll only while the stream is down, and a slow one always, because the calendar
  // alone moves the answer (a lot expires, a day passes) without any row changing.
  const shortfalls = useQuery({
    queryKey: ["feedstock-shortfalls"],
    queryFn: ({ signal }) => apiJson<{ builds: { build_id: string; material_code: string; first_short_day: string }[] }>("/api/inventory/shortfalls", { signal }),
    refetchInterval: () => poll(60_000) || SHORTFALLS_FALLBACK_MS,
  });
  const short = useMemo(
    () => new Map((shortfalls.data?.builds ?? []).map((b) => [b.build_id, `no ${b.material_code} feedstock from ${b.first_short_day}`])),
    [shortfalls.data],
  );
  const drafts = useMemo(() => unscheduled.data?.builds ?? [], [unscheduled.data]);
  const draftsRef = useRef(drafts);
  useEffect(() => {
    draftsRef.current = drafts;
  }, [drafts]);

  const resources = useMemo(() => floor.data?.resources ?? [], [floor.data]);
  const resourceById = useMemo(() => new Map(resources.map((r) => [r.id, r])), [resources]);
  // Same lanes, same array: a refetch that changes no lane must not make FullCalendar redraw them.
  const laneKey = resources.map((r) => `${r.id}:${r.title}:${r.material_ids?.join(",") ?? ""}`).join("|");
  const calendarResources = useMemo(
    () => resources.map((r) => ({ ...r, kindOrder: r.kind === "printer" ? 0 : r.kind === "wash_station" ? 1 : 2 })),
    // eslint-disable-next-line react-hooks/exhaustive-deps
    [laneKey],
  );
  const phone = usePhone();
  const calendarBox = useRef<HTMLDivElement>(null);
  useCalendarA11y(calendarBox);
  const [laneGroup, setLaneGroup] = useState<LaneGroup>("printer");
  const shownResources = useMemo(() => (phone ? calendarResources.filter((r) => r.kind === laneGroup) : calendarResources), [phone, laneGroup, calendarResources]);
  const printerName = useCallback((id: string | null) => (id ? (resourceById.get(id)?.title ?? "a printer") : "nothing"), [resourceById]);

  const events = useMemo<EventInput[]>(() => {
    const list: EventInput[] = (floor.data?.events ?? []).map((e) => toEvent(e, { wash: canWash, furnace: canFurnace }, short));
    for (const b of floor.data?.blocks ?? []) {
      list.push({ id: `mw-${b.id}`, resourceId: b.resource_id, start: b.start, end: b.end, display: "background", backgroundColor: "#8d8273", classNames: ["hearth-maintenance"], title: `Maintenance: ${b.reason || "no reason given"}` });
    }
    if (proposal) {
      for (const item of proposal.items) {
        list.push({ id: `plan-${item.build_id}`, resourceId: item.printer_id, start: item.starts_at, end: item.ends_at, editable: false, title: `${item.code} (proposed)`, backgroundColor: COLORS.proposed.bg, borderColor: COLORS.proposed.border, textColor: COLORS.proposed.text, classNames: ["hearth-proposed"] });
      }
    }
    return list;
  }, [floor.data, proposal, canWash, canFurnace, short]);

  const hint = useCallback((text: string | null) => {
    const el = hintRef.current;
    if (!el) return;
    el.textContent = text ?? "";
    el.dataset.active = text ? "true" : "false";
  }, []);

  /** Books, moves or unbooks one build; the floor and the list refetch afterwards either way. */
  const move = useCallback(
    async (b: { build_id: string; code: string; version: number }, to: Slot, before: Slot | null, opts: { undo?: boolean } = {}): Promise<boolean> => {
      setBusy(true);
      try {
        const res = await apiJson<ScheduleResponse>(`/api/builds/${b.build_id}/schedule`, {
          method: "PATCH",
          body: to.printer_id ? { version: b.version, printer_id: to.printer_id, starts_at: to.starts_at } : { version: b.version, printer_id: null },
        });
        const nb = res.build;
        qc.setQueryData<FloorData>(floorKey, (old) => {
          if (!old) return old;
          const rest = old.events.filter((e) => e.id !== nb.id);
          if (!nb.printer_id || !nb.starts_at || !nb.ends_at) return { ...old, events: rest };
          const prev = old.events.find((e) => e.id === nb.id);
          const draft = draftsRef.current.find((d) => d.id === nb.id);
          return {
            ...old,
            events: [
              ...rest,
              {
                id: nb.id, kind: "build", resource_id: nb.printer_id, title: prev?.title ?? `${nb.code} · ${draft?.material_code ?? ""}`,
                start: new Date(nb.starts_at).toISOString(), end: new Date(nb.ends_at).toISOString(), state: nb.state, version: nb.version, editable: true,
                material_code: prev?.material_code ?? draft?.material_code, material_id: prev?.material_id ?? draft?.material_id,
              },
            ],
          };
        });
        if (!opts.undo && before) setLastMove({ build_id: nb.id, code: nb.code, version: nb.version, before, after: to });
        else setLastMove(null);
        setMessage({
          tone: "success",
          text: nb.printer_id
            ? `${opts.undo ? "Undone: " : ""}${nb.code} is booked on ${printerName(nb.printer_id)}, ${formatSlot(nb.starts_at!, nb.ends_at!, timeZone)}.`
            : `${opts.undo ? "Undone: " : ""}${nb.code} is off the floor and waits in the unscheduled list.`,
        });
        return true;
      } catch (err) {
        const e = err instanceof ApiError ? err : new ApiError(0, String(err));
        const why = e.status === 409 ? "Refused (conflict)" : e.status === 422 ? "Refused" : "Not saved";
        setMessage({ tone: "danger", text: `${why}: ${e.message}` });
        return false;
      } finally {
        setBusy(false);
        await Promise.all([qc.invalidateQueries({ queryKey: ["floor"] }), qc.invalidateQueries({ queryKey: ["unscheduled"] })]);
      }
    },
    [qc, floorKey, printerName, timeZone],
  );

  // The unscheduled list becomes a source of drags onto the timeline.
  useEffect(() => {
    if (!canSchedule || !listRef.current) return;
    const d = new Draggable(listRef.current, {
      itemSelector: "[data-build-id]",
      longPressDelay: LONG_PRESS_MS,
      eventData: (el) => {
        const b = draftsRef.current.find((x) => x.id === (el as HTMLElement).dataset.buildId);
        const ok = (b?.printers ?? []).filter((p) => p.ok && p.est_minutes);
        const minutes = ok.length ? Math.min(...ok.map((p) => p.est_minutes!)) : 60;
        return {
          title: b ? `${b.code} · ${b.material_code}` : "build",
          duration: { minutes },
          create: true,
          extendedProps: { build_id: b?.id, code: b?.code, version: b?.version, material_id: b?.material_id, printers: b?.printers, external: true },
        };
      },
    });
    return () => d.destroy();
  }, [canSchedule]);

  const eventAllow = useCallback(
    (span: DateSpanApi, moving: EventApi | null) => {
      const resource = (span as DateSpanApi & { resource?: { id: string; title: string; extendedProps: Record<string, unknown> } }).resource;
      if (!moving || !resource) return false;
      const r = resource.extendedProps as unknown as FloorResource;
      const code = (moving.extendedProps.code as string | undefined) ?? moving.title.split(" ")[0];
      if (moving.extendedProps.kind === "wash_batch" || moving.extendedProps.kind === "furnace_run") {
        const why = laneMoveRefusal(moving.extendedProps as LaneEventProps, { ...r, title: resource.title });
        hint(why ?? `Drop ${code} on ${resource.title}…`);
        return !why;
      }
      if (r.kind !== "printer") {
        hint(`${resource.title} is a ${r.kind === "furnace" ? "furnace" : "wash station"} lane: builds go on printers.`);
        return false;
      }
      const buildId = moving.extendedProps.build_id as string | undefined;
      const verdicts =
        (moving.extendedProps.printers as UnscheduledBuild["printers"] | undefined) ??
        qc.getQueryData<BuildVerdicts>(["build", buildId])?.verdicts;
      const v = verdicts?.find((x) => x.printer_id === resource.id);
      if (v && !v.ok) {
        hint(`${resource.title} cannot take ${code}: ${v.reason}.`);
        return false;
      }
      const materialId = moving.extendedProps.material_id as string | undefined;
      if (!v && materialId && r.material_ids && !r.material_ids.includes(materialId)) {
        hint(`${resource.title} cannot take ${code}: it is not set up for this material.`);
        return false;
      }
      hint(`Drop ${code} on ${resource.title}…`);
      return true;
    },
    [hint, qc],
  );

  const onEventDrop = useCallback(
    async (info: EventDropArg) => {
      dragging.current = false;
      hint(null);
      const e = info.event;
      const props = e.extendedProps as FloorEvent;
      const oldResource = info.oldEvent.getResources()[0]?.id ?? props.resource_id;
      const newResource = info.newResource?.id ?? oldResource;
      if (props.kind !== "build") {
        const r = await moveLaneBooking(props, newResource, e.start!.toISOString(), e.end?.toISOString(), timeZone);
        setMessage({ tone: r.ok ? "success" : "danger", text: r.text });
        if (!r.ok) info.revert();
        await qc.invalidateQueries({ queryKey: ["floor"] });
        return;
      }
      const ok = await move(
        { build_id: e.id, code: props.title.split(" ")[0], version: props.version },
        { printer_id: newResource, starts_at: e.start!.toISOString() },
        { printer_id: oldResource, starts_at: info.oldEvent.start!.toISOString() },
      );
      if (!ok) info.revert();
    },
    [hint, move, qc, timeZone],
  );

  const onEventReceive = useCallback(
    async (info: EventReceiveArg) => {
      dragging.current = false;
      hint(null);
      const e = info.event;
      const p = e.extendedProps as { build_id: string; code: string; version: number };
      const resource = e.getResources()[0];
      const ok = await move({ build_id: p.build_id, code: p.code, version: p.version }, { printer_id: resource?.id ?? null, starts_at: e.start!.toISOString() }, { printer_id: null, starts_at: null });
      // The real booking arrives with the refetch; the dragged copy only stood in for it.
      if (ok) e.remove();
      else info.revert();
    },
    [hint, move],
  );

  const undo = useCallback(async () => {
    if (!lastMove) return;
    await move({ build_id: lastMove.build_id, code: lastMove.code, version: lastMove.version }, lastMove.before, null, { undo: true });
  }, [lastMove, move]);

  // Plain DOM, not React: FullCalendar's React adapter re-renders every portal whenever one
  // event's content mounts, which made a week of 500 bookings take seconds to appear. And one
  // element per booking: the state and unit count are drawn from a data attribute by CSS
  // (.hearth-booking in app/globals.css), which cut the week's first render by about a tenth.
  const renderEvent = useCallback((arg: EventContentArg) => {
    const p = arg.event.extendedProps as Partial<FloorEvent>;
    if (arg.event.display === "background" && !p.kind) {
      return { domNodes: [el("div", "truncate px-1 pt-0.5 text-2xs italic text-soot-800", arg.event.title, { testid: "maintenance-block" })] };
    }
    const state = p.failed ? "failed" : p.state && p.kind ? (STATE_WORDS[p.kind][p.state] ?? p.state) : arg.event.classNames.includes("hearth-proposed") ? "proposed" : "";
    const feedstock = (p as { feedstock_short?: string }).feedstock_short;
    const detail = [state, p.unit_count ? `${p.unit_count} u` : "", feedstock ? "no feedstock" : ""].filter(Boolean).join(" · ");
    const box = el("div", "hearth-booking", arg.event.title, { testid: "floor-event", eventId: arg.event.id, detail });
    // The bar is often narrower than its words: the whole line on hover.
    box.title = detail ? `${arg.event.title} (${[state, p.unit_count ? `${p.unit_count} u` : "", feedstock].filter(Boolean).join(" · ")})` : arg.event.title;
    return { domNodes: [box] };
  }, []);

  const renderResourceLabel = useCallback(
    (arg: { resource: { title: string; extendedProps: Record<string, unknown> } }) => {
      const r = arg.resource.extendedProps as unknown as FloorResource;
      const box = el("div", "leading-tight");
      box.append(el("div", "font-semibold text-soot-800", arg.resource.title));
      box.append(el("div", "text-2xs text-soot-500", r.kind === "printer" ? `${r.build_x_mm} × ${r.build_y_mm} × ${r.build_z_mm} mm` : (r.kind === "furnace" ? canFurnace : canWash) ? "drag booked ones" : "read-only here"));
      return { domNodes: [box] };
    },
    [canWash, canFurnace],
  );
  const onDragStart = useCallback(() => {
    dragging.current = true;
  }, []);
  const onDragStop = useCallback(() => {
    dragging.current = false;
    hint(null);
  }, [hint]);
  const onMouseEnter = useCallback(
    (arg: { event: EventApi }) => {
      const id = arg.event.extendedProps.build_id as string | undefined;
      if (id && arg.event.startEditable) {
        void qc.prefetchQuery({ queryKey: ["build", id], queryFn: () => apiJson<BuildVerdicts>(`/api/builds/${id}`), staleTime: 30_000 });
      }
    },
    [qc],
  );
  const onEventClick = useCallback(
    (arg: { event: EventApi }) => {
      const id = arg.event.extendedProps.build_id as string | undefined;
      if (id) router.push(`/builds/${id}`);
    },
    [router],
  );

  // A click on a finished build's block (a background event, which takes no clicks of its own),
  // found among the calendar's own events so that the handler's identity never changes.
  const onDateClick = useCallback(
    (arg: DateClickArg) => {
      const laneId = (arg as DateClickArg & { resource?: { id: string } }).resource?.id;
      const hit = calendarRef.current
        ?.getApi()
        .getEvents()
        .find((ev) => ev.classNames.includes("hearth-history") && ev.extendedProps.kind === "build" && ev.getResources()[0]?.id === laneId && ev.start! <= arg.date && arg.date < ev.end!);
      if (hit) router.push(`/builds/${hit.id}`);
    },
    [router],
  );

  const onDatesSet = useCallback((arg: DatesSetArg) => {
    setRange((r) => {
      const next = { from: arg.start.toISOString(), to: arg.end.toISOString() };
      return r && r.from === next.from && r.to === next.to ? r : next;
    });
  }, []);

  const scheduledInWindow = useMemo(() => (floor.data?.events ?? []).filter((e) => e.kind === "build" && e.editable), [floor.data]);
  const printers = useMemo(() => resources.filter((r) => r.kind === "printer"), [resources]);
  const ready = floor.isSuccess && !floor.isPlaceholderData;

  return (
    <div className="flex flex-col gap-4 px-3 py-4 md:px-6 md:py-5 xl:flex-row" data-testid="floor-board" data-ready={ready ? "true" : "false"} data-event-count={floor.data?.events.length ?? 0}>
      <section className="min-w-0 flex-1 rounded-card border border-soot-200 bg-white p-2 shadow-card md:p-3" aria-label="Floor timeline">
        {phone ? (
          <div role="group" aria-label="Lanes shown" className="mb-2 flex gap-1" data-testid="lane-groups">
            {LANE_GROUPS.map(([key, label]) => (
              <button key={key} type="button" aria-pressed={laneGroup === key} onClick={() => setLaneGroup(key)}
                className={`flex-1 rounded-md border px-2 py-1.5 text-sm font-semibold ${laneGroup === key ? "border-soot-900 bg-soot-900 text-soot-50" : "border-soot-200 bg-white text-soot-700"}`}>
                {label}
              </button>
            ))}
          </div>
        ) : null}
        <div
          ref={calendarBox}
          className="hearth-floor"
          style={CALENDAR_STYLE}
        >
          {/* The calendar mounts with its first window's lanes and bookings: mounting it empty and
              then filling it would lay the whole timeline out twice. */}
          {floor.data ? (
          <FullCalendar
            ref={calendarRef}
            plugins={PLUGINS}
            schedulerLicenseKey="GPL-My-Project-Is-Open-Source"
            initialView={phone ? "resourceTimelineDay" : "resourceTimelineWeek"}
            timeZone={timeZone}
            height="auto"
            nowIndicator
            scrollTime={phone ? scrollTime : "00:00:00"}
            headerToolbar={HEADER}
            buttonText={BUTTONS}
            buttonIcons={false}
            views={phone ? PHONE_VIEWS : VIEWS}
            resourceAreaWidth={phone ? "92px" : "150px"}
            longPressDelay={LONG_PRESS_MS}
            eventLongPressDelay={LONG_PRESS_MS}
            slotMinWidth={phone ? 44 : 22}
            resourceAreaHeaderContent="Lane"
            resourceGroupField="group"
            resourceOrder="kindOrder,title"
            resources={shownResources}
            resourceLabelContent={renderResourceLabel}
            events={events}
            eventContent={renderEvent}
            editable={canSchedule}
            eventDurationEditable={false}
            eventResourceEditable={canSchedule}
            droppable={canSchedule}
            snapDuration={SNAP}
            eventAllow={eventAllow}
            eventDragStart={onDragStart}
            eventDragStop={onDragStop}
            eventMouseEnter={onMouseEnter}
            eventDrop={onEventDrop}
            eventReceive={onEventReceive}
            eventClick={onEventClick}
            dateClick={onDateClick}
            datesSet={onDatesSet}
          />
          ) : floor.isError ? null : (
            <div className="flex h-64 items-center justify-center text-sm text-soot-500" data-testid="floor-loading">
              Loading the floor…
            </div>
          )}
        </div>
        <div ref={hintRef} aria-live="polite" data-testid="drag-hint" className="mt-2 min-h-5 text-sm text-soot-600 data-[active=true]:font-medium data-[active=true]:text-clay-700" />
        <Legend />
        {floor.isError ? <p role="alert" className="mt-2 text-sm text-oxide-700">The floor could not be loaded: {(floor.error as Error).message}</p> : null}
      </section>

      <aside className="flex w-full shrink-0 flex-col gap-4 xl:w-80" aria-label="Scheduling">
        <LiveIndicator className="self-start" />
        {message ? (
          <div role={message.tone === "danger" ? "alert" : "status"} data-testid="floor-message" data-tone={message.tone}
            className={`rounded-card border px-3 py-2 text-sm ${message.tone === "danger" ? "border-oxide-500/40 bg-oxide-100 text-oxide-700" : message.tone === "success" ? "border-verdigris-400/40 bg-verdigris-100 text-verdigris-700" : "border-slate2-400/40 bg-slate2-100 text-slate2-600"}`}>
            {message.text}
          </div>
        ) : null}
        {canSchedule && lastMove ? (
          <button type="button" onClick={undo} disabled={busy} className="rounded-md border border-soot-300 bg-white px-3 py-2 text-sm font-semibold text-soot-800 hover:bg-soot-100 disabled:opacity-60">
            Undo last move ({lastMove.code})
          </button>
        ) : null}

        <section className="rounded-card border border-soot-200 bg-white p-3 shadow-card" aria-labelledby="unscheduled-heading">
          <h2 id="unscheduled-heading" className="font-display text-base font-semibold text-soot-900">Unscheduled builds</h2>
          <p className="mb-2 text-xs text-soot-500">{canSchedule ? "Drag one onto a printer lane, or use the form below." : "Your role can look but not book."}</p>
          {unscheduled.isLoading ? <p className="text-sm text-soot-500">Loading…</p> : null}
          {!unscheduled.isLoading && drafts.length === 0 ? <p className="text-sm text-soot-500">Every build is on the floor.</p> : null}
          <ul ref={listRef} className="flex max-h-96 flex-col gap-1.5 overflow-y-auto" data-testid="unscheduled-list">
            {drafts.map((b) => {
              const ok = b.printers.filter((p) => p.ok);
              return (
                <li key={b.id} data-build-id={b.id} data-testid={`unscheduled-${b.code}`}
                  className={`rounded-md border border-clay-300 bg-clay-50 px-2.5 py-1.5 text-sm ${canSchedule && ok.length ? "cursor-grab" : ""}`}
                  title={ok.length ? "Drag onto a printer" : "No printer can take this build"}>
                  <div className="flex items-center justify-between gap-2">
                    <Link href={`/builds/${b.id}`} className="tap-target inline-flex items-center font-semibold text-clay-800 hover:underline">{b.code}</Link>
                    <span className="text-xs text-soot-600">{b.material_code} · {b.unit_count} unit{b.unit_count === 1 ? "" : "s"}</span>
                  </div>
                  <div className="text-2xs text-soot-500">
                    {b.due_at ? `due ${formatDay(b.due_at, timeZone)}` : "no due date"} ·{" "}
                    {ok.length ? `${ok.length} printer${ok.length === 1 ? "" : "s"}, ${minutesLabel(Math.min(...ok.map((p) => p.est_minutes ?? Infinity)))} or more` : "no printer can take it"}
                  </div>
                </li>
              );
            })}
          </ul>
        </section>

        {canSchedule ? (
          <ScheduleForm
            drafts={drafts}
            scheduled={scheduledInWindow}
            printers={printers}
            timeZone={timeZone}
            busy={busy}
            onSubmit={(b, to, before) => move(b, to, before)}
          />
        ) : null}

        {canPropose ? (
          <PlanPanel
            proposal={proposal}
            setProposal={setProposal}
            timeZone={timeZone}
            canApply={canApply}
            onApplied={async (text) => {
              setMessage({ tone: "success", text });
              setLastMove(null);
              await Promise.all([qc.invalidateQueries({ queryKey: ["floor"] }), qc.invalidateQueries({ queryKey: ["unscheduled"] })]);
            }}
            onError={(text) => setMessage({ tone: "danger", text })}
          />
        ) : null}
      </aside>
    </div>
  );
}

function Legend() {
  const items: Array<[string, string]> = [
    ["booked", "scheduled"], ["printing", "running"], ["done", "complete"], ["failed", "failed"], ["wash batch", "wash_batch"], ["furnace run", "furnace_run"], ["proposed", "proposed"],
  ];
  return (
    <ul className="mt-2 flex flex-wrap gap-3 text-2xs text-soot-600" aria-label="Legend">
      {items.map(([label, key]) => (
        <li key={key} className="flex items-center gap-1">
          <span className="inline-block h-3 w-5 rounded-sm border" style={{ backgroundColor: COLORS[key].bg, borderColor: COLORS[key].border }} />
          {label}
        </li>
      ))}
      <li className="flex items-center gap-1">
        <span className="inline-block h-3 w-5 rounded-sm bg-soot-400/40" />
        maintenance (blocked)
      </li>
    </ul>
  );
}
