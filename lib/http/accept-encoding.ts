// Content negotiation for the bodies the web server sends itself (the floor window, the build's
// static files).

/**
 * Whether an Accept-Encoding header (RFC 9110 §12.5.3) takes gzip: listed, or covered by "*",
 * with a weight above zero.
 */
export function acceptsGzip(header: string | null | undefined): boolean {
  if (!header) return false;
  let gzip: number | undefined;
  let star: number | undefined;
  for (const part of header.split(",")) {
    const [token, ...params] = part.toLowerCase().split(";").map((p) => p.trim());
    const qParam = params.find((p) => p.startsWith("q="));
    const q = qParam ? Number(qParam.slice(2)) : 1;
    const weight = Number.isFinite(q) ? q : 0;
    if (token === "gzip" || token === "x-gzip") gzip = weight;
    else if (token === "*") star = weight;
  }
  return (gzip ?? star ?? 0) > 0;
}
