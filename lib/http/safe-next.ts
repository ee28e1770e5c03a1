// The way back after sign-in ("?next=…") may only lead to a page of this site. Checking for a
// leading "//" is not enough: browsers read "/\evil.example" and "/<tab>/evil.example" as
// "//evil.example" (the WHATWG URL standard treats "\" as "/" in special schemes and strips tab
// and newline from any URL), so the value is parsed the way a browser will and its origin
// compared, and backslashes and control characters are refused outright.

const BASE = "http://hearth.invalid";

/** A same-origin path ("/floor?week=2"), or "" when the value could lead anywhere else. */
export function safeNextPath(next: unknown): string {
  if (typeof next !== "string" || next.length === 0 || next.length > 2000) return "";
  if (!next.startsWith("/") || next.startsWith("//")) return "";
  // Backslashes and C0 controls, DEL, and their %-escaped forms (a second decoding elsewhere
  // must not turn them into "//" either).
  if (/[\\\u0000-\u001f\u007f]/.test(next) || /%(5c|0[0-9a-f]|1[0-9a-f]|7f)/i.test(next)) return "";
  let url: URL;
  try {
    url = new URL(next, BASE);
  } catch {
    return "";
  }
  if (url.origin !== BASE) return "";
  return `${url.pathname}${url.search}${url.hash}`;
}
