import { formatDuration, formatLength, formatRa, type UnitSystem } from "@/lib/units";
import type { NotificationKind } from "./kinds";

// The worker's e-mails, each as plain text and HTML with the same content. Pure: data in,
// message out. Times are shown in the shop's time zone, lengths in the reader's units.

export type MailContent = { subject: string; text: string; html: string };
export type MailRecipient = { name: string; email: string; unit_pref: UnitSystem };
export type MailContext = { shop_name: string; time_zone: string; app_url: string };

export type UnitLine = {
  serial: string;
  part_number: string;
  revision: string;
  part_name: string;
  order_code: string;
  state: string;
  /** Why it is held or scrapped, when it is. */
  note?: string | null;
};

export type BuildMailData = {
  id: string;
  code: string;
  printer: string | null;
  material: string;
  material_lot: string;
  starts_at: Date | null;
  ends_at: Date | null;
  failed: boolean;
  failure_reason: string | null;
  units: UnitLine[];
};

export type WashMailData = {
  id: string;
  code: string;
  station: string | null;
  ends_at: Date | null;
  dried_at: Date | null;
  units: UnitLine[];
};

export type FurnaceRunMailData = {
  id: string;
  code: string;
  furnace: string | null;
  profile_code: string;
  profile_name: string;
  atmosphere: string;
  starts_at: Date | null;
  ends_at: Date | null;
  cycle_minutes: number | null;
  units: UnitLine[];
};

export type FaceStockMm = { x_neg: number; x_pos: number; y_neg: number; y_pos: number; z_neg: number; z_pos: number };

export type ReadyPart = {
  part_number: string;
  revision: string;
  name: string;
  order_code: string;
  due_at: Date | null;
  serials: string[];
  stock: FaceStockMm;
  finishing_notes: string;
  target_ra_um: number | null;
  tolerance_um: number | null;
  tolerance_grade: string | null;
};

export type ReadyMailData = { run_id: string; run_code: string; furnace: string | null; parts: ReadyPart[] };

export const STATE_WORDS: Record<string, string> = {
  planned: "planned",
  printing: "printing",
  green: "green",
  washing: "washing",
  brown: "brown",
  sintering: "sintering",
  sintered: "sintered",
  ready_for_finishing: "ready for finishing",
  finishing: "finishing",
  done: "done",
  on_hold: "on hold",
  scrapped: "scrapped",
};

const escapeHtml = (s: string) =>
  s.replace(/&/g, "&amp;").replace(/</g, "&lt;").replace(/>/g, "&gt;").replace(/"/g, "&quot;").replace(/'/g, "&#39;");

// Building a formatter costs far more than using one; a worker formats thousands of times.
const formatters = new Map<string, Intl.DateTimeFormat | null>();

export function formatShopTime(d: Date | null, timeZone: string): string {
  if (!d) return "—";
  if (!formatters.has(timeZone)) {
    let f: Intl.DateTimeFormat | null = null;
    try {
      f = new Intl.DateTimeFormat("en-GB", { timeZone, weekday: "short", day: "numeric", month: "short", hour: "2-digit", minute: "2-digit", timeZoneName: "short" });
    } catch {
      f = null; // an unknown zone name: fall back to UTC in ISO form
    }
    formatters.set(timeZone, f);
  }
  const f = formatters.get(timeZone);
  return f ? f.format(d) : d.toISOString();
}

const plural = (n: number, one: string, many = `${one}s`) => `${n} ${n === 1 ? one : many}`;

function countStates(units: UnitLine[]): string {
  const counts = new Map<string, number>();
  for (const u of units) counts.set(u.state, (counts.get(u.state) ?? 0) + 1);
  return [...counts.entries()].map(([s, n]) => `${n} ${STATE_WORDS[s] ?? s}`).join(", ") || "no units";
}

const link = (ctx: MailContext, path: string) => `${ctx.app_url.replace(/\/$/, "")}${path}`;

type Block =
  | { kind: "p"; text: string }
  | { kind: "facts"; rows: [string, string][] }
  | { kind: "table"; head: string[]; rows: string[][] }
  | { kind: "link"; label: string; href: string }
  | { kind: "caution"; text: string };

/** One layout for every message, so the text and HTML versions never drift apart. */
function render(subject: string, recipient: MailRecipient, ctx: MailContext, blocks: Block[]): MailContent {
  const text: string[] = [`Hello ${recipient.name},`, ""];
  const html: string[] = [
    `<div style="font-family:system-ui,sans-serif;color:#1b1916;font-size:14px;line-height:1.45">`,
    `<p>Hello ${escapeHtml(recipient.name)},</p>`,
  ];
  for (const b of blocks) {
    if (b.kind === "p") {
      text.push(b.text, "");
      html.push(`<p>${escapeHtml(b.text)}</p>`);
    } else if (b.kind === "facts") {
      const w = Math.max(...b.rows.map(([k]) => k.length));
      for (const [k, v] of b.rows) text.push(`  ${k.padEnd(w)}  ${v}`);
      text.push("");
      html.push(
        `<table style="border-collapse:collapse;margin:0 0 12px">` +
          b.rows
            .map(([k, v]) => `<tr><td style="padding:2px 12px 2px 0;color:#6f6557">${escapeHtml(k)}</td><td style="padding:2px 0">${escapeHtml(v)}</td></tr>`)
            .join("") +
          `</table>`,
      );
    } else if (b.kind === "table") {
      for (const row of b.rows) text.push(`  - ${row.filter((c) => c !== "").join(" · ")}`);
      text.push("");
      html.push(
        `<table style="border-collapse:collapse;margin:0 0 12px;font-size:13px">` +
          `<tr>${b.head.map((h) => `<th style="text-align:left;padding:4px 10px 4px 0;border-bottom:1px solid #d3cdc4">${escapeHtml(h)}</th>`).join("")}</tr>` +
          b.rows
            .map((r) => `<tr>${r.map((c) => `<td style="padding:3px 10px 3px 0;border-bottom:1px solid #e9e6e1;vertical-align:top">${escapeHtml(c)}</td>`).join("")}</tr>`)
            .join("") +
          `</table>`,
      );
    } else if (b.kind === "link") {
      text.push(`${b.label}: ${b.href}`, "");
      html.push(`<p><a href="${escapeHtml(b.href)}" style="color:#a84f2a">${escapeHtml(b.label)}</a></p>`);
    } else {
      text.push(`Caution: ${b.text}`, "");
      html.push(`<p style="border-left:3px solid #d5ac3f;padding:4px 8px;background:#f6ecd0;color:#574f44">${escapeHtml(b.text)}</p>`);
    }
  }
  const footer = `Sent by Hearth for ${ctx.shop_name}. You can turn this kind of message off in your settings.`;
  text.push("—", footer);
  html.push(`<p style="color:#8d8273;font-size:12px">${escapeHtml(footer)}</p></div>`);
  return { subject, text: `${text.join("\n")}\n`, html: html.join("") };
}

const unitRows = (units: UnitLine[]) =>
  units.map((u) => [u.serial, `${u.part_number} rev ${u.revision} ${u.part_name}`, u.order_code, STATE_WORDS[u.state] ?? u.state, u.note ?? ""]);
const UNIT_HEAD = ["Unit", "Part", "Order", "Now", "Note"];

export function buildMail(data: BuildMailData, recipient: MailRecipient, ctx: MailContext): MailContent & { kind: NotificationKind } {
  const where = data.printer ? ` on ${data.printer}` : "";
  const kind: NotificationKind = data.failed ? "build_failed" : "build_finished";
  const subject = data.failed
    ? `Build ${data.code} failed${where}: ${plural(data.units.length, "unit")} scrapped`
    : `Build ${data.code} finished${where}: ${plural(data.units.length, "green unit")}`;
  const lead = data.failed
    ? `Build ${data.code} was marked failed${data.failure_reason ? ` (${data.failure_reason})` : ""}. At its scheduled end Hearth scrapped its units with the reason "print failure"; reorder or rebuild them from the parts page.`
    : `Build ${data.code} reached its scheduled end${where}. Its units are now green and wait for a wash batch.`;
  return {
    kind,
    ...render(subject, recipient, ctx, [
      { kind: "p", text: lead },
      {
        kind: "facts",
        rows: [
          ["Build", data.code],
          ["Printer", data.printer ?? "—"],
          ["Material", data.material_lot ? `${data.material}, lot ${data.material_lot}` : data.material],
          ["Printed", `${formatShopTime(data.starts_at, ctx.time_zone)} – ${formatShopTime(data.ends_at, ctx.time_zone)}`],
          ["Units", countStates(data.units)],
        ],
      },
      { kind: "table", head: UNIT_HEAD, rows: unitRows(data.units) },
      { kind: "link", label: `Open build ${data.code}`, href: link(ctx, `/builds/${data.id}`) },
    ]),
  };
}

export function washDoneMail(data: WashMailData, recipient: MailRecipient, ctx: MailContext): MailContent {
  const brown = data.units.filter((u) => u.state === "brown").length;
  const held = data.units.filter((u) => u.state === "on_hold").length;
  const subject = `Wash batch ${data.code} done: ${brown} brown${held ? `, ${held} on hold` : ""}`;
  return render(subject, recipient, ctx, [
    {
      kind: "p",
      text: `Wash batch ${data.code} has finished and dried. ${plural(brown, "brown unit")} passed the mass-loss check and can go into a furnace run${held ? `; ${plural(held, "unit")} did not and ${held === 1 ? "is" : "are"} on hold with the reason below` : ""}.`,
    },
    {
      kind: "facts",
      rows: [
        ["Batch", data.code],
        ["Wash station", data.station ?? "—"],
        ["Wash ended", formatShopTime(data.ends_at, ctx.time_zone)],
        ["Dry from", formatShopTime(data.dried_at, ctx.time_zone)],
        ["Units", countStates(data.units)],
      ],
    },
    { kind: "table", head: UNIT_HEAD, rows: unitRows(data.units) },
    { kind: "caution", text: "Brown parts are fragile and may still give off solvent vapour: handle them with gloves in a ventilated area and keep them away from ignition sources, as the solvent maker's safety data sheet and local codes require." },
    { kind: "link", label: "Open the batching board", href: link(ctx, "/batches") },
  ]);
}

export function furnaceRunFinishedMail(data: FurnaceRunMailData, recipient: MailRecipient, ctx: MailContext): MailContent {
  const ready = data.units.filter((u) => u.state === "ready_for_finishing").length;
  const subject = `Furnace run ${data.code} finished${data.furnace ? ` on ${data.furnace}` : ""}: ${ready} of ${plural(data.units.length, "unit")} ready for finishing`;
  return render(subject, recipient, ctx, [
    {
      kind: "p",
      text: `Furnace run ${data.code} has reached the end of its cycle, cool-down included. ${plural(ready, "unit")} moved to ready for finishing; record any defect found at unload on the run page.`,
    },
    {
      kind: "facts",
      rows: [
        ["Run", data.code],
        ["Furnace", data.furnace ?? "—"],
        ["Profile", `${data.profile_code} (${data.profile_name})`],
        ["Atmosphere", data.atmosphere],
        ["Started", formatShopTime(data.starts_at, ctx.time_zone)],
        ["Ended", formatShopTime(data.ends_at, ctx.time_zone)],
        ["Cycle", data.cycle_minutes ? formatDuration(data.cycle_minutes) : "—"],
        ["Outcomes", countStates(data.units)],
      ],
    },
    { kind: "table", head: UNIT_HEAD, rows: unitRows(data.units) },
    {
      kind: "caution",
      text: "Loads, trays and the furnace stay hot well after the cycle ends, and the process gas may be flammable or displace oxygen. Open and unload only as the furnace maker's instructions allow, after purging, with heat-resistant protection (NFPA 86; local codes and licensed practice apply).",
    },
    { kind: "link", label: `Open furnace run ${data.code}`, href: link(ctx, `/furnace-runs/${data.id}`) },
  ]);
}

function stockText(stock: FaceStockMm, system: UnitSystem): string {
  const faces: [string, number][] = [
    ["X−", stock.x_neg],
    ["X+", stock.x_pos],
    ["Y−", stock.y_neg],
    ["Y+", stock.y_pos],
    ["Z−", stock.z_neg],
    ["Z+", stock.z_pos],
  ];
  const left = faces.filter(([, v]) => v > 0);
  if (!left.length) return "no stock left (net shape)";
  return left.map(([f, v]) => `${f} ${formatLength(v, system, system === "mm" ? 2 : 3)}`).join(", ");
}

export function readyForFinishingMail(data: ReadyMailData, recipient: MailRecipient, ctx: MailContext): MailContent {
  const units = data.parts.reduce((n, p) => n + p.serials.length, 0);
  const subject = `Ready for finishing: ${plural(units, "unit")} of ${plural(data.parts.length, "part")} from furnace run ${data.run_code}`;
  const blocks: Block[] = [
    {
      kind: "p",
      text: `Furnace run ${data.run_code}${data.furnace ? ` on ${data.furnace}` : ""} has finished. These parts are sintered and ready for you, with the stock left on each finished face:`,
    },
  ];
  for (const p of data.parts) {
    const tolerance = p.tolerance_grade ?? (p.tolerance_um ? `± ${formatLength(p.tolerance_um / 1000, recipient.unit_pref, recipient.unit_pref === "mm" ? 3 : 4)}` : "—");
    blocks.push({
      kind: "facts",
      rows: [
        ["Part", `${p.part_number} rev ${p.revision} ${p.name}`],
        ["Order", `${p.order_code}${p.due_at ? `, due ${formatShopTime(p.due_at, ctx.time_zone)}` : ""}`],
        ["Units", p.serials.join(", ")],
        ["Stock", stockText(p.stock, recipient.unit_pref)],
        ["Target Ra", p.target_ra_um ? formatRa(p.target_ra_um, recipient.unit_pref) : "—"],
        ["Tolerance", tolerance],
        ["Notes", p.finishing_notes.trim() || "—"],
      ],
    });
  }
  blocks.push(
    { kind: "caution", text: "Grinding and machining sintered parts makes fine metal dust that can burn: collect it as NFPA 484 and the machine maker's instructions require, and wear eye and breathing protection." },
    { kind: "link", label: "Open the finishing queue", href: link(ctx, "/finishing") },
  );
  return render(subject, recipient, ctx, blocks);
}

export type ReorderMailData = { material_code: string; material_name: string; on_hand_g: number; reorder_point_g: number; lead_time_days: number; first_below_day: string; first_short_day: string | null; short_builds: string[] };

const kgText = (g: number) => `${(g / 1000).toLocaleString("en-GB", { maximumFractionDigits: 1 })} kg`;

export function feedstockReorderMail(data: ReorderMailData, recipient: MailRecipient, ctx: MailContext): MailContent {
  const subject = `Reorder ${data.material_code} feedstock: below the reorder point on ${data.first_below_day}`;
  return render(subject, recipient, ctx, [
    {
      kind: "p",
      text: `With the builds now scheduled, ${data.material_name} feedstock on the shelf falls below its reorder point of ${kgText(data.reorder_point_g)} on ${data.first_below_day}, within the ${data.lead_time_days}-day lead time of a delivery.${data.first_short_day ? ` It runs out on ${data.first_short_day}; ${plural(data.short_builds.length, "scheduled build")} would then have nothing to print from.` : ""}`,
    },
    {
      kind: "facts",
      rows: [
        ["Material", `${data.material_code} (${data.material_name})`],
        ["Released and in date now", kgText(data.on_hand_g)],
        ["Reorder point", kgText(data.reorder_point_g)],
        ["Below it on", data.first_below_day],
        ["Runs out on", data.first_short_day ?? "not within the horizon"],
        ["Builds short", data.short_builds.length ? data.short_builds.join(", ") : "none"],
      ],
    },
    { kind: "link", label: "Open feedstock", href: link(ctx, "/inventory") },
  ]);
}

export type NoStockMailData = { material_code: string; material_name: string; first_build: string; first_day: string; first_day_g: number; builds: number; needed_g: number };

/** A material the shop has never received a lot of, needed by scheduled builds: nothing to reorder from, so it says so. */
export function feedstockNoStockMail(data: NoStockMailData, recipient: MailRecipient, ctx: MailContext): MailContent {
  const subject = `No ${data.material_code} feedstock on hand: needed by build ${data.first_build} on ${data.first_day}`;
  return render(subject, recipient, ctx, [
    {
      kind: "p",
      text: `No lot of ${data.material_name} feedstock has ever been received, yet ${plural(data.builds, "scheduled build")} will print in it, the first (${data.first_build}) on ${data.first_day}. Receive a lot before then, or move the builds to a material on the shelf.`,
    },
    {
      kind: "facts",
      rows: [
        ["Material", `${data.material_code} (${data.material_name})`],
        ["On hand", "none (no lot received)"],
        ["First build", `${data.first_build} on ${data.first_day}`],
        ["Needed that day", kgText(data.first_day_g)],
        ["Scheduled builds", String(data.builds)],
        ["Needed in all", kgText(data.needed_g)],
      ],
    },
    { kind: "link", label: "Open feedstock", href: link(ctx, "/inventory") },
  ]);
}

export type BathMailData = { station: string; solvent: string; dissolved_g: number; limit_g: number; saturation: number };

export function bathChangeDueMail(data: BathMailData, recipient: MailRecipient, ctx: MailContext): MailContent {
  const subject = `Change the solvent at ${data.station}: ${Math.round(data.saturation * 100)} % of its binder limit`;
  return render(subject, recipient, ctx, [
    { kind: "p", text: `The bath at ${data.station} has taken up ${kgText(data.dissolved_g)} of binder since its last change, ${Math.round(data.saturation * 100)} % of the ${kgText(data.limit_g)} the shop allows. A saturated bath washes slowly and leaves binder behind; change it before the next batch.` },
    { kind: "facts", rows: [["Wash station", data.station], ["Solvent", data.solvent], ["Binder dissolved", kgText(data.dissolved_g)], ["Limit", kgText(data.limit_g)]] },
    { kind: "caution", text: "Wash solvents give off flammable, harmful vapour: drain and refill with ventilation running, no ignition sources, gloves and eye protection, and dispose of spent solvent as the solvent maker's safety data sheet and local codes require." },
    { kind: "link", label: "Open feedstock and consumables", href: link(ctx, "/inventory#consumables") },
  ]);
}
