import { PDFDocument, StandardFonts, rgb, type PDFFont, type PDFPage } from "pdf-lib";
import QRCode from "qrcode";
import type { PlateLayout } from "./plate";

// The build traveler: one A4 page that goes with the plate from the printer to the wash. It
// names the build, the material lot, the printer slot and every unit, draws the plate, and
// carries a QR code that opens the build's page, plus lines to sign at start and unload.

export type TravelerInput = {
  shop_name: string;
  url: string;
  build: {
    code: string;
    state: string;
    material_code: string;
    material_name: string;
    material_lot: string;
    printer_name: string | null;
    starts_at: Date | null;
    ends_at: Date | null;
    est_minutes: number | null;
    notes: string;
  };
  units: Array<{ serial: string; part_number: string; revision: string; part_name: string; order_code: string; due_at: Date; green: [number, number, number] | null }>;
  layout: PlateLayout | null;
  time_zone: string;
  printed_at: Date;
};

const INK = rgb(0.106, 0.098, 0.086);
const MUTED = rgb(0.435, 0.396, 0.341);
const CLAY = rgb(0.659, 0.31, 0.165);
const LINE = rgb(0.827, 0.804, 0.769);

/** Standard PDF fonts only know WinAnsi; anything else would throw while drawing. */
export function safe(text: string): string {
  return text
    .replace(/[≤]/g, "<=")
    .replace(/[≥]/g, ">=")
    .replace(/[→]/g, "->")
    .replace(/[₂]/g, "2")
    .replace(/[^\x20-\x7e\xa0-\xff–—‘’“”•…€]/g, "?");
}

function when(d: Date | null, tz: string): string {
  if (!d) return "not booked";
  return new Intl.DateTimeFormat("en-GB", { timeZone: tz, dateStyle: "medium", timeStyle: "short" }).format(d);
}

function duration(minutes: number | null): string {
  if (minutes === null) return "-";
  const h = Math.floor(minutes / 60);
  const m = Math.round(minutes % 60);
  return h ? `${h} h ${String(m).padStart(2, "0")} min` : `${m} min`;
}

export function drawQr(page: PDFPage, text: string, x: number, y: number, size: number) {
  const qr = QRCode.create(text, { errorCorrectionLevel: "M" });
  const n = qr.modules.size;
  const quiet = 2;
  const cell = size / (n + 2 * quiet);
  page.drawRectangle({ x, y, width: size, height: size, color: rgb(1, 1, 1) });
  // One path per code, a rectangle per run of dark modules in a row (a sheet of labels has dozens
  // of codes: one rectangle per module made it thousands of drawing calls), in module units scaled
  // to the cell; each run overlaps its neighbours by a hair so no seam shows between rows.
  let d = "";
  for (let r = 0; r < n; r++) {
    for (let c = 0; c < n; ) {
      if (!qr.modules.get(r, c)) {
        c++;
        continue;
      }
      const start = c;
      while (c < n && qr.modules.get(r, c)) c++;
      const w = c - start + 0.02;
      d += `M${start + quiet} ${r + quiet}h${w}v1.02h${-w}Z`;
    }
  }
  page.drawSvgPath(d, { x, y: y + size, scale: cell, color: INK, borderWidth: 0 });
}

export function fit(font: PDFFont, text: string, size: number, width: number): string {
  let t = safe(text);
  if (font.widthOfTextAtSize(t, size) <= width) return t;
  while (t.length > 1 && font.widthOfTextAtSize(`${t}…`, size) > width) t = t.slice(0, -1);
  return `${t}…`;
}

export async function travelerPdf(input: TravelerInput): Promise<Uint8Array> {
  const doc = await PDFDocument.create();
  doc.setTitle(`Traveler ${input.build.code}`);
  doc.setCreator("Hearth");
  doc.setCreationDate(input.printed_at);
  const page = doc.addPage([595.28, 841.89]);
  const font = await doc.embedFont(StandardFonts.Helvetica);
  const bold = await doc.embedFont(StandardFonts.HelveticaBold);
  const { width, height } = page.getSize();
  const m = 40;
  const text = (t: string, x: number, y: number, size = 10, f = font, color = INK) => page.drawText(safe(t), { x, y, size, font: f, color });

  text(input.shop_name, m, height - m - 4, 10, bold, CLAY);
  text("Build traveler", m, height - m - 30, 22, bold);
  text(input.build.code, m, height - m - 56, 16, bold, CLAY);
  text(`State: ${input.build.state}`, m + 140, height - m - 56, 10, font, MUTED);
  drawQr(page, input.url, width - m - 96, height - m - 100, 96);
  text("Scan for the build page", width - m - 96, height - m - 112, 7, font, MUTED);

  const facts: Array<[string, string]> = [
    ["Material", `${input.build.material_code} (${input.build.material_name})`],
    ["Material lot", input.build.material_lot || "not recorded"],
    ["Printer", input.build.printer_name ?? "not booked"],
    ["Start", `${when(input.build.starts_at, input.time_zone)}${input.build.starts_at ? ` (${input.time_zone})` : ""}`],
    ["End", `${when(input.build.ends_at, input.time_zone)}${input.build.ends_at ? ` (${input.time_zone})` : ""}`],
    ["Estimated print time", duration(input.build.est_minutes)],
    ["Units", String(input.units.length)],
  ];
  let y = height - m - 90;
  for (const [k, v] of facts) {
    text(k, m, y, 9, font, MUTED);
    text(v, m + 120, y, 10, bold);
    y -= 15;
  }
  if (input.build.notes) {
    text(fit(font, `Notes: ${input.build.notes}`, 9, width - 2 * m), m, y, 9, font, MUTED);
    y -= 15;
  }

  // Units table
  y -= 10;
  const cols = [m, m + 140, m + 230, m + 350, m + 420];
  const headers = ["Serial", "Part / rev", "Name", "Order", "Green X × Y × Z, mm"];
  page.drawLine({ start: { x: m, y: y + 12 }, end: { x: width - m, y: y + 12 }, thickness: 0.6, color: LINE });
  headers.forEach((h, i) => text(h, cols[i], y, 8, bold, MUTED));
  y -= 14;
  const rowsFit = Math.max(0, Math.floor((y - 360) / 13));
  const shown = input.units.slice(0, rowsFit);
  for (const u of shown) {
    text(fit(font, u.serial, 8, 136), cols[0], y, 8, bold);
    text(fit(font, `${u.part_number} / ${u.revision}`, 8, 86), cols[1], y, 8);
    text(fit(font, u.part_name, 8, 116), cols[2], y, 8);
    text(fit(font, u.order_code, 8, 66), cols[3], y, 8);
    text(u.green ? u.green.map((g) => g.toFixed(1)).join(" × ") : "-", cols[4], y, 8);
    page.drawLine({ start: { x: m, y: y - 4 }, end: { x: width - m, y: y - 4 }, thickness: 0.3, color: LINE });
    y -= 13;
  }
  if (shown.length < input.units.length) {
    text(`… and ${input.units.length - shown.length} more unit(s): see the build page.`, m, y, 8, font, MUTED);
    y -= 13;
  }

  // Plate drawing
  // The sign-off boxes sit at the foot of the page (y 56 to 100); the plate fills what is between.
  const boxTop = Math.min(y - 14, 350);
  const boxH = boxTop - 8 - 128;
  const boxW = width - 2 * m;
  text("Plate layout (green footprints, top view)", m, boxTop, 9, bold, MUTED);
  const L = input.layout;
  if (L && L.placements.length) {
    const scale = Math.min(boxW / L.plate_x_mm, boxH / L.plate_y_mm);
    const ox = m;
    const oy = boxTop - 8 - L.plate_y_mm * scale;
    page.drawRectangle({ x: ox, y: oy, width: L.plate_x_mm * scale, height: L.plate_y_mm * scale, borderColor: MUTED, borderWidth: 0.8 });
    for (const p of L.placements) {
      page.drawRectangle({ x: ox + p.x_mm * scale, y: oy + p.y_mm * scale, width: p.w_mm * scale, height: p.h_mm * scale, color: rgb(0.96, 0.89, 0.84), borderColor: CLAY, borderWidth: 0.6 });
      const label = fit(font, p.label ?? p.id.slice(0, 6), 6, Math.max(4, p.w_mm * scale - 4));
      page.drawText(label, { x: ox + p.x_mm * scale + 2, y: oy + p.y_mm * scale + 3, size: 6, font, color: INK });
    }
    text(`${L.plate_x_mm} × ${L.plate_y_mm} mm plate, ${L.clearance_mm} mm clearance, ${Math.round(L.fill * 100)} % of the plate covered`, m, oy - 12, 8, font, MUTED);
  } else {
    text("No layout yet: the plate is laid out when the build is booked on a printer.", m, boxTop - 16, 9, font, MUTED);
  }

  // Sign-off
  const sy = 56;
  const boxes = ["Plate loaded / build started", "Build removed, parts counted", "Handed to wash"];
  const bw = (width - 2 * m - 20) / 3;
  boxes.forEach((b, i) => {
    const x = m + i * (bw + 10);
    page.drawRectangle({ x, y: sy, width: bw, height: 44, borderColor: LINE, borderWidth: 0.8 });
    text(b, x + 6, sy + 32, 8, bold, MUTED);
    text("Name / date / time", x + 6, sy + 6, 7, font, MUTED);
  });
  text(`Printed ${when(input.printed_at, input.time_zone)} · ${input.url}`, m, 36, 7, font, MUTED);
  return doc.save();
}
