// The OpenAPI description against the route files themselves: every handler on disk is described,
// nothing is described that no handler serves, and each documented body or query schema is the very
// zod object the handler parses (compared by identity after importing the module the route imports
// it from), so a description cannot drift from what the route validates.
import path from "node:path";
import { describe, expect, it } from "vitest";
import { z } from "zod";
import { API_OPERATIONS, type ApiOperation } from "@/lib/api/operations";
import { inputJsonSchema, openApiDocument, openApiPath, operationId, scopesFor } from "@/lib/api/openapi";
import { ROUTE_PERMISSIONS } from "../auth/route-permissions";
import { apiContracts, type SchemaUse } from "../helpers/route-contract";

const ROOT = process.cwd();
const contracts = apiContracts();
const key = (method: string, pattern: string) => `${method} ${pattern}`;
const byKey = new Map(API_OPERATIONS.map((op) => [key(op.method, op.path), op]));

async function resolveSchema(use: SchemaUse, routeFile: string): Promise<unknown> {
  if (!use.from) return undefined;
  const spec = use.from.startsWith("@/") ? path.join(ROOT, use.from.slice(2)) : path.resolve(ROOT, path.dirname(routeFile), use.from);
  const mod = (await import(/* @vite-ignore */ spec)) as Record<string, unknown>;
  return mod[use.exported];
}

const documented = (op: ApiOperation) => [op.body, op.query, op.csvRow].filter(Boolean);

describe("every route handler is described", () => {
  it("finds the handlers on disk", () => {
    expect(contracts.length).toBeGreaterThan(50);
  });

  it("describes each exported method of each route file, and nothing else", () => {
    const onDisk = contracts.flatMap((r) => r.handlers.map((h) => key(h.method, r.pattern)));
    const missing = onDisk.filter((k) => !byKey.has(k));
    const stale = [...byKey.keys()].filter((k) => !onDisk.includes(k));
    expect(missing, "handlers with no line in lib/api/operations.ts").toEqual([]);
    expect(stale, "lines in lib/api/operations.ts with no handler").toEqual([]);
    expect(API_OPERATIONS.length, "one line per handler").toBe(byKey.size);
  });

  it("documents the permission each handler checks first, as the role × route table has it", () => {
    const wrong: string[] = [];
    for (const op of API_OPERATIONS) {
      const check = ROUTE_PERMISSIONS[op.path]?.[op.method];
      const gate = typeof check === "string" ? check : check?.gate;
      if (gate !== op.gate) wrong.push(`${op.method} ${op.path}: described ${op.gate}, table ${gate}`);
    }
    expect(wrong).toEqual([]);
  });
});

/** What differs between the handlers on disk and a list of operations: the check, as a function, so it can be tried on a wrong list too. */
async function schemaProblems(operations: readonly ApiOperation[]): Promise<string[]> {
  const ops = new Map(operations.map((op) => [key(op.method, op.path), op]));
  const problems: string[] = [];
  for (const r of contracts) {
    for (const h of r.handlers) {
      const op = ops.get(key(h.method, r.pattern));
      if (!op) continue; // reported by the coverage check
      const used: unknown[] = [];
      for (const use of h.schemas) {
        if (!use.from) {
          problems.push(`${h.method} ${r.pattern}: ${use.name} is defined in the route file; move it to lib/ so the description can import it`);
          continue;
        }
        const schema = await resolveSchema(use, r.file);
        if (!(schema instanceof z.ZodType)) continue; // a parse() of something that is not a zod schema
        used.push(schema);
        if (use.input === "body" && op.body !== schema) problems.push(`${h.method} ${r.pattern}: parses its body with ${use.exported} (${use.from}); the description says otherwise`);
      }
      const docs = documented(op);
      for (const d of docs) if (!used.includes(d)) problems.push(`${h.method} ${r.pattern}: the description documents a schema the handler does not parse`);
      for (const u of used) if (!docs.includes(u as z.ZodType)) problems.push(`${h.method} ${r.pattern}: the handler parses a schema the description does not document`);
      if (JSON.stringify(h.answers ?? null) !== JSON.stringify(op.answers ? [...op.answers].sort() : null)) {
        problems.push(`${h.method} ${r.pattern}: answers with ${JSON.stringify(h.answers)}, described ${JSON.stringify(op.answers ?? null)}`);
      }
    }
  }
  return problems;
}

describe("documented schemas are the ones the handlers validate with", () => {
  it("each schema a handler parses is imported from lib and is the object described for it; fixed answers have the described keys", async () => {
    expect(await schemaProblems(API_OPERATIONS)).toEqual([]);
  });

  it("catches drift: a copy of the schema, a missing query schema, a changed answer", async () => {
    const orders = API_OPERATIONS.find((o) => o.method === "POST" && o.path === "/api/orders")!;
    const floor = API_OPERATIONS.find((o) => o.method === "GET" && o.path === "/api/floor")!;
    const tokens = API_OPERATIONS.find((o) => o.method === "GET" && o.path === "/api/api-tokens")!;
    const wrong = API_OPERATIONS.map((o) =>
      o === orders ? { ...o, body: z.object((orders.body as z.ZodObject).shape) } // equal in shape, not the same object
        : o === floor ? { ...o, query: undefined }
          : o === tokens ? { ...o, answers: ["tokens", "count"] }
            : o,
    );
    const problems = await schemaProblems(wrong);
    expect(problems).toHaveLength(5);
    expect(problems).toEqual(expect.arrayContaining([
      expect.stringMatching(/^GET \/api\/api-tokens: answers with/),
      expect.stringMatching(/^GET \/api\/floor: the handler parses a schema the description does not document/),
      expect.stringMatching(/^POST \/api\/orders: parses its body with createOrderSchema/),
      expect.stringMatching(/^POST \/api\/orders: the description documents a schema the handler does not parse/),
      expect.stringMatching(/^POST \/api\/orders: the handler parses a schema the description does not document/),
    ]));
  });
});

describe("the OpenAPI 3.1 document", () => {
  const doc = openApiDocument({ serverUrl: "http://127.0.0.1:3000" }) as {
    openapi: string;
    paths: Record<string, Record<string, { operationId: string; requestBody?: { content: Record<string, { schema: unknown }> }; parameters?: { name: string; in: string }[]; "x-hearth-scopes": string[] }>>;
    webhooks: Record<string, unknown>;
  };

  it("is OpenAPI 3.1 with one operation per handler and unique operation ids", () => {
    expect(doc.openapi).toBe("3.1.0");
    const ops = Object.values(doc.paths).flatMap((p) => Object.values(p));
    expect(ops).toHaveLength(API_OPERATIONS.length);
    expect(new Set(ops.map((o) => o.operationId)).size).toBe(ops.length);
  });

  it("carries each body as zod's JSON Schema of the handler's schema", () => {
    const op = API_OPERATIONS.find((o) => o.method === "POST" && o.path === "/api/orders")!;
    const described = doc.paths[openApiPath(op.path)].post;
    expect(described.operationId).toBe(operationId(op));
    expect(described.requestBody!.content["application/json"].schema).toEqual(inputJsonSchema(op.body!));
    const schema = described.requestBody!.content["application/json"].schema as { properties: Record<string, unknown>; required: string[] };
    expect(Object.keys(schema.properties)).toEqual(expect.arrayContaining(["code", "customer", "due_at"]));
    expect(described["x-hearth-scopes"]).toEqual(["orders:write"]);
  });

  it("documents path and query parameters", () => {
    const get = doc.paths["/api/orders/{id}"].get;
    expect(get.parameters).toEqual([expect.objectContaining({ name: "id", in: "path" })]);
    const floor = doc.paths["/api/floor"].get;
    expect(floor.parameters!.map((p) => `${p.in}:${p.name}`)).toEqual(expect.arrayContaining(["query:from", "query:to"]));
  });

  it("lists token scopes only for permissions a token may carry", () => {
    expect(scopesFor("users:admin")).toEqual([]);
    expect(scopesFor("builds:schedule")).toEqual(["schedule:write"]);
    expect(doc.paths["/api/api-tokens"].post["x-hearth-scopes"]).toEqual([]);
  });

  it("describes each webhook event", () => {
    expect(Object.keys(doc.webhooks)).toEqual(expect.arrayContaining(["order.created", "build.scheduled", "furnace_run.finished", "inspection.recorded", "order.late"]));
  });
});
