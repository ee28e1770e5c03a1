import { PDFDocument, StandardFonts, rgb } from "pdf-lib";
import { drawQr, safe } from "@/lib/builds/traveler";

// The container label: 100 × 62 mm, the size of a common roll label, with the lot's code in
// large type, what it is, its dates and a QR code that opens the lot in Hearth.

export type LabelInput = {
  url: string;
  code: string;
  material: string;
  supplier: string;
  supplier_lot: string;
  form: string | null;
  received_on: string;
  expires_on: string | null;
  quantity_kg: number;
  state: string;
};

const MM = 72 / 25.4;
const INK = rgb(0.106, 0.098, 0.086);
const MUTED = rgb(0.435, 0.396, 0.341);

export async function lotLabelPdf(l: LabelInput): Promise<Uint8Array> {
  const doc = await PDFDocument.create();
  doc.setTitle(`Feedstock lot ${l.code}`);
  const page = doc.addPage([100 * MM, 62 * MM]);
  const bold = await doc.embedFont(StandardFonts.HelveticaBold);
  const regular = await doc.embedFont(StandardFonts.Helvetica);
  const qr = 40 * MM;
  drawQr(page, l.url, page.getWidth() - qr - 3 * MM, (page.getHeight() - qr) / 2, qr);
  let y = page.getHeight() - 9 * MM;
  page.drawText(safe(l.code), { x: 4 * MM, y, size: 18, font: bold, color: INK });
  y -= 6 * MM;
  page.drawText(safe(l.material), { x: 4 * MM, y, size: 9, font: bold, color: INK, maxWidth: 52 * MM });
  const lines = [
    `${l.supplier} lot ${l.supplier_lot}`,
    l.form ?? "",
    `Received ${l.received_on}`,
    l.expires_on ? `Use by ${l.expires_on}` : "No shelf life given",
    `${l.quantity_kg.toLocaleString("en-GB", { maximumFractionDigits: 1 })} kg received`,
  ].filter(Boolean);
  for (const line of lines) {
    y -= 4.6 * MM;
    page.drawText(safe(line), { x: 4 * MM, y, size: 7.5, font: regular, color: MUTED, maxWidth: 52 * MM });
  }
  page.drawText(safe(l.state === "quarantine" ? "QUARANTINE - do not print from" : "Scan to open the lot"), { x: 4 * MM, y: 4 * MM, size: 7, font: bold, color: INK });
  return doc.save();
}
