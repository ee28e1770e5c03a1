import { can, type Role } from "@/lib/auth/permissions";

// What a person at the machine should do next with the unit or build in their hand, by role. One
// primary action (a call to an existing route, or the page where the step is done when it needs a
// form or a checklist), a few secondary ones, and a line that says where the thing is.

export type StepAction =
  | { kind: "post"; label: string; url: string; body: Record<string, unknown>; done: string }
  | { kind: "link"; label: string; href: string };

export type NextStep = { where: string; primary: StepAction | null; secondary: StepAction[]; note?: string };

export type StepUnit = {
  id: string;
  serial: string;
  state: string;
  version: number;
  /** The newest inspection's verdict (null: none yet); a unit is finished only after a passed one (lib/finishing/transitions.ts). */
  latest_inspection_passed?: boolean | null;
};
export type StepBuild = { id: string; code: string; state: string; version?: number; printer_name: string | null };
export type StepRun = { id: string; code: string; state: string; furnace_name: string | null; unloaded_at: string | null };
export type StepWash = { id: string; code: string; state: string; station_name: string | null };

const words = (s: string) => s.replaceAll("_", " ");

function whereUnit(u: StepUnit, build: StepBuild | null, wash: StepWash | null, run: StepRun | null): string {
  switch (u.state) {
    case "planned":
      return build ? `Planned on build ${build.code}${build.printer_name ? ` (${build.printer_name})` : ""}` : "Planned, not in a build yet";
    case "printing":
      return `Printing in build ${build?.code ?? "?"}${build?.printer_name ? ` on ${build.printer_name}` : ""}`;
    case "green":
      return wash && ["draft", "scheduled"].includes(wash.state) ? `Green, in wash batch ${wash.code} (${wash.state})` : "Green, waiting for a wash";
    case "washing":
      return `In the solvent: wash batch ${wash?.code ?? "?"}${wash?.station_name ? ` at ${wash.station_name}` : ""}`;
    case "brown":
      return run && ["draft", "scheduled"].includes(run.state) ? `Brown, on furnace run ${run.code} (${run.state})` : "Brown, waiting for a furnace run";
    case "sintering":
      return `In the furnace: run ${run?.code ?? "?"}${run?.furnace_name ? ` in ${run.furnace_name}` : ""}`;
    default:
      return `${words(u.state).replace(/^./, (c) => c.toUpperCase())}${run ? ` (furnace run ${run.code})` : ""}`;
  }
}

export function unitNextStep(role: Role, u: StepUnit, build: StepBuild | null, wash: StepWash | null, run: StepRun | null): NextStep {
  const where = whereUnit(u, build, wash, run);
  const none = (note: string): NextStep => ({ where, primary: null, secondary: [], note });
  const finishingUrl = `/api/finishing/${u.id}`;

  if (role === "machinist" || (role === "admin" && ["ready_for_finishing", "finishing"].includes(u.state))) {
    if (!can(role, "finishing:write")) return none("Nothing for finishing yet.");
    if (u.state === "ready_for_finishing")
      return { where, primary: { kind: "post", label: "Accept into finishing", url: finishingUrl, body: { action: "accept", version: u.version }, done: `${u.serial} accepted: it is in finishing.` }, secondary: [{ kind: "link", label: "Open in finishing", href: `/finishing/${u.id}` }] };
    if (u.state === "finishing") {
      const inspect: StepAction = { kind: "link", label: "Record an inspection with a photo", href: `/finishing/${u.id}#inspect` };
      // Finishing is refused until an inspection has passed: offering it first would only earn a refusal.
      if (u.latest_inspection_passed)
        return { where, primary: { kind: "post", label: "Finish", url: finishingUrl, body: { action: "finish", version: u.version }, done: `${u.serial} finished.` }, secondary: [{ ...inspect, label: "Record another inspection" }] };
      if (u.latest_inspection_passed === false)
        return { where, primary: { kind: "link", label: "Scrap, hold or inspect again", href: `/finishing/${u.id}` }, secondary: [inspect], note: "The last inspection failed." };
      return { where, primary: inspect, secondary: [], note: "It can be marked finished once an inspection has passed." };
    }
    return none(["sintering", "sintered"].includes(u.state) ? "On its way to finishing: it arrives after the furnace is unloaded." : "Not at finishing yet.");
  }

  if (role === "furnace_operator" || (role === "admin" && ["brown", "sintering", "sintered"].includes(u.state))) {
    if (u.state === "brown" && run && ["draft", "scheduled"].includes(run.state))
      return {
        where,
        primary: { kind: "link", label: `Load run ${run.code} by scanning`, href: `/scan?run=${run.id}` },
        secondary: [{ kind: "link", label: `Start run ${run.code} (checklist)`, href: `/furnace-runs/${run.id}#start` }],
      };
    if (u.state === "brown") return { where, primary: { kind: "link", label: "Put it on a furnace run", href: "/batches" }, secondary: [] };
    if (u.state === "sintering" && run) return { where, primary: { kind: "link", label: `Open run ${run.code}`, href: `/furnace-runs/${run.id}` }, secondary: [], note: "The run is in the furnace; unload it when the cycle has ended." };
    if (u.state === "sintered" && run && !run.unloaded_at)
      return { where, primary: { kind: "link", label: `Unload run ${run.code} with outcomes`, href: `/furnace-runs/${run.id}#unload` }, secondary: [] };
    if (["green", "washing"].includes(u.state) && can(role, "wash:write")) return { where, primary: { kind: "link", label: "Open the wash board", href: "/batches" }, secondary: [] };
    return none("Nothing for the furnace.");
  }

  if (role === "technician" || role === "admin") {
    if (build && ["draft", "scheduled", "running"].includes(build.state))
      return { where, primary: { kind: "link", label: build.state === "draft" ? `Book build ${build.code} on the floor` : build.state === "scheduled" ? `Start build ${build.code}` : `Complete build ${build.code}`, href: build.state === "draft" ? "/floor" : `/builds/${build.id}` }, secondary: [] };
    if (u.state === "green") return { where, primary: { kind: "link", label: "Put it in a wash batch", href: "/batches" }, secondary: [] };
    if (u.state === "washing" && wash) return { where, primary: { kind: "link", label: `Weigh and finish wash ${wash.code}`, href: `/batches/wash/${wash.id}` }, secondary: [] };
    return none("Nothing at the printers or the wash.");
  }
  return none("Shown for reading.");
}

export function buildNextStep(role: Role, b: StepBuild & { version: number }, units: { state: string }[]): NextStep {
  const where = b.state === "running" ? `Printing${b.printer_name ? ` on ${b.printer_name}` : ""}` : b.state === "scheduled" ? `Booked on ${b.printer_name ?? "a printer"}` : b.state === "draft" ? "Not on the floor yet" : words(b.state).replace(/^./, (c) => c.toUpperCase());
  const action = `/api/builds/${b.id}/actions`;
  if (can(role, "builds:write")) {
    if (b.state === "scheduled") return { where, primary: { kind: "post", label: "Start build", url: action, body: { action: "start", version: b.version }, done: `${b.code} started: its units are printing.` }, secondary: [] };
    if (b.state === "running") return { where, primary: { kind: "post", label: "Complete build", url: action, body: { action: "complete", version: b.version }, done: `${b.code} complete: its units are green.` }, secondary: [] };
    if (b.state === "draft") return { where, primary: { kind: "link", label: "Book it on the floor", href: "/floor" }, secondary: [] };
  }
  if (can(role, "wash:write") && units.some((u) => u.state === "green")) return { where, primary: { kind: "link", label: "Put its green units in a wash batch", href: "/batches" }, secondary: [] };
  if (can(role, "furnace:write") && units.some((u) => u.state === "brown")) return { where, primary: { kind: "link", label: "Put its brown units on a furnace run", href: "/batches" }, secondary: [{ kind: "link", label: "Scan units into a run", href: "/scan" }] };
  return { where, primary: null, secondary: [], note: "Open a unit below for its next step." };
}
