// Role × route: every API route and server action, every role, against the running app.
// The table lives in tests/auth/route-permissions.ts; this file finds the routes and actions on
// disk (and in the build's action manifest) and fails for any that the table does not list.
import { existsSync, readFileSync } from "node:fs";
import path from "node:path";
import { randomUUID } from "node:crypto";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { hashPassword } from "@/lib/auth/password";
import { ROLES, can, type Role } from "@/lib/auth/permissions";
import { appUrl } from "../helpers/browser";
import { testDb } from "../helpers/db";
import { signIn } from "../helpers/session";
import { ACTION_PERMISSIONS, ROUTE_PERMISSIONS, type Gate, type HttpMethod, type RouteCheck } from "./route-permissions";
import { exportedMethods, rel, routePattern, walk } from "../helpers/routes";


const ROOT = process.cwd();
const HOW_TO = "Add it to tests/auth/route-permissions.ts with the permission its handler checks first (see the comment at the top of that file).";

/** Files whose first statement is "use server", and the async functions they export. */
function serverActionFiles(): { file: string; exports: string[] }[] {
  const files = ["app", "components", "lib"].flatMap((d) => walk(path.join(ROOT, d), (f) => /\.(ts|tsx)$/.test(f)));
  const out: { file: string; exports: string[] }[] = [];
  for (const file of files) {
    const source = readFileSync(file, "utf8");
    if (!/^(?:\s|\/\/[^\n]*\n|\/\*[\s\S]*?\*\/)*["']use server["']/.test(source)) continue;
    const exports = new Set<string>();
    for (const m of source.matchAll(/export\s+async\s+function\s+(\w+)/g)) exports.add(m[1]);
    for (const m of source.matchAll(/export\s+const\s+(\w+)\s*=\s*async\b/g)) exports.add(m[1]);
    for (const m of source.matchAll(/export\s*\{([^}]*)\}/g)) for (const p of m[1].split(",")) if (p.trim()) exports.add(p.split(/\s+as\s+/).pop()!.trim());
    out.push({ file: rel(file), exports: [...exports] });
  }
  return out;
}

type ManifestAction = { id: string; filename: string; exportedName: string; pages: string[] };

/** Every action the build knows, including inline ones, from Next's server-reference manifest. */
function manifestActions(): ManifestAction[] | null {
  const dist = process.env.NEXT_DIST_DIR ?? ".next";
  const file = path.join(ROOT, dist, "server", "server-reference-manifest.json");
  if (!existsSync(file)) return null;
  const manifest = JSON.parse(readFileSync(file, "utf8")) as { node: Record<string, { filename?: string; exportedName?: string; workers: Record<string, unknown> }> };
  return Object.entries(manifest.node).map(([id, v]) => ({ id, filename: v.filename ?? "?", exportedName: v.exportedName ?? "?", pages: Object.keys(v.workers) }));
}

const routeFiles = walk(path.join(ROOT, "app", "api"), (f) => /[\\/]route\.(ts|tsx|js)$/.test(f));
const routes = routeFiles.map((file) => ({ file: rel(file), pattern: routePattern(file), methods: exportedMethods(readFileSync(file, "utf8")) }));

const gateOf = (check: RouteCheck): Gate => (typeof check === "string" ? check : check.gate);

type Caller = "signed_out" | Role;
const CALLERS: Caller[] = ["signed_out", ...ROLES];

/** What each caller must get from a gate: 401, 403, or through (anything but 401/403 and no 500). */
function expected(gate: Gate, caller: Caller): "401" | "403" | "through" {
  if (gate === "public") return "through";
  if (caller === "signed_out") return "401";
  if (gate === "signed_in") return "through";
  return can(caller, gate) ? "through" : "403";
}

/** Enough of an answer to see why it was wrong. */
function brief(res: Response, text: string): string {
  if ((res.headers.get("content-type") ?? "").includes("text/html")) return `(an HTML page${res.headers.get("location") ? ` → ${res.headers.get("location")}` : ""})`;
  return text.slice(0, 160);
}

function fill(pattern: string): string {
  return pattern.replace(/\[\.\.\.[^\]]+\]|\[[^\]]+\]/g, () => randomUUID());
}

describe("role × route table", () => {
  it("has an entry for every route file and exported method", () => {
    expect(routes.length, "no route files found under app/api").toBeGreaterThan(5);
    const missing: string[] = [];
    for (const r of routes) {
      if (r.methods.length === 0) missing.push(`${r.file}: exports no HTTP method the test can see`);
      for (const m of r.methods) if (!ROUTE_PERMISSIONS[r.pattern]?.[m]) missing.push(`${m} ${r.pattern} (${r.file})`);
    }
    expect(missing, `Routes without a permission entry. ${HOW_TO}\n  ${missing.join("\n  ")}\n`).toEqual([]);
  });

  it("lists no route or method that no longer exists", () => {
    const stale: string[] = [];
    for (const [pattern, methods] of Object.entries(ROUTE_PERMISSIONS)) {
      const r = routes.find((x) => x.pattern === pattern);
      for (const m of Object.keys(methods) as HttpMethod[]) if (!r?.methods.includes(m)) stale.push(`${m} ${pattern}`);
    }
    expect(stale, `Entries in tests/auth/route-permissions.ts for routes that are gone; remove them:\n  ${stale.join("\n  ")}\n`).toEqual([]);
  });

  it("has an entry for every exported server action", () => {
    const missing: string[] = [];
    for (const f of serverActionFiles()) for (const e of f.exports) if (!ACTION_PERMISSIONS[f.file]?.[e]) missing.push(`${e} in ${f.file}`);
    for (const a of manifestActions() ?? []) if (!ACTION_PERMISSIONS[a.filename]?.[a.exportedName]) missing.push(`${a.exportedName} in ${a.filename} (from the build's action manifest)`);
    expect(missing, `Server actions without a permission entry in ACTION_PERMISSIONS. ${HOW_TO}\n  ${[...new Set(missing)].join("\n  ")}\n`).toEqual([]);
  });

  it("reads route methods however they are exported", () => {
    expect(exportedMethods("export async function GET() {}\nexport const POST = handler;")).toEqual(["GET", "POST"]);
    expect(exportedMethods("export const { GET, POST } = collectionHandlers({})")).toEqual(["GET", "POST"]);
    expect(exportedMethods("export { handler as PATCH, other as DELETE };")).toEqual(["PATCH", "DELETE"]);
    expect(exportedMethods("// export async function PUT() {}\nexport const dynamic = 'force-dynamic'")).toEqual([]);
    expect(routePattern(path.join(ROOT, "app/api/(x)/users/[id]/route.ts"))).toBe("/api/users/[id]");
  });
});

describe("each role gets exactly its permission, against the running app", () => {
  const { db, close } = testDb();
  const cookies = new Map<Role, string>();
  const password = `rp-${randomUUID()}`;
  const stamp = Date.now().toString(36);

  beforeAll(async () => {
    // Throwaway users, one per role, so that a route that acts on "me" touches nobody real.
    const hash = await hashPassword(password);
    for (const role of ROLES) {
      const email = `rp-${role}-${stamp}@test.hearth.test`;
      await db.insertInto("users").values({ email, name: `Route check ${role}`, role, password_hash: hash }).execute();
      cookies.set(role, await signIn(email, password));
    }
  });
  afterAll(async () => {
    await db.updateTable("users").set({ active: false }).where("email", "like", `rp-%-${stamp}@test.hearth.test`).execute();
    await close();
  });

  /** Keeps a role's cookie current when a route re-issues it (the proxy's renewal, "sign out elsewhere"). */
  async function remember(caller: Caller, res: Response) {
    if (caller === "signed_out") return;
    const set = res.headers.getSetCookie().find((c) => c.startsWith("hearth_session="));
    if (!set) return;
    // Signing out ends the session on the server too: the role signs in again for the next route.
    if (/max-age=0/i.test(set) || set.startsWith("hearth_session=;")) cookies.set(caller, await signIn(`rp-${caller}-${stamp}@test.hearth.test`, password));
    else cookies.set(caller, set.split(";")[0]);
  }

  async function call(caller: Caller, method: HttpMethod, url: string, body: string | Record<string, unknown> | null | undefined, stream = false) {
    const headers: Record<string, string> = { "x-forwarded-for": `10.9.${Math.floor(Math.random() * 250)}.${Math.floor(Math.random() * 250)}` };
    if (caller !== "signed_out") headers.cookie = cookies.get(caller)!;
    let payload: string | undefined;
    if (method !== "GET" && method !== "HEAD" && method !== "DELETE" && body !== null) {
      payload = typeof body === "object" && body ? JSON.stringify(body) : (body ?? "{not json");
      headers["content-type"] = "application/json";
    }
    const res = await fetch(`${appUrl()}${url}`, { method, headers, body: payload, redirect: "manual" });
    await remember(caller, res);
    if (stream && res.ok) {
      await res.body?.cancel();
      return { status: res.status, text: "(stream)" };
    }
    return { status: res.status, text: brief(res, await res.text()) };
  }

  for (const [pattern, methods] of Object.entries(ROUTE_PERMISSIONS)) {
    for (const [method, check] of Object.entries(methods) as [HttpMethod, RouteCheck][]) {
      const gate = gateOf(check);
      it(`${method} ${pattern} – ${gate}`, async () => {
        const url = typeof check === "object" && check.path ? check.path : fill(pattern);
        const body = typeof check === "object" ? check.body : undefined;
        const stream = typeof check === "object" && check.stream === true;
        const results = await Promise.all(CALLERS.map(async (caller) => ({ caller, ...(await call(caller, method, url, body, stream)) })));
        const wrong: string[] = [];
        for (const r of results) {
          const want = expected(gate, r.caller);
          const ok = want === "401" ? r.status === 401 : want === "403" ? r.status === 403 : r.status !== 401 && r.status !== 403 && r.status < 500;
          if (!ok) wrong.push(`${r.caller}: wanted ${want === "through" ? "neither 401 nor 403 (and no 500)" : want}, got ${r.status} ${r.text}`);
        }
        expect(wrong, `${method} ${url}\n  ${wrong.join("\n  ")}`).toEqual([]);
      });
    }
  }

  const actions = manifestActions();
  for (const [file, exported] of Object.entries(ACTION_PERMISSIONS)) {
    for (const [name, gate] of Object.entries(exported)) {
      it(`action ${name} (${file}) – ${gate}`, async () => {
        expect(actions, "the build's server-reference-manifest.json was not found (NEXT_DIST_DIR)").not.toBeNull();
        const action = actions!.find((a) => a.filename === file && a.exportedName === name);
        expect(action, `${name} is not in the build's action manifest: is it used by a page?`).toBeDefined();
        const page = action!.pages.find((p) => p.endsWith("/page")) ?? action!.pages[0];
        const pagePath = fill(`/${page.split("/").slice(1, -1).filter((p) => !/^\(.*\)$/.test(p)).join("/")}`);
        const wrong: string[] = [];
        for (const caller of CALLERS) {
          // The form's arguments as React sends them: (previous state, an empty FormData).
          const form = new FormData();
          form.append("0", JSON.stringify([{ ok: false }, "$K1"]));
          const headers: Record<string, string> = { "Next-Action": action!.id, Origin: appUrl(), Accept: "text/x-component" };
          if (caller !== "signed_out") headers.cookie = cookies.get(caller)!;
          const res = await fetch(`${appUrl()}${pagePath}`, { method: "POST", headers, body: form, redirect: "manual" });
          remember(caller, res);
          const text = await res.text();
          const got = /"code":"unauthenticated"/.test(text) ? "401" : /"code":"forbidden"/.test(text) ? "403" : res.status >= 500 ? "500" : "through";
          const want = expected(gate, caller);
          if (got !== want) wrong.push(`${caller}: wanted ${want}, got ${got} (${res.status} ${brief(res, text)})`);
        }
        expect(wrong, `action ${name} via POST ${pagePath}\n  ${wrong.join("\n  ")}`).toEqual([]);
      });
    }
  }
});
