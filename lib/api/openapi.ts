// The OpenAPI 3.1 description of Hearth's API, made from lib/api/operations.ts: request bodies and
// query strings are zod 4's own JSON Schema output (z.toJSONSchema, draft 2020-12, which OpenAPI
// 3.1 uses as its schema dialect: OpenAPI Specification 3.1.0, §4.8.24 "Schema Object"), of the
// input side, which is what a caller sends. Outgoing webhooks are in the top-level "webhooks"
// map that 3.1 added for them (§4.8.1).
import { z } from "zod";
import { API_OPERATIONS, type ApiOperation } from "./operations";
import { API_SCOPE_NAMES, SESSION_ONLY_PERMISSIONS, scopesAllow } from "@/lib/auth/api-scopes";
import type { Permission } from "@/lib/auth/permissions";
import { SESSION_COOKIE } from "@/lib/auth/session-config";
import { EVENT_ID_HEADER, EVENT_TYPE_HEADER, SIGNATURE_HEADER, SIGNATURE_TOLERANCE_SECONDS, WEBHOOK_EVENT_TYPES } from "@/lib/integrations/webhook-signature";

type Json = Record<string, unknown>;

export const OPENAPI_VERSION = "3.1.0";
/** The API's own version: the major moves only when a change breaks existing callers. */
export const API_VERSION = "1.0.0";

/** zod → JSON Schema of what a caller sends; types JSON cannot say (a refinement's code) become {}. */
export function inputJsonSchema(schema: z.ZodType): Json {
  const out = z.toJSONSchema(schema, { io: "input", unrepresentable: "any", target: "draft-2020-12" }) as Json;
  delete out.$schema;
  return out;
}

/** /api/orders/[id] → /api/orders/{id} */
export function openApiPath(path: string): string {
  return path.replace(/\[([^\]]+)\]/g, "{$1}");
}

/** GET /api/builds/[id]/schedule → getBuildsByIdSchedule: stable, unique, readable in generated clients. */
export function operationId(op: Pick<ApiOperation, "method" | "path">): string {
  const words = op.path
    .replace(/^\/api\//, "")
    .split("/")
    .map((seg) => (seg.startsWith("[") ? `By-${seg.slice(1, -1)}` : seg))
    .join("-")
    .split(/[^A-Za-z0-9]+/)
    .filter(Boolean);
  return op.method.toLowerCase() + words.map((w) => w[0].toUpperCase() + w.slice(1)).join("");
}

/** The token scopes that grant a permission; none for session-only permissions. */
export function scopesFor(gate: ApiOperation["gate"]): string[] {
  if (gate === "public" || gate === "signed_in") return [];
  if (SESSION_ONLY_PERMISSIONS.includes(gate)) return [];
  return API_SCOPE_NAMES.filter((s) => scopesAllow([s], gate as Permission));
}

function pathParameters(path: string): Json[] {
  return [...path.matchAll(/\[([^\]]+)\]/g)].map(([, name]) => ({
    name,
    in: "path",
    required: true,
    // every row id is a uuid; a calendar feed's segments are its secret and a resource key
    schema: name === "token" || name === "resource" ? { type: "string" } : { type: "string", format: "uuid" },
  }));
}

function queryParameters(schema: z.ZodType | undefined): Json[] {
  if (!schema) return [];
  const json = inputJsonSchema(schema);
  const props = (json.properties ?? {}) as Record<string, Json>;
  const required = new Set((json.required ?? []) as string[]);
  return Object.entries(props).map(([name, s]) => ({ name, in: "query", required: required.has(name), schema: s }));
}

function gateText(op: ApiOperation): string {
  if (op.gate === "public") return "Open to anyone.";
  if (op.gate === "signed_in") return "Any signed-in person or valid token.";
  const scopes = scopesFor(op.gate);
  return scopes.length
    ? `Needs the permission \`${op.gate}\`; a token needs one of the scopes ${scopes.map((s) => `\`${s}\``).join(", ")} and a creator whose role has it.`
    : `Needs the permission \`${op.gate}\`; for a signed-in person only, never a token.`;
}

const ERROR_STATUSES: Record<string, string> = {
  "400": "The request cannot be read (not JSON, a malformed address).",
  "401": "Signed out, or the token is unknown, revoked or expired.",
  "403": "The role or the token's scopes do not allow this, or a cross-site request with a cookie.",
  "404": "No such row.",
  "409": "Stale version or an overlapping booking; nothing was changed.",
  "413": "The body is too large.",
  "415": "The body is not of a type this route takes.",
  "422": "A field is not valid: error.fieldErrors names each one with the reason.",
  "429": "Too many requests: Retry-After says how many seconds to wait.",
  "503": "The database cannot be reached just now: Retry-After says when to try again.",
};

function operationObject(op: ApiOperation): Json {
  const parameters = [...pathParameters(op.path), ...queryParameters(op.query)];
  const ok = String(op.status ?? 200);
  const answer: Json = op.answers
    ? { "application/json": { schema: { type: "object", required: [...op.answers], properties: Object.fromEntries(op.answers.map((k) => [k, {}])) } } }
    : { "*/*": { schema: {} } };
  const out: Json = {
    operationId: operationId(op),
    tags: [op.path.split("/")[2] ?? "api"],
    summary: op.summary.replace(/\s*\([^()]*\)\s*$/, "") || op.summary,
    description: `${op.summary}\n\n${gateText(op)}`,
    "x-hearth-permission": op.gate,
    "x-hearth-scopes": scopesFor(op.gate),
    responses: {
      [ok]: { description: "Done.", content: answer },
      ...Object.fromEntries(Object.entries(ERROR_STATUSES).map(([code]) => [code, { $ref: `#/components/responses/E${code}` }])),
    },
  };
  if (parameters.length) out.parameters = parameters;
  if (op.body) out.requestBody = { required: true, content: { "application/json": { schema: inputJsonSchema(op.body) } } };
  if (op.csvRow) {
    out.requestBody = {
      required: true,
      content: { "text/csv": { schema: { type: "string", description: "A header row, then one row per record; each row is checked with x-hearth-csv-row." } } },
    };
    out["x-hearth-csv-row"] = inputJsonSchema(op.csvRow);
  }
  if (op.gate === "public") out.security = [];
  return out;
}

const errorBody = {
  type: "object",
  required: ["error"],
  properties: {
    error: {
      type: "object",
      required: ["code", "message"],
      properties: {
        code: { type: "string" },
        message: { type: "string" },
        fieldErrors: { type: "object", additionalProperties: { type: "array", items: { type: "string" } } },
        details: {},
        request_id: { type: "string" },
      },
    },
  },
};

function webhooks(): Json {
  const body = {
    type: "object",
    required: ["id", "type", "created_at", "data"],
    properties: {
      id: { type: "string", format: "uuid", description: "The event's id: the same on every retry and redelivery; deduplicate on it." },
      type: { type: "string" },
      created_at: { type: "string", format: "date-time" },
      data: { type: "object", required: ["entity", "id"], properties: { entity: { type: "string" }, id: { type: "string", format: "uuid" } } },
    },
  };
  const headers = [
    { name: SIGNATURE_HEADER, description: `t=<unix seconds>,v1=<hex HMAC-SHA256(secret, "<t>.<raw body>")> (RFC 2104). Compare in constant time; refuse a t more than ${SIGNATURE_TOLERANCE_SECONDS} s from your clock.` },
    { name: EVENT_ID_HEADER, description: "The event's id, as in the body." },
    { name: EVENT_TYPE_HEADER, description: "The event's type, as in the body." },
  ].map((h) => ({ ...h, in: "header", required: true, schema: { type: "string" } }));
  return Object.fromEntries(
    WEBHOOK_EVENT_TYPES.map((type) => [
      type,
      {
        post: {
          operationId: `webhook_${type.replace(/\W/g, "_")}`,
          summary: `${type}: sent to each endpoint that subscribed to it (or to "*")`,
          parameters: headers,
          requestBody: { required: true, content: { "application/json": { schema: { ...body, properties: { ...body.properties, type: { const: type } } } } } },
          responses: { "2XX": { description: "Delivered. Anything else, or no answer in time, is retried with back-off." } },
        },
      },
    ]),
  );
}

export function openApiDocument(opts: { serverUrl: string }): Json {
  const paths: Record<string, Json> = {};
  for (const op of API_OPERATIONS) (paths[openApiPath(op.path)] ??= {})[op.method.toLowerCase()] = operationObject(op);
  const tags = [...new Set(API_OPERATIONS.map((op) => op.path.split("/")[2] ?? "api"))].sort().map((name) => ({ name }));
  return {
    openapi: OPENAPI_VERSION,
    info: {
      title: "Hearth API",
      version: API_VERSION,
      description:
        "Plan a bound-metal printing shop from other programs. Send `Authorization: Bearer hth_…` with a token an admin made at /setup/tokens; " +
        "a token may do what its scopes and its creator's role both allow. Changes that carry a `version` answer 409 when it is stale. " +
        "Errors are `{ error: { code, message, fieldErrors? } }`.",
    },
    servers: [{ url: opts.serverUrl }],
    tags,
    security: [{ bearerAuth: [] }, { cookieAuth: [] }],
    paths,
    webhooks: webhooks(),
    components: {
      securitySchemes: {
        bearerAuth: { type: "http", scheme: "bearer", description: "An API token (hth_ and 43 more characters)." },
        cookieAuth: { type: "apiKey", in: "cookie", name: SESSION_COOKIE, description: "The browser's session; state changes must come from Hearth's own pages." },
      },
      schemas: { Error: errorBody },
      responses: Object.fromEntries(
        Object.entries(ERROR_STATUSES).map(([code, description]) => [`E${code}`, { description, content: { "application/json": { schema: { $ref: "#/components/schemas/Error" } } } }]),
      ),
    },
  };
}
