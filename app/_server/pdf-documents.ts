import { readFile } from "node:fs/promises";
import path from "node:path";
import { getEnv } from "@/lib/env";
import { pdfFileName } from "@/lib/pdf/file-name";
import type { FontBytes } from "@/lib/pdf/shop-fonts";

// What every printable document's handler shares: the embedded font files (read once per
// process from the app's own fonts folder, never fetched), the paper asked for, the address a
// printed QR code opens, and the answer itself. (Each handler parses ?paper= itself with
// lib/pdf/paper.ts's schema, so the API description can name it.)

let fonts: Promise<FontBytes> | null = null;

/** app/fonts/manrope-{regular,bold}.ttf (see app/fonts/README.md); the server runs from the project folder. */
export function pdfFontBytes(): Promise<FontBytes> {
  if (!fonts) {
    const dir = path.join(process.cwd(), "app", "fonts");
    fonts = Promise.all([readFile(path.join(dir, "manrope-regular.ttf")), readFile(path.join(dir, "manrope-bold.ttf"))]).then(([regular, bold]) => ({ regular, bold }));
    fonts.catch(() => {
      fonts = null;
    });
  }
  return fonts;
}

/** The address a printed QR code carries: the shop's public APP_URL (else this request's origin) and the page's path. */
export function printedPageUrl(req: Request, pagePath: string): string {
  const base = getEnv().APP_URL || new URL(req.url).origin;
  return `${base.replace(/\/$/, "")}${pagePath}`;
}

/** The PDF inline (the browser's viewer opens it), under a file name made safe from the codes in it. */
export function pdfResponse(bytes: Uint8Array, ...nameParts: string[]): Response {
  return new Response(Buffer.from(bytes), {
    headers: {
      "content-type": "application/pdf",
      "content-disposition": `inline; filename="${pdfFileName(...nameParts)}"`,
      "cache-control": "no-store",
    },
  });
}
