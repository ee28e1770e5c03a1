"use client";

import { useDraggable } from "@dnd-kit/core";
import type { BoardUnit } from "@/lib/batches/types";
import { formatLength } from "@/lib/units";
import { massText, shopTime, slackWords } from "./format";

export type DragSource = { kind: "waiting" } | { kind: "run" | "wash"; id: string };
export type DragData = { unit: BoardUnit; from: DragSource; lane: "wash" | "furnace" };

const STATUS = {
  late: "border-oxide-500/50 bg-oxide-100 text-oxide-700",
  at_risk: "border-brass-400/60 bg-brass-100 text-brass-600",
  on_time: "border-verdigris-400/40 bg-verdigris-100 text-verdigris-700",
} as const;

const STATUS_WORD = { late: "Late", at_risk: "At risk", on_time: "On time" } as const;

export type UnitCardProps = {
  unit: BoardUnit;
  from: DragSource;
  lane: "wash" | "furnace";
  timeZone: string;
  unitPref: "mm" | "in";
  profileLabel?: string;
  disabled?: boolean;
  compact?: boolean;
  onRemove?: () => void;
  /** The batches or runs it could go to: a "Move to…" menu beside the card, the way without a drag on a touch screen. */
  moveTargets?: { id: string; label: string }[];
  onMove?: (targetId: string) => void;
};

export function UnitCardBody({ unit, timeZone, unitPref, profileLabel, compact }: Omit<UnitCardProps, "from" | "lane">) {
  const size = `${formatLength(unit.green_x_mm, unitPref, 1).replace(/ (mm|in)$/, "")}×${formatLength(unit.green_y_mm, unitPref, 1).replace(/ (mm|in)$/, "")}×${formatLength(unit.green_z_mm, unitPref, 1)}`;
  if (compact) {
    return (
      <span className="flex items-center gap-1.5">
        <span className="font-mono text-2xs font-semibold text-soot-800">{unit.serial}</span>
        <span className={`rounded px-1 text-2xs ${STATUS[unit.projection_status]}`}>{STATUS_WORD[unit.projection_status]}</span>
      </span>
    );
  }
  return (
    <>
      <div className="flex items-center justify-between gap-2">
        <span className="font-mono text-xs font-semibold text-soot-900">{unit.serial}</span>
        <span className={`shrink-0 rounded border px-1.5 text-2xs font-semibold ${STATUS[unit.projection_status]}`} title={`Projected ${slackWords(unit.slack_minutes)}`}>
          {STATUS_WORD[unit.projection_status]} · {slackWords(unit.slack_minutes)}
        </span>
      </div>
      <div className="mt-0.5 truncate text-xs text-soot-700">
        {unit.part_name} · {unit.order_code}
      </div>
      <div className="mt-0.5 flex flex-wrap gap-x-2 text-2xs text-soot-500">
        <span>{unit.material_code}</span>
        {profileLabel ? <span>{profileLabel}</span> : null}
        <span className="tabular">{size}</span>
        <span className="tabular" title={unit.mass_source === "estimate" ? "estimated from the part's volume" : `weighed ${unit.mass_source}`}>
          {unit.mass_source === "estimate" ? "≈" : ""}
          {massText(unit.mass_g, unitPref)}
        </span>
        <span>due {shopTime(unit.due_at, timeZone)}</span>
      </div>
      {unit.state === "washing" ? (
        <div className="mt-0.5 text-2xs text-slate2-600">Washing · brown about {shopTime(unit.ready_at, timeZone)}</div>
      ) : null}
    </>
  );
}

/**
 * A unit that can be picked up and dropped on a wash batch or a furnace run. Its accessible name
 * is its visible text (WCAG 2.5.3); how to move it comes from the board's drag instructions
 * (aria-describedby). The take-out button sits beside the card, not inside it, so that no
 * button is nested in another.
 */
export function UnitCard(props: UnitCardProps) {
  const { unit, from, lane, disabled, onRemove, compact, moveTargets, onMove } = props;
  const id = `${lane}:${from.kind === "waiting" ? "waiting" : from.id}:${unit.id}`;
  const { attributes, listeners, setNodeRef, isDragging } = useDraggable({ id, data: { unit, from, lane } satisfies DragData, disabled });
  const card = (
    <div
      ref={setNodeRef}
      {...attributes}
      {...listeners}
      data-testid="unit-card"
      data-unit-id={unit.id}
      data-serial={unit.serial}
      className={`relative touch-manipulation select-none rounded-md border bg-white shadow-card outline-none ${compact ? "inline-flex items-center gap-1 px-1.5 py-0.5" : "block px-2.5 py-1.5"} ${
        isDragging ? "opacity-40" : ""
      } ${disabled ? "cursor-default border-soot-200" : "cursor-grab border-soot-200 hover:border-clay-400 focus-visible:border-ember-500"}`}
    >
      <UnitCardBody {...props} />
    </div>
  );
  if (moveTargets?.length && onMove && !disabled) {
    return (
      <div className="flex items-stretch gap-1">
        <div className="min-w-0 flex-1">{card}</div>
        <select
          aria-label={`Move ${unit.serial} to…`}
          value=""
          onChange={(e) => e.target.value && onMove(e.target.value)}
          className="hidden w-24 shrink-0 rounded-md border border-soot-300 bg-white px-1 text-xs text-soot-800 pointer-coarse:block"
          data-testid="move-to"
        >
          <option value="">Move to…</option>
          {moveTargets.map((t) => (
            <option key={t.id} value={t.id}>
              {t.label}
            </option>
          ))}
        </select>
      </div>
    );
  }
  if (!onRemove || disabled) return card;
  return (
    <span className="inline-flex items-center gap-0.5">
      {card}
      <button
        type="button"
        onClick={onRemove}
        className="tap-target rounded px-1 text-xs leading-none text-soot-600 hover:bg-soot-100 hover:text-oxide-700"
        aria-label={`Take ${unit.serial} out`}
        title="Take out"
      >
        ×
      </button>
    </span>
  );
}
