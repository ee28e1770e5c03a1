// Every API route, every exported method, fed what an attacker or a careless client sends:
// malformed ids in each dynamic segment, JSON of the wrong shape, huge numbers, NUL bytes, deep
// nesting, invalid JSON, bad query strings, as each kind of caller. Whatever the route says, it
// must not be a 5xx: a 500 means input reached somewhere that could not cope with it.
import { randomUUID } from "node:crypto";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { hashPassword } from "@/lib/auth/password";
import type { Role } from "@/lib/auth/permissions";
import { appUrl } from "../helpers/browser";
import { testDb } from "../helpers/db";
import { rawRequest } from "../helpers/raw-request";
import { signIn } from "../helpers/session";
import { apiRoutes, type HttpMethod } from "../helpers/routes";

const NEAR_UUID = "0000000000000000000000000000000-----";
/** Sent raw, exactly as written (a malformed %-escape must reach the server as such). */
const BAD_SEGMENTS = ["%E0%A4%A", NEAR_UUID, "%00x", "x".repeat(3000)];

const deep = (n: number) => "[".repeat(n) + "]".repeat(n);
const BAG = {
  id: NEAR_UUID,
  version: 2147483648,
  name: "a\u0000b",
  code: "\u0000",
  customer: "=cmd|' /C calc'!A0",
  notes: "x".repeat(5000),
  due_at: "294277-01-01",
  starts_at: "+294277-01-01T00:00:00Z",
  ends_at: "-000001-01-01T00:00:00Z",
  from: "294277-01-01",
  to: "0000-00-00",
  quantity: 1e308,
  priority: -99999999999,
  printer_id: NEAR_UUID,
  unit_ids: [NEAR_UUID, null, 1],
  material_id: "%00",
  email: "a@b\u0000.c",
  password: { $ne: "" },
  rows: [{ order_code: "\u0000", priority: 1e300 }],
  masses: [{ unit_id: NEAR_UUID, mass_g: -1 }],
};
/** Raw bodies: [text, content-type]. */
const BODIES: [string, string][] = [
  ["", "application/json"],
  ["{not json", "application/json"],
  ["[]", "application/json"],
  ["null", "application/json"],
  ["12345678901234567890123456789", "application/json"],
  [deep(5000), "application/json"],
  [JSON.stringify(BAG), "application/json"],
  [JSON.stringify({ ...BAG, version: "1", id: 5, name: 7, notes: ["x"] }), "application/json"],
  [JSON.stringify(Object.fromEntries(Object.keys(BAG).map((k) => [k, "\u0000"]))), "application/json"],
  [JSON.stringify(BAG), "text/plain"],
];
const FEWER_BODIES = [BODIES[7], BODIES[10]];
const QUERIES = ["", "?from=294277-01-01&to=294277-01-02&table=orders", "?page=99999999999&page_size=-1&sort=%00&dir=sideways", "?search=%00%27&id=" + NEAR_UUID + "&queue=%00", "?from=%E0%A4%A&limit=1e400"];

type Caller = "signed_out" | Role;
const CALLERS: Caller[] = ["admin", "technician", "signed_out"];

function fills(pattern: string): string[] {
  const segments = [...pattern.matchAll(/\[[^\]]+\]/g)].map((m) => m[0]);
  if (!segments.length) return [pattern];
  const out: string[] = [];
  for (let i = 0; i < segments.length; i++) {
    for (const bad of BAD_SEGMENTS) {
      let n = 0;
      out.push(pattern.replace(/\[[^\]]+\]/g, () => (n++ === i ? bad : randomUUID())));
    }
  }
  return out;
}

describe("no route answers hostile input with a 5xx", () => {
  const { db, close } = testDb();
  const cookies = new Map<Role, string>();
  const password = `rw-${randomUUID()}`;
  const stamp = Date.now().toString(36);
  const email = (role: Role) => `rw-${role}-${stamp}@test.hearth.test`;

  beforeAll(async () => {
    // Throwaway users, so that a route acting on "me" (sign-out, password, sessions) touches nobody real.
    const hash = await hashPassword(password);
    for (const role of CALLERS.filter((c): c is Role => c !== "signed_out")) {
      await db.insertInto("users").values({ email: email(role), name: `Route walker ${role}`, role, password_hash: hash }).execute();
      cookies.set(role, await signIn(email(role), password));
    }
  });
  afterAll(async () => {
    await db.updateTable("users").set({ active: false }).where("email", "like", `rw-%-${stamp}@test.hearth.test`).execute();
    await close();
  });

  it("walks every route file and method", { timeout: 420_000 }, async () => {
    const routes = apiRoutes();
    expect(routes.length).toBeGreaterThan(30);
    const jobs: { caller: Caller; method: HttpMethod; path: string; body?: [string, string] }[] = [];
    for (const r of routes) {
      for (const method of r.methods) {
        for (const caller of CALLERS) {
          const full = caller === "admin";
          const paths = fills(r.pattern);
          for (const p of full ? paths : paths.slice(0, 2)) jobs.push({ caller, method, path: p });
          const base = paths[paths.length - 1].replace(/[A-F0-9-]{36}/g, () => randomUUID());
          if (method === "GET" || method === "HEAD") {
            for (const q of full ? QUERIES : QUERIES.slice(1, 2)) jobs.push({ caller, method, path: base + q });
          } else {
            for (const b of full ? BODIES : FEWER_BODIES) jobs.push({ caller, method, path: base, body: b });
          }
        }
      }
    }

    const pending = new Map<Role, Promise<void>>();
    function relogin(role: Role): Promise<void> {
      const running = pending.get(role);
      if (running) return running;
      const p = signIn(email(role), password).then((c) => {
        cookies.set(role, c);
        pending.delete(role);
      });
      pending.set(role, p);
      return p;
    }

    const failures: string[] = [];
    let i = 0;
    const started = Date.now();
    async function worker() {
      while (i < jobs.length) {
        const job = jobs[i++];
        const headers: Record<string, string> = { "x-forwarded-for": `10.77.${Math.floor(Math.random() * 250)}.${Math.floor(Math.random() * 250)}` };
        if (job.caller !== "signed_out") headers.cookie = cookies.get(job.caller)!;
        if (job.body) {
          headers["content-type"] = job.body[1];
          headers["content-length"] = String(Buffer.byteLength(job.body[0]));
        }
        const res = await rawRequest(appUrl(), job.path, headers, job.method, job.body?.[0]);
        // The health check's "down" (503 with Retry-After) is its designed answer when a check
        // is slow, as on a loaded machine; any other 5xx, or a 503 without that body, is a fault.
        const healthDown = job.path.startsWith("/api/health") && res.status === 503 && res.bytes.toString() === '{"status":"down"}';
        if ((res.status >= 500 && !healthDown) || res.status === 0) failures.push(`${res.status} ${job.caller} ${job.method} ${job.path.slice(0, 120)} ${job.body ? job.body[0].slice(0, 60) : ""} → ${res.bytes.toString().slice(0, 160)}`);
        // Signing out ends the throwaway's session: sign in again, once per ended cookie (parallel
        // sign-ins of one account would count as guesses and be throttled).
        const set = ([] as string[]).concat(res.headers["set-cookie"] ?? []).find((c) => c.startsWith("hearth_session="));
        if (set && job.caller !== "signed_out") {
          const ended = /max-age=0/i.test(set) || set.startsWith("hearth_session=;");
          if (!ended) cookies.set(job.caller, set.split(";")[0]);
          else if (cookies.get(job.caller) === headers.cookie) await relogin(job.caller);
        }
      }
    }
    await Promise.all(Array.from({ length: 8 }, worker));
    console.log(`[route walker] ${jobs.length} requests over ${routes.reduce((n, r) => n + r.methods.length, 0)} route-and-method pairs in ${((Date.now() - started) / 1000).toFixed(1)} s`);
    expect(failures, `5xx answers:\n  ${failures.join("\n  ")}`).toEqual([]);
  });
});
