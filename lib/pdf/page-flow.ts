import { rgb, type PDFDocument, type PDFFont, type PDFPage } from "pdf-lib";
import { PAPER_POINTS, type Paper } from "./paper";
import { fitText, printable, type ShopFonts } from "./shop-fonts";

// A document that flows down its pages: a cursor y, a new page (with the caller's running head)
// when the next block does not fit, and a footer with page numbers drawn once all pages exist.

export const INK = rgb(0.106, 0.098, 0.086);
export const MUTED = rgb(0.435, 0.396, 0.341);
export const CLAY = rgb(0.659, 0.31, 0.165);
export const OXIDE = rgb(0.6, 0.2, 0.12);
export const LINE = rgb(0.827, 0.804, 0.769);

export type Flow = {
  page: PDFPage;
  y: number;
  readonly width: number;
  readonly height: number;
  readonly margin: number;
  /** Starts a new page when fewer than `h` points remain above the footer. */
  need(h: number): void;
  text(t: string, x: number, y: number, size?: number, font?: PDFFont, color?: ReturnType<typeof rgb>): void;
  line(y: number, thickness?: number): void;
  footer(left: string): void;
};

export function pageFlow(doc: PDFDocument, paper: Paper, fonts: ShopFonts, runningHead: (f: Flow) => void, margin = 40): Flow {
  const [width, height] = PAPER_POINTS[paper];
  const bottom = margin + 18;
  const flow: Flow = {
    page: doc.addPage([width, height]),
    y: height - margin,
    width,
    height,
    margin,
    need(h) {
      if (flow.y - h >= bottom) return;
      flow.page = doc.addPage([width, height]);
      flow.y = height - margin;
      runningHead(flow);
    },
    text(t, x, y, size = 10, font = fonts.regular, color = INK) {
      flow.page.drawText(printable(font, t), { x, y, size, font, color });
    },
    line(y, thickness = 0.4) {
      flow.page.drawLine({ start: { x: margin, y }, end: { x: width - margin, y }, thickness, color: LINE });
    },
    footer(left) {
      const pages = doc.getPages();
      pages.forEach((p, i) => {
        const size = 7;
        const l = fitText(fonts.regular, left, size, width - 2 * margin - 70);
        p.drawText(l, { x: margin, y: margin - 10, size, font: fonts.regular, color: MUTED });
        const r = `Page ${i + 1} of ${pages.length}`;
        p.drawText(r, { x: width - margin - fonts.regular.widthOfTextAtSize(r, size), y: margin - 10, size, font: fonts.regular, color: MUTED });
      });
    },
  };
  return flow;
}
