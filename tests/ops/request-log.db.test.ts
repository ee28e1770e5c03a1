// The request id: a failing request's body names the id of its X-Request-Id header, and the web
// server's JSON log line for it (status, user) carries the same id, so that an operator can go
// from a user's "something went wrong" to the log.
import fs from "node:fs";
import path from "node:path";
import { beforeAll, expect, it } from "vitest";
import { api, DEMO, signIn } from "../helpers/session";
import { stackLogDir, waitUntil } from "../helpers/spare-stack";

type Line = { level: string; msg: string; req_id?: string; method?: string; path?: string; status?: number; ms?: number; user_id?: string | null };

const logLines = (): Line[] =>
  fs
    .readFileSync(path.join(stackLogDir(), "app.log"), "utf8")
    .split("\n")
    .filter((l) => l.startsWith("{"))
    .map((l) => JSON.parse(l) as Line);

const lineFor = (id: string) => waitUntil(`the log line of ${id}`, async () => logLines().find((l) => l.req_id === id && l.msg === "request"), 5_000, 100);

let cookie: string;
beforeAll(async () => {
  cookie = await signIn(DEMO.admin);
});

it("returns the request id in the header and the error body, and logs it with status and user", async () => {
  const res = await api("/api/orders", { method: "POST", cookie, body: "{not json", headers: { "content-type": "application/json" } });
  expect(res.status).toBe(400);
  const id = res.headers.get("x-request-id");
  expect(id).toMatch(/^[0-9a-f-]{36}$/);
  expect(res.body.error.request_id).toBe(id);
  const line = await lineFor(id!);
  expect(line).toMatchObject({ level: "info", method: "POST", path: "/api/orders", status: 400 });
  expect(line.user_id).toMatch(/^[0-9a-f-]{36}$/);
  expect(line.ms).toBeGreaterThanOrEqual(0);
});

it("keeps a sane incoming X-Request-Id and replaces one that is not", async () => {
  const kept = await api("/api/orders/not-a-uuid", { cookie, headers: { "x-request-id": "proxy-7f3a9c:42" } });
  expect(kept.status).toBeGreaterThanOrEqual(400);
  expect(kept.headers.get("x-request-id")).toBe("proxy-7f3a9c:42");
  expect(kept.body.error.request_id).toBe("proxy-7f3a9c:42");
  expect(await lineFor("proxy-7f3a9c:42")).toMatchObject({ path: "/api/orders/not-a-uuid", status: kept.status });

  const odd = "x\"} injected {\"a\":1 " + "y".repeat(300);
  const replaced = await api("/api/me", { headers: { "x-request-id": odd } });
  expect(replaced.status).toBe(401);
  const id = replaced.headers.get("x-request-id");
  expect(id).not.toBe(odd);
  expect(id).toMatch(/^[0-9a-f-]{36}$/);
  expect(replaced.body.error.request_id).toBe(id);
  expect(await lineFor(id!)).toMatchObject({ status: 401, user_id: null });
});

it("gives a successful request an id and a log line too", async () => {
  const res = await fetch(`${process.env.APP_URL}/api/health`);
  const id = res.headers.get("x-request-id");
  expect(id).toBeTruthy();
  expect(await lineFor(id!)).toMatchObject({ method: "GET", path: "/api/health", status: res.status });
});
