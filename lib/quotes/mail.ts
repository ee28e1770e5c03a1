import { formatMoney } from "./money";

// The e-mail that carries a quote PDF to the customer. Plain words; the PDF holds the detail.

const esc = (s: string) => s.replace(/[&<>"']/g, (c) => ({ "&": "&amp;", "<": "&lt;", ">": "&gt;", '"': "&quot;", "'": "&#39;" })[c]!);

export type QuoteMailData = {
  shop_name: string;
  code: string;
  customer: string;
  total_minor: number;
  currency: string;
  minor_digits: number;
  valid_until: string;
  promise: string;
};

export function quoteMail(d: QuoteMailData): { subject: string; text: string; html: string } {
  const total = formatMoney(d.total_minor, d.currency, d.minor_digits);
  const subject = `Quotation ${d.code} from ${d.shop_name}`;
  const lines = [
    `Dear ${d.customer},`,
    "",
    `please find our quotation ${d.code} attached: ${total} in total, earliest completion ${d.promise}.`,
    `The offer stands until ${d.valid_until}. Reply to this message to place the order.`,
    "",
    d.shop_name,
  ];
  return { subject, text: lines.join("\n"), html: lines.map((l) => (l ? `<p>${esc(l)}</p>` : "")).join("") };
}
