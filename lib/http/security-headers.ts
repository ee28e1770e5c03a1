// Response headers for every answer of the web server (scripts/serve.ts sets them before Next.js
// or its own direct answers write anything), and the page's Content-Security-Policy (proxy.ts,
// with a nonce per request). Sources: OWASP HTTP Headers Cheat Sheet; MDN for each header;
// Next.js 16 docs, "Content Security Policy" (nonce from proxy.ts, read back by the renderer).

export function baseSecurityHeaders(appUrl: string | undefined): Record<string, string> {
  const headers: Record<string, string> = {
    "x-content-type-options": "nosniff",
    "referrer-policy": "strict-origin-when-cross-origin",
    // The camera serves scanning travelers' codes on this site; nothing else is used.
    "permissions-policy": "camera=(self), microphone=(), geolocation=(), payment=(), usb=(), serial=(), bluetooth=(), midi=(), interest-cohort=()",
    "x-frame-options": "DENY",
  };
  // Only when the shop serves over https: sent over plain http it would be ignored anyway, and a
  // wrong one locks browsers out of a site that has no certificate.
  if ((appUrl ?? "").startsWith("https://")) headers["strict-transport-security"] = "max-age=31536000; includeSubDomains";
  return headers;
}

/**
 * The pages' policy. Scripts: only those carrying this request's nonce, and what they load
 * ('strict-dynamic'); no 'unsafe-inline'. Styles keep 'unsafe-inline': FullCalendar, recharts and
 * the three.js canvas set style attributes from script, which a nonce cannot cover (CSP Level 3
 * applies nonces to elements, not to style attributes). Workers from blob: for three.js loaders.
 */
export function contentSecurityPolicy(nonce: string, opts: { dev?: boolean } = {}): string {
  return [
    "default-src 'self'",
    `script-src 'self' 'nonce-${nonce}' 'strict-dynamic'${opts.dev ? " 'unsafe-eval'" : ""}`,
    "style-src 'self' 'unsafe-inline'",
    "img-src 'self' blob: data:",
    "font-src 'self' data:",
    "connect-src 'self'",
    "worker-src 'self' blob:",
    "media-src 'self' blob:",
    "frame-src 'self' blob:",
    "object-src 'none'",
    "base-uri 'self'",
    "form-action 'self'",
    "frame-ancestors 'none'",
  ].join("; ");
}
