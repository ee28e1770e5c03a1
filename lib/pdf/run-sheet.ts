import type { PrintedUnit } from "./printed-unit";
import { PDFDocument } from "pdf-lib";
import type { TrayRun } from "@/lib/packing/types";
import { cautionsFor, CAUTION_DEFERENCE } from "@/lib/safety/cautions";
import { cToF } from "@/lib/units";
import { CLAY, INK, MUTED, OXIDE, LINE, pageFlow, type Flow } from "./page-flow";
import type { Paper } from "./paper";
import { codeLines, embedShopFonts, fitText, wrapText, type FontBytes } from "./shop-fonts";

// The furnace-run sheet: what goes on the furnace's clipboard for one run. The run, its furnace
// and sinter profile, the trays with every unit on them, the load against the furnace's limit,
// the usual cautions (lib/safety/cautions.ts, the words the run page shows) and room to sign.

export type RunSheetUnit = PrintedUnit & {
  id: string;
  green_mass_g: number | null;
  /** Best mass known for the load: brown weighing, else green weighing, else an estimate. */
  mass_g: number;
};

export type RunSheetInput = {
  shop_name: string;
  url: string;
  time_zone: string;
  printed_at: Date;
  paper: Paper;
  run: { code: string; state: string; notes: string; starts_at: Date | null; ends_at: Date | null; operator: string | null };
  furnace: { name: string; max_load_g: number; tray_count: number; tray_x_mm: number; tray_y_mm: number };
  profile: { label: string; name: string; atmosphere: string; peak_c: number; cycle_minutes: number };
  layout: TrayRun | null;
  units: RunSheetUnit[];
};

export type TrayGroup = { tray: number | null; units: RunSheetUnit[] };

/** Units per tray as the layout places them (tray 1 first); units the layout does not hold come last, tray null. */
export function unitsByTray(layout: TrayRun | null, units: RunSheetUnit[]): TrayGroup[] {
  const byId = new Map(units.map((u) => [u.id, u]));
  const placed = new Set<string>();
  const groups: TrayGroup[] = [];
  for (const t of layout?.trays ?? []) {
    const on = t.placements.map((p) => byId.get(p.unit)).filter((u): u is RunSheetUnit => !!u && !placed.has(u.id));
    on.forEach((u) => placed.add(u.id));
    if (on.length) groups.push({ tray: t.index + 1, units: on.sort((a, b) => a.serial.localeCompare(b.serial)) });
  }
  const rest = units.filter((u) => !placed.has(u.id));
  if (rest.length) groups.push({ tray: null, units: rest });
  return groups;
}

const when = (d: Date | null, tz: string) => (d ? `${new Intl.DateTimeFormat("en-GB", { timeZone: tz, dateStyle: "medium", timeStyle: "short" }).format(d)} (${tz})` : "not booked");
const grams = (g: number) => `${Math.round(g).toLocaleString("en-GB")} g`;
function duration(minutes: number): string {
  const h = Math.floor(minutes / 60);
  const m = Math.round(minutes % 60);
  return h ? `${h} h ${String(m).padStart(2, "0")} min` : `${m} min`;
}

export async function runSheetPdf(input: RunSheetInput, fontBytes: FontBytes): Promise<Uint8Array> {
  const doc = await PDFDocument.create();
  doc.setTitle(`Furnace run ${input.run.code}`);
  doc.setCreator("Hearth");
  doc.setCreationDate(input.printed_at);
  const fonts = await embedShopFonts(doc, fontBytes);
  const { regular, bold } = fonts;
  const head = (f: Flow) => {
    f.text(`${input.shop_name} · Furnace run ${input.run.code} (continued)`, f.margin, f.y - 8, 9, bold, CLAY);
    f.y -= 26;
  };
  const f = pageFlow(doc, input.paper, fonts, head);
  const m = f.margin;
  const inner = f.width - 2 * m;

  f.text(input.shop_name, m, f.y - 6, 10, bold, CLAY);
  f.text("Furnace-run sheet", m, f.y - 32, 22, bold);
  f.text(input.run.code, m, f.y - 58, 16, bold, CLAY);
  f.text(`State: ${input.run.state}`, m + bold.widthOfTextAtSize(input.run.code, 16) + 16, f.y - 58, 10, regular, MUTED);
  f.y -= 84;

  const total = input.units.reduce((s, u) => s + u.mass_g, 0);
  const share = input.furnace.max_load_g > 0 ? Math.round((total / input.furnace.max_load_g) * 100) : null;
  const facts: Array<[string, string]> = [
    ["Furnace", `${input.furnace.name} (${input.furnace.tray_count} trays of ${input.furnace.tray_x_mm} × ${input.furnace.tray_y_mm} mm)`],
    ["Sinter profile", `${input.profile.label}: ${input.profile.name}`],
    ["Peak temperature", `${Math.round(input.profile.peak_c)} °C (${Math.round(cToF(input.profile.peak_c))} °F)`],
    ["Atmosphere / process gas", input.profile.atmosphere || "not given"],
    ["Estimated cycle", duration(input.profile.cycle_minutes)],
    ["Planned start", when(input.run.starts_at, input.time_zone)],
    ["Planned end", when(input.run.ends_at, input.time_zone)],
    ["Operator", input.run.operator ?? "________________________"],
  ];
  for (const [k, v] of facts) {
    f.text(k, m, f.y, 9, regular, MUTED);
    f.text(fitText(bold, v, 10, inner - 140), m + 140, f.y, 10, bold);
    f.y -= 15;
  }
  if (input.run.notes) {
    for (const l of wrapText(regular, `Notes: ${input.run.notes}`, 9, inner).slice(0, 4)) {
      f.text(l, m, f.y, 9, regular, MUTED);
      f.y -= 12;
    }
  }

  // Trays and units
  f.y -= 10;
  const cols = { serial: m, part: m + 0.24 * inner, order: m + 0.48 * inner, material: m + 0.74 * inner, mass: f.width - m };
  const colHead = () => {
    f.line(f.y + 11, 0.6);
    f.text("Unit", cols.serial, f.y, 8, bold, MUTED);
    f.text("Part / rev · name", cols.part, f.y, 8, bold, MUTED);
    f.text("Order · customer", cols.order, f.y, 8, bold, MUTED);
    f.text("Material", cols.material, f.y, 8, bold, MUTED);
    const g = "Green mass";
    f.text(g, cols.mass - bold.widthOfTextAtSize(g, 8), f.y, 8, bold, MUTED);
    f.y -= 14;
  };
  const groups = unitsByTray(input.layout, input.units);
  if (!groups.length) {
    f.text("No units on this run yet.", m, f.y, 10, regular, MUTED);
    f.y -= 16;
  }
  for (const g of groups) {
    f.need(50);
    const mass = g.units.reduce((s, u) => s + u.mass_g, 0);
    f.text(g.tray === null ? "Not placed on a tray yet" : `Tray ${g.tray}`, m, f.y, 11, bold, CLAY);
    f.text(`${g.units.length} unit${g.units.length === 1 ? "" : "s"} · ${grams(mass)}`, m + 150, f.y, 9, regular, MUTED);
    f.y -= 16;
    colHead();
    for (const u of g.units) {
      // The unit code prints whole (smaller, or over more lines, when it is long): it is what the operator matches.
      const code = codeLines(bold, u.serial, cols.part - cols.serial - 6, 9, 7);
      const rowH = Math.max(24, 4 + code.lines.length * (code.size + 2) + 6);
      if (f.y - rowH - 2 < f.margin + 18) {
        f.need(rowH + 32);
        colHead();
      }
      code.lines.forEach((l, i) => f.text(l, cols.serial, f.y - i * (code.size + 2), code.size, bold));
      f.text(fitText(regular, `${u.part_number} / ${u.revision}`, 8, cols.order - cols.part - 6), cols.part, f.y, 8);
      f.text(fitText(regular, u.part_name, 8, cols.order - cols.part - 6), cols.part, f.y - 10, 8, regular, MUTED);
      f.text(fitText(regular, u.order_code, 8, cols.material - cols.order - 6), cols.order, f.y, 8);
      f.text(fitText(regular, u.customer, 8, cols.material - cols.order - 6), cols.order, f.y - 10, 8, regular, MUTED);
      f.text(fitText(regular, u.material_code, 8, cols.mass - 60 - cols.material), cols.material, f.y, 8);
      f.text(fitText(regular, u.material_name, 8, cols.mass - 60 - cols.material), cols.material, f.y - 10, 8, regular, MUTED);
      const gm = u.green_mass_g === null ? "not weighed" : grams(u.green_mass_g);
      f.text(gm, cols.mass - regular.widthOfTextAtSize(gm, 8), f.y, 8);
      f.line(f.y - rowH + 10, 0.3);
      f.y -= rowH;
    }
    f.y -= 6;
  }

  // Totals against the furnace's limit
  f.need(40);
  f.line(f.y + 10, 0.8);
  f.text("Totals", m, f.y - 2, 10, bold);
  f.text(`${input.units.length} unit${input.units.length === 1 ? "" : "s"}`, m + 140, f.y - 2, 10, bold);
  const over = total > input.furnace.max_load_g;
  f.text(
    `Load ${grams(total)} of the furnace's ${grams(input.furnace.max_load_g)} limit${share === null ? "" : ` (${share} %)`}${over ? ": OVER THE LIMIT" : ""}`,
    m + 220, f.y - 2, 10, bold, over ? OXIDE : INK,
  );
  f.y -= 16;
  f.text("Load mass counts each unit's brown weighing, else its green weighing, else the estimate from its part.", m, f.y, 7.5, regular, MUTED);
  f.y -= 22;

  // Cautions
  const cautionLines = cautionsFor("furnace").map((c) => ({ title: c.title, lines: wrapText(regular, c.text, 8, inner - 10) }));
  const deference = wrapText(regular, `${CAUTION_DEFERENCE.standards} ${CAUTION_DEFERENCE.precedence}`, 8, inner - 10);
  const cautionH = 20 + cautionLines.reduce((s, c) => s + 12 + c.lines.length * 10 + 3, 0) + deference.length * 10 + 6;
  f.need(Math.min(cautionH, f.height - 2 * m - 40));
  f.page.drawLine({ start: { x: m, y: f.y + 10 }, end: { x: f.width - m, y: f.y + 10 }, thickness: 1.2, color: OXIDE });
  f.text("Safety", m + 6, f.y - 4, 10, bold, OXIDE);
  f.y -= 18;
  for (const c of cautionLines) {
    f.need(12 + c.lines.length * 10);
    f.text(c.title, m + 6, f.y, 8.5, bold, OXIDE);
    f.y -= 11;
    for (const l of c.lines) {
      f.text(l, m + 6, f.y, 8, regular, INK);
      f.y -= 10;
    }
    f.y -= 3;
  }
  for (const l of deference) {
    f.text(l, m + 6, f.y, 8, regular, MUTED);
    f.y -= 10;
  }
  f.y -= 14;

  // Sign-off and notes
  f.need(150);
  f.text("Sign-off", m, f.y, 10, bold);
  f.y -= 10;
  const boxes = ["Loaded and checked", "Started (purge done)", "Unloaded below handling temperature"];
  const bw = (inner - 20) / 3;
  boxes.forEach((b, i) => {
    const x = m + i * (bw + 10);
    f.page.drawRectangle({ x, y: f.y - 46, width: bw, height: 46, borderColor: LINE, borderWidth: 0.8 });
    f.text(fitText(bold, b, 8, bw - 12), x + 6, f.y - 12, 8, bold, MUTED);
    f.text("Name / date / time", x + 6, f.y - 40, 7, regular, MUTED);
  });
  f.y -= 62;
  f.text("Operator notes", m, f.y, 9, bold, MUTED);
  for (let i = 0; i < 4; i++) {
    f.y -= 18;
    f.line(f.y, 0.5);
  }
  f.footer(`Printed ${when(input.printed_at, input.time_zone)} · ${input.url}`);
  return doc.save();
}
