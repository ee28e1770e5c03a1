// The request target as the client sent it, checked before the framework sees it.

/**
 * Whether every %-escape in the request target's path decodes (RFC 3986 §2.1 with UTF-8). Next.js
 * decodes the path while routing, before any handler runs, and a malformed escape such as
 * "/api/builds/%E0%A4%A" made it answer 500; scripts/serve.ts answers 400 instead.
 */
export function pathDecodes(target: string): boolean {
  const q = target.indexOf("?");
  const path = q < 0 ? target : target.slice(0, q);
  if (!path.includes("%")) return true;
  try {
    decodeURIComponent(path);
    return true;
  } catch {
    return false;
  }
}
