import { AppError } from "@/lib/errors";
import type { FinishingAction } from "./schemas";

// The finishing end of a unit's life. A machinist may only take a unit that is ready for
// finishing, finish it once an inspection has passed, scrap it as out of tolerance on a failed
// inspection, or put it on hold (and back) with a reason. Everything earlier in the chain
// belongs to the builds, washes and furnace runs.

export type UnitState =
  | "planned" | "printing" | "green" | "washing" | "brown" | "sintering" | "sintered"
  | "ready_for_finishing" | "finishing" | "done" | "on_hold" | "scrapped";

export type FinishingUnit = { state: UnitState; held_from: UnitState | null };
export type LatestInspection = { id: string; passed: boolean; reason: string | null } | null | undefined;

export type FinishingChange = {
  from: UnitState;
  to: UnitState;
  held_from: UnitState | null;
  hold_reason: string | null;
  scrap_reason: "out_of_tolerance" | null;
  scrap_note: string | null;
  /** What goes into the event row. */
  reason: string;
};

const HOLDABLE: UnitState[] = ["ready_for_finishing", "finishing"];

export const ACTION_LABELS: Record<FinishingAction, string> = {
  accept: "Accept into finishing",
  finish: "Mark finished",
  scrap: "Scrap: out of tolerance",
  hold: "Put on hold",
  release: "Release from hold",
};

function refuse(message: string): never {
  throw new AppError("invalid", message, { action: [message] });
}

/** The change an action makes, or a 422 saying why it cannot be made from here. */
export function planFinishingChange(
  unit: FinishingUnit,
  action: FinishingAction,
  latest: LatestInspection,
  reason?: string,
): FinishingChange {
  const base = { from: unit.state, held_from: null, hold_reason: null, scrap_reason: null, scrap_note: null } as const;
  const state = unit.state.replaceAll("_", " ");
  switch (action) {
    case "accept":
      if (unit.state !== "ready_for_finishing") refuse(`Only a unit that is ready for finishing can be accepted; this one is ${state}.`);
      return { ...base, to: "finishing", reason: reason || "accepted into finishing" };
    case "finish":
      if (unit.state !== "finishing") refuse(`Only a unit in finishing can be marked finished; this one is ${state}.`);
      if (!latest) refuse("Record an inspection before marking the unit finished.");
      if (!latest.passed) refuse("The latest inspection failed: scrap the unit, put it on hold, or record a passing inspection.");
      return { ...base, to: "done", reason: reason || "finished; inspection passed" };
    case "scrap":
      if (!HOLDABLE.includes(unit.state)) refuse(`Only a unit in finishing can be scrapped here; this one is ${state}.`);
      if (!latest || latest.passed) refuse("Scrapping as out of tolerance needs a failed inspection on record.");
      return {
        ...base,
        to: "scrapped",
        scrap_reason: "out_of_tolerance",
        scrap_note: latest.reason ?? "failed inspection",
        reason: reason || `out of tolerance: ${latest.reason ?? "failed inspection"}`,
      };
    case "hold":
      if (!HOLDABLE.includes(unit.state)) refuse(`Only a unit that is ready for finishing or in finishing can be held here; this one is ${state}.`);
      if (!reason) refuse("Say why the unit is put on hold.");
      return { ...base, to: "on_hold", held_from: unit.state, hold_reason: reason, reason };
    case "release":
      if (unit.state !== "on_hold" || !unit.held_from || !HOLDABLE.includes(unit.held_from)) {
        refuse("Only a unit held from finishing can be released here.");
      }
      return { ...base, to: unit.held_from, reason: reason || "released from hold" };
  }
}

/** Actions that make sense for a unit now, for the buttons (the server checks again). */
export function availableActions(unit: FinishingUnit, latest: LatestInspection): FinishingAction[] {
  const out: FinishingAction[] = [];
  if (unit.state === "ready_for_finishing") out.push("accept");
  if (unit.state === "finishing" && latest?.passed) out.push("finish");
  if (HOLDABLE.includes(unit.state) && latest && !latest.passed) out.push("scrap");
  if (HOLDABLE.includes(unit.state)) out.push("hold");
  if (unit.state === "on_hold" && unit.held_from && HOLDABLE.includes(unit.held_from)) out.push("release");
  return out;
}

/** States in which a machinist records inspections. */
export const INSPECTABLE: UnitState[] = ["ready_for_finishing", "finishing"];
