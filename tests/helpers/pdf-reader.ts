// Reading a PDF back as a viewer would, with Mozilla's pdf.js (pdfjs-dist, legacy build for
// Node): the text of each page in drawing order, the page sizes, whether its fonts are embedded,
// and a page rendered to RGBA pixels (through @napi-rs/canvas, pdf.js's own Node canvas) for
// decoding a QR code with jsQR.
import { readFileSync } from "node:fs";
import path from "node:path";
import { getDocument, type PDFDocumentProxy } from "pdfjs-dist/legacy/build/pdf.mjs";
import type { FontBytes } from "@/lib/pdf/shop-fonts";

export type ReadPage = { width: number; height: number; text: string; items: string[] };

async function open(bytes: Uint8Array): Promise<PDFDocumentProxy> {
  // A copy: pdf.js transfers the buffer to its worker and would empty the caller's.
  return getDocument({ data: new Uint8Array(bytes), disableFontFace: true, useSystemFonts: false, isEvalSupported: false, verbosity: 0 }).promise;
}

export async function readPdf(bytes: Uint8Array): Promise<{ pages: ReadPage[]; title: string | null }> {
  const doc = await open(bytes);
  try {
    const pages: ReadPage[] = [];
    for (let i = 1; i <= doc.numPages; i++) {
      const page = await doc.getPage(i);
      const [x0, y0, x1, y1] = page.view;
      const content = await page.getTextContent();
      const items = content.items.map((it) => ("str" in it ? it.str : "")).filter((s) => s.length);
      pages.push({ width: x1 - x0, height: y1 - y0, items, text: items.join("\n") });
    }
    const meta = await doc.getMetadata();
    return { pages, title: ((meta.info as Record<string, unknown>)?.Title as string | undefined) ?? null };
  } finally {
    await doc.destroy();
  }
}

/** Page `n` (1-based) rendered at `scale` × 72 dpi, as RGBA pixels. */
export async function renderPage(bytes: Uint8Array, n: number, scale: number): Promise<{ data: Uint8ClampedArray; width: number; height: number }> {
  const doc = await open(bytes);
  try {
    const page = await doc.getPage(n);
    const viewport = page.getViewport({ scale });
    const factory = doc.canvasFactory as { create(w: number, h: number): { canvas: { getContext(k: "2d"): CanvasRenderingContext2D }; context: CanvasRenderingContext2D } };
    const { context } = factory.create(Math.ceil(viewport.width), Math.ceil(viewport.height));
    await page.render({ canvasContext: context, viewport }).promise;
    const img = context.getImageData(0, 0, Math.ceil(viewport.width), Math.ceil(viewport.height));
    return { data: img.data, width: img.width, height: img.height };
  } finally {
    await doc.destroy();
  }
}

/** The fonts the app ships for its PDFs, read as the server reads them. */
export function shippedFontBytes(): FontBytes {
  const dir = path.resolve(import.meta.dirname, "../../app/fonts");
  return { regular: readFileSync(path.join(dir, "manrope-regular.ttf")), bold: readFileSync(path.join(dir, "manrope-bold.ttf")) };
}
