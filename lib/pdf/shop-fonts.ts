import fontkit from "@pdf-lib/fontkit";
import type { PDFDocument, PDFFont } from "pdf-lib";

// The shop's PDF typeface, embedded (not one of the 14 standard PDF fonts, whose WinAnsi encoding
// cannot print "Łódź", "İzmir", "Σίγμα" or "Жуков"). The caller hands in the TrueType bytes
// (app/fonts/manrope-*.ttf, read by app/_server/pdf-fonts.ts) so this module stays pure.

export type FontBytes = { regular: Uint8Array; bold: Uint8Array };

export type ShopFonts = { regular: PDFFont; bold: PDFFont };

export async function embedShopFonts(doc: PDFDocument, bytes: FontBytes): Promise<ShopFonts> {
  doc.registerFontkit(fontkit);
  // subset: only the glyphs the document uses go into its FontFile2, a few kB instead of ~100 kB a face.
  const [regular, bold] = await Promise.all([doc.embedFont(bytes.regular, { subset: true }), doc.embedFont(bytes.bold, { subset: true })]);
  return { regular, bold };
}

const charsets = new WeakMap<PDFFont, Set<number>>();

/**
 * The text as the font can print it: line breaks and tabs become spaces, and a character the
 * font has no glyph for (CJK, emoji) becomes "?" rather than an empty box that reads as nothing.
 */
export function printable(font: PDFFont, text: string): string {
  let set = charsets.get(font);
  if (!set) {
    set = new Set(font.getCharacterSet());
    charsets.set(font, set);
  }
  let out = "";
  for (const ch of text.normalize("NFC").replace(/[\r\n\t]+/g, " ")) {
    const cp = ch.codePointAt(0)!;
    out += cp < 0x20 || (cp >= 0x7f && cp < 0xa0) ? "" : set.has(cp) ? ch : "?";
  }
  return out;
}

/** The text cut with an ellipsis to fit a width (points). */
export function fitText(font: PDFFont, text: string, size: number, width: number): string {
  const t = printable(font, text);
  if (font.widthOfTextAtSize(t, size) <= width) return t;
  const chars = [...t];
  while (chars.length > 1 && font.widthOfTextAtSize(`${chars.join("")}…`, size) > width) chars.pop();
  return `${chars.join("")}…`;
}

/** The text broken into lines no wider than width (points), at spaces; a word too long is cut. */
export function wrapText(font: PDFFont, text: string, size: number, width: number): string[] {
  const lines: string[] = [];
  let line = "";
  for (const word of printable(font, text).split(/ +/)) {
    const next = line ? `${line} ${word}` : word;
    if (font.widthOfTextAtSize(next, size) <= width) line = next;
    else {
      if (line) lines.push(line);
      line = font.widthOfTextAtSize(word, size) <= width ? word : fitText(font, word, size, width);
    }
  }
  if (line) lines.push(line);
  return lines;
}

/**
 * A code (unit serial, run code) that must print whole, never cut: the largest size from maxSize
 * down to minSize at which it fits on one line, else at minSize broken over lines, after a dash
 * where one falls near the end of the line.
 */
export function codeLines(font: PDFFont, code: string, width: number, maxSize: number, minSize: number): { size: number; lines: string[] } {
  const t = printable(font, code);
  for (let size = maxSize; size >= minSize; size -= 0.5) {
    if (font.widthOfTextAtSize(t, size) <= width) return { size, lines: [t] };
  }
  const lines: string[] = [];
  let rest = [...t];
  while (rest.length) {
    let n = rest.length;
    while (n > 1 && font.widthOfTextAtSize(rest.slice(0, n).join(""), minSize) > width) n--;
    if (n < rest.length) {
      const dash = rest.slice(0, n).lastIndexOf("-");
      if (dash >= n / 2) n = dash + 1;
    }
    lines.push(rest.slice(0, n).join(""));
    rest = rest.slice(n);
  }
  return { size: minSize, lines };
}
