// The API's routes as the file system holds them: shared by the role × route table test and the
// hostile-input route walker.
import { existsSync, readFileSync, readdirSync, statSync } from "node:fs";
import path from "node:path";

export type HttpMethod = "GET" | "HEAD" | "POST" | "PUT" | "PATCH" | "DELETE" | "OPTIONS";
export const METHODS: HttpMethod[] = ["GET", "HEAD", "POST", "PUT", "PATCH", "DELETE", "OPTIONS"];

const ROOT = process.cwd();

export function walk(dir: string, match: (file: string) => boolean, out: string[] = []): string[] {
  if (!existsSync(dir)) return out;
  for (const name of readdirSync(dir)) {
    const full = path.join(dir, name);
    if (name === "node_modules" || name.startsWith(".")) continue;
    if (statSync(full).isDirectory()) walk(full, match, out);
    else if (match(full)) out.push(full);
  }
  return out;
}

export const rel = (file: string) => path.relative(ROOT, file).split(path.sep).join("/");

/** app/api/(x)/users/[id]/route.ts → /api/users/[id] */
export function routePattern(file: string): string {
  const parts = rel(file).split("/").slice(1, -1).filter((p) => !/^\(.*\)$/.test(p));
  return `/${parts.join("/")}`;
}

/** The HTTP methods a route module exports, however it spells the export. */
export function exportedMethods(source: string): HttpMethod[] {
  const found = new Set<string>();
  const text = source.replace(/\/\*[\s\S]*?\*\//g, "").replace(/\/\/.*$/gm, "");
  for (const m of text.matchAll(/export\s+(?:async\s+)?function\s+([A-Z]+)\b/g)) found.add(m[1]);
  for (const m of text.matchAll(/export\s+(?:const|let|var)\s+([A-Z]+)\s*[=:]/g)) found.add(m[1]);
  for (const m of text.matchAll(/export\s+(?:const|let|var)\s*\{([^}]*)\}\s*=/g)) {
    for (const part of m[1].split(",")) {
      const name = part.split(":").pop()!.split("=")[0].trim();
      if (name) found.add(name);
    }
  }
  for (const m of text.matchAll(/export\s*\{([^}]*)\}/g)) {
    for (const part of m[1].split(",")) {
      const name = part.split(/\s+as\s+/).pop()!.trim();
      if (name) found.add(name);
    }
  }
  return METHODS.filter((x) => found.has(x));
}

/** Every app/api/**\/route.ts with its URL pattern and exported methods. */
export function apiRoutes(): { file: string; pattern: string; methods: HttpMethod[] }[] {
  return walk(path.join(ROOT, "app", "api"), (f) => /[\\/]route\.(ts|tsx|js)$/.test(f)).map((file) => ({
    file: rel(file),
    pattern: routePattern(file),
    methods: exportedMethods(readFileSync(file, "utf8")),
  }));
}
