import type { PrintedUnit } from "./printed-unit";
import { PDFDocument } from "pdf-lib";
import { drawQr } from "@/lib/builds/traveler";
import { LINE, INK, MUTED, CLAY } from "./page-flow";
import { MM, PAPER_POINTS, type Paper } from "./paper";
import { codeLines, embedShopFonts, fitText, type FontBytes } from "./shop-fonts";

// Unit labels: a sheet of labels, one per unit, each with the QR code that opens the unit's page
// (drawn by the traveler's own drawQr), the unit code in large type, the part, the customer and
// the material. Two columns of 38 mm tall labels inside a 10 mm margin: 14 on A4 and 12 on
// Letter, the grid of common 2-across label sheets (common practice, no published source);
// thin cut lines help where plain paper is used.

export type UnitLabel = PrintedUnit & {
  url: string;
};

export type UnitLabelsInput = { title: string; paper: Paper; printed_at: Date; labels: UnitLabel[] };

export const LABEL_COLUMNS = 2;
export const LABEL_HEIGHT_MM = 38;
export const LABEL_MARGIN_MM = 10;

/** Where each label lands: page number and its lower-left corner and size in points. */
export function labelGrid(paper: Paper, count: number): Array<{ page: number; x: number; y: number; w: number; h: number }> {
  const [width, height] = PAPER_POINTS[paper];
  const margin = LABEL_MARGIN_MM * MM;
  const w = (width - 2 * margin) / LABEL_COLUMNS;
  const h = LABEL_HEIGHT_MM * MM;
  const rows = Math.floor((height - 2 * margin) / h);
  const perPage = rows * LABEL_COLUMNS;
  return Array.from({ length: count }, (_, i) => {
    const onPage = i % perPage;
    const row = Math.floor(onPage / LABEL_COLUMNS);
    const col = onPage % LABEL_COLUMNS;
    return { page: Math.floor(i / perPage), x: margin + col * w, y: height - margin - (row + 1) * h, w, h };
  });
}

export async function unitLabelsPdf(input: UnitLabelsInput, fontBytes: FontBytes): Promise<Uint8Array> {
  const doc = await PDFDocument.create();
  doc.setTitle(input.title);
  doc.setCreator("Hearth");
  doc.setCreationDate(input.printed_at);
  const { regular, bold } = await embedShopFonts(doc, fontBytes);
  const size = PAPER_POINTS[input.paper];
  const grid = labelGrid(input.paper, input.labels.length);
  const pages = [doc.addPage([size[0], size[1]])];
  input.labels.forEach((l, i) => {
    const g = grid[i];
    while (pages.length <= g.page) pages.push(doc.addPage([size[0], size[1]]));
    const page = pages[g.page];
    page.drawRectangle({ x: g.x, y: g.y, width: g.w, height: g.h, borderColor: LINE, borderWidth: 0.4, borderDashArray: [2, 2] });
    const pad = 3 * MM;
    const qr = g.h - 2 * pad;
    drawQr(page, l.url, g.x + pad, g.y + pad, qr);
    const x = g.x + 2 * pad + qr;
    const textW = g.x + g.w - pad - x;
    // The unit code as large as fits (18 pt down to 10 pt, so it reads from arm's length), whole:
    // a long one goes over two lines rather than lose characters.
    const code = codeLines(bold, l.serial, textW, 18, 10);
    let y = g.y + g.h - pad - code.size * 0.8;
    for (const cl of code.lines) {
      page.drawText(cl, { x, y, size: code.size, font: bold, color: INK });
      y -= code.size + 1;
    }
    y -= 3;
    const line = (t: string, sz: number, f = regular, color = INK) => {
      if (y < g.y + pad) return; // a code over several lines leaves less room: the last lines give way
      page.drawText(fitText(f, t, sz, textW), { x, y, size: sz, font: f, color });
      y -= sz + 3;
    };
    line(`${l.part_number} / ${l.revision}`, 8.5, bold);
    line(l.part_name, 8);
    line(l.customer, 8, bold, CLAY);
    line(l.order_code, 7.5, regular, MUTED);
    line(`${l.material_code} · ${l.material_name}`, 7.5, regular, MUTED);
  });
  if (!input.labels.length) {
    pages[0].drawText("No units.", { x: LABEL_MARGIN_MM * MM, y: size[1] - LABEL_MARGIN_MM * MM - 20, size: 12, font: regular, color: MUTED });
  }
  return doc.save();
}
