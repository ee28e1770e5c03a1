import { PDFDocument, StandardFonts, rgb } from "pdf-lib";
import { fit, safe } from "@/lib/builds/traveler";
import { formatMoney } from "./money";

// The quote a customer receives: one A4 page (more when the lines run over) with the lines,
// their prices, the total, how long the offer stands and when the parts can be had.

export type QuotePdfInput = {
  shop_name: string;
  code: string;
  customer: string;
  contact_email: string;
  currency: string;
  minor_digits: number;
  lines: Array<{ name: string; material: string; quantity: number; unit_price_minor: number; total_minor: number; finishing: string; requested: string | null }>;
  setup_minor: number;
  total_minor: number;
  valid_until: Date;
  promise_at: Date;
  promise_p90_at: Date;
  time_zone: string;
  notes: string;
  issued_at: Date;
};

const INK = rgb(0.106, 0.098, 0.086);
const MUTED = rgb(0.435, 0.396, 0.341);
const CLAY = rgb(0.659, 0.31, 0.165);
const LINE = rgb(0.827, 0.804, 0.769);

const day = (d: Date, tz: string) => new Intl.DateTimeFormat("en-GB", { timeZone: tz, dateStyle: "long" }).format(d);

export async function quotePdf(input: QuotePdfInput): Promise<Uint8Array> {
  const doc = await PDFDocument.create();
  doc.setTitle(`Quote ${input.code}`);
  doc.setCreator("Hearth");
  doc.setCreationDate(input.issued_at);
  const font = await doc.embedFont(StandardFonts.Helvetica);
  const bold = await doc.embedFont(StandardFonts.HelveticaBold);
  const money = (minor: number) => safe(formatMoney(minor, input.currency, input.minor_digits));
  let page = doc.addPage([595.28, 841.89]);
  const { width, height } = page.getSize();
  const m = 40;
  const text = (t: string, x: number, y: number, size = 10, f = font, color = INK) => page.drawText(safe(t), { x, y, size, font: f, color });
  const right = (t: string, xRight: number, y: number, size = 10, f = font) => {
    const s = safe(t);
    page.drawText(s, { x: xRight - f.widthOfTextAtSize(s, size), y, size, font: f, color: INK });
  };

  text(input.shop_name, m, height - m - 4, 10, bold, CLAY);
  text("Quotation", m, height - m - 30, 22, bold);
  text(input.code, m, height - m - 56, 16, bold, CLAY);
  const facts: Array<[string, string]> = [
    ["Customer", input.customer],
    ["Contact", input.contact_email],
    ["Issued", day(input.issued_at, input.time_zone)],
    ["Valid until", day(input.valid_until, input.time_zone)],
    ["Earliest completion", day(input.promise_at, input.time_zone)],
    ["Completion, 9 in 10 chance by", day(input.promise_p90_at, input.time_zone)],
  ];
  let y = height - m - 84;
  for (const [k, v] of facts) {
    text(k, m, y, 9, font, MUTED);
    text(fit(font, v, 10, width - 2 * m - 170), m + 170, y, 10, bold);
    y -= 15;
  }
  y -= 12;
  const cols = { name: m, material: m + 180, qty: m + 300, unit: m + 400, total: width - m };
  const header = () => {
    page.drawLine({ start: { x: m, y: y + 12 }, end: { x: width - m, y: y + 12 }, thickness: 0.6, color: LINE });
    text("Part", cols.name, y, 8, bold, MUTED);
    text("Material", cols.material, y, 8, bold, MUTED);
    text("Qty", cols.qty, y, 8, bold, MUTED);
    right("Unit price", cols.unit + 50, y, 8, bold);
    right("Line total", cols.total, y, 8, bold);
    y -= 16;
  };
  header();
  for (const l of input.lines) {
    if (y < 140) {
      page = doc.addPage([595.28, 841.89]);
      y = height - m - 20;
      header();
    }
    text(fit(bold, l.name, 9, 175), cols.name, y, 9, bold);
    text(fit(font, l.material, 9, 115), cols.material, y, 9);
    text(String(l.quantity), cols.qty, y, 9);
    right(money(l.unit_price_minor), cols.unit + 50, y, 9);
    right(money(l.total_minor), cols.total, y, 9, bold);
    y -= 12;
    const sub = [l.finishing, l.requested ? `requested by ${l.requested}` : ""].filter(Boolean).join(" · ");
    if (sub) {
      text(fit(font, sub, 8, width - 2 * m), cols.name, y, 8, font, MUTED);
      y -= 12;
    }
    page.drawLine({ start: { x: m, y: y + 6 }, end: { x: width - m, y: y + 6 }, thickness: 0.3, color: LINE });
    y -= 6;
  }
  y -= 6;
  text("Set-up (once per order)", cols.unit - 120, y, 9, font, MUTED);
  right(money(input.setup_minor), cols.total, y, 9);
  y -= 16;
  text("Total", cols.unit - 120, y, 12, bold);
  right(`${money(input.total_minor)}`, cols.total, y, 12, bold);
  y -= 14;
  text(`Amounts in ${input.currency}, excluding taxes and shipping.`, cols.unit - 120, y, 8, font, MUTED);
  y -= 24;
  if (input.notes) {
    text(fit(font, input.notes, 9, width - 2 * m), m, y, 9);
    y -= 16;
  }
  const terms = [
    "Completion dates are planned against the shop's current schedule and are confirmed when the order is placed.",
    "The 9-in-10 date allows for the spread of past print, wash and furnace durations.",
  ];
  for (const t of terms) {
    text(fit(font, t, 8, width - 2 * m), m, y, 8, font, MUTED);
    y -= 12;
  }
  text(`${input.shop_name} · quote ${input.code}`, m, 36, 7, font, MUTED);
  return doc.save();
}
