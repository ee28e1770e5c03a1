// Who may call each API route and server action: the table tests/auth/route-permissions.db.test.ts
// checks against the running app, role by role. Every route file under app/api/**/route.ts and
// every exported server action MUST have an entry here, or that test fails.
//
// ADDING A ROUTE OR AN ACTION? Add one line below with the permission from lib/auth/permissions.ts
// that its handler passes to requireUser(...) FIRST. Use "public" for routes anyone may call
// (sign-in, health, token-protected feeds) and "signed_in" for routes that need a session but no
// particular permission. The test then sends, for every role and for a signed-out caller, a request
// with a fresh id for each [segment] and a body that is not JSON, and expects 401 signed out, 403
// for a role without the permission and neither (nor a 500) for a role with it. If the default
// request would do harm or cannot reach the gate, give { gate, path, body, note } instead.
import type { Permission } from "@/lib/auth/permissions";

export type Gate = Permission | "public" | "signed_in";
export type HttpMethod = "GET" | "HEAD" | "POST" | "PUT" | "PATCH" | "DELETE" | "OPTIONS";

export type RouteCheck =
  | Gate
  | {
      gate: Gate;
      /** The address to call instead of the pattern with fresh ids, e.g. with a query string. */
      path?: string;
      /** A body instead of the default "not JSON" text; `null` for none. */
      body?: string | Record<string, unknown> | null;
      note?: string;
      /** The answer is a stream that stays open: judge the status and headers, then hang up. */
      stream?: boolean;
    };

/** Keyed by the route's URL pattern: the file path without app/, route groups and /route.ts. */
export const ROUTE_PERMISSIONS: Record<string, Partial<Record<HttpMethod, RouteCheck>>> = {
  // sign-in, own account, users (issue 4)
  "/api/health": { GET: "public" },
  "/api/session": { GET: "signed_in", POST: "public", DELETE: "public" },
  "/api/session/password": { POST: "public" },
  "/api/session/reset-requests": { POST: "public" },
  "/api/me": { GET: "self:write", PATCH: "self:write" },
  "/api/me/password": { POST: "self:write" },
  "/api/me/sessions": { GET: "self:write", DELETE: { gate: "self:write", note: "ends the other sessions of the throwaway user only" } },
  "/api/users": { GET: "users:admin", POST: "users:admin" },
  "/api/users/[id]": { GET: "users:admin", PATCH: "users:admin" },
  "/api/users/[id]/link": { POST: "users:admin" },
  "/api/openapi.json": { GET: "signed_in" },
  "/api/activity": { GET: "activity:read" },
  "/api/activity/export": { GET: "activity:read" },
  "/api/activity/retention": { GET: "activity:read", PUT: "setup:write" },
  "/api/inspections/export": { GET: "shop:read" },
  "/api/calibration/export": { GET: "shop:read" },
  "/api/orders/export": { GET: "shop:read" },
  "/api/parts/export": { GET: "shop:read" },
  "/api/units/export": { GET: "shop:read" },
  "/api/api-tokens": { GET: "users:admin", POST: "users:admin" },
  "/api/api-tokens/[id]": { DELETE: "users:admin" },
  "/api/webhooks": { GET: "setup:write", POST: "setup:write" },
  "/api/webhooks/[id]": { PATCH: "setup:write" },
  "/api/webhooks/[id]/deliveries": { GET: "setup:write" },
  "/api/webhook-deliveries/[id]/redeliver": { POST: "setup:write" },
  "/api/users/[id]/sessions": { DELETE: { gate: "users:admin", note: "a fresh id names nobody: a 404 after the gate" } },

  "/api/events": { GET: { gate: "shop:read", stream: true, note: "server-sent events: an open stream once allowed" } },

  // feedstock and consumables
  "/api/inventory/lots": { GET: "shop:read", POST: "inventory:write" },
  "/api/inventory/lots/import": { POST: "inventory:write" },
  "/api/inventory/lots/[id]": { GET: "shop:read", PATCH: "inventory:write" },
  "/api/inventory/lots/[id]/recall": { POST: "inventory:recall" },
  "/api/inventory/lots/[id]/genealogy": { GET: "shop:read" },
  "/api/inventory/lots/[id]/label": { GET: "shop:read" },
  "/api/inventory/lots/[id]/certificate": { GET: "shop:read", POST: "inventory:write" },
  "/api/inventory/projection": { GET: "shop:read" },
  "/api/inventory/shortfalls": { GET: "shop:read" },
  "/api/inventory/forms": { GET: "shop:read", POST: "inventory:write" },
  "/api/inventory/materials/[id]": { PATCH: "inventory:write" },
  "/api/inventory/consumables": { GET: "shop:read" },
  "/api/inventory/gas": { POST: "consumables:write" },
  "/api/inventory/baths/[id]": { POST: "consumables:write" },
  "/api/units/[id]/origin": { GET: "shop:read" },

  // set-up
  "/api/furnaces": { GET: "shop:read", POST: "setup:write" },
  "/api/furnaces/[id]": { PATCH: "setup:write" },
  "/api/printers": { GET: "shop:read", POST: "setup:write" },
  "/api/printers/[id]": { PATCH: "setup:write" },
  "/api/wash-stations": { GET: "shop:read", POST: "setup:write" },
  "/api/wash-stations/[id]": { PATCH: "setup:write" },
  "/api/materials": { GET: "shop:read", POST: "setup:write" },
  "/api/materials/[id]": { PATCH: "setup:write" },
  "/api/maintenance-windows": { GET: "shop:read", POST: "setup:write" },
  "/api/maintenance-windows/[id]": { DELETE: "setup:write" },
  "/api/shop-settings": { GET: "shop:read", PUT: "setup:write" },
  "/api/sinter-profiles": { GET: "shop:read", POST: "setup:write" },
  "/api/sinter-profiles/[id]": { GET: "shop:read", PUT: "setup:write" },

  // orders, parts, units, files
  "/api/orders": { GET: "shop:read", POST: "orders:write" },
  "/api/orders/[id]": { GET: "shop:read", PATCH: "orders:write" },
  "/api/parts": { GET: "shop:read", POST: "parts:write" },
  "/api/parts/[id]": { GET: "shop:read", PATCH: "parts:write" },
  "/api/parts/[id]/geometry": { POST: "geometry:upload" },
  "/api/parts/import": { POST: "parts:write" },
  "/api/units": { GET: "shop:read" },
  "/api/units/[id]/trace": { GET: "shop:read" },
  "/api/scan": { GET: { gate: "shop:read", path: "/api/scan?code=NO-SUCH-CODE" } },
  "/api/files/[id]": { GET: "shop:read" },
  "/api/files/[id]/content": { GET: "shop:read" },

  // builds, floor, plans
  "/api/builds": { POST: "builds:write" },
  "/api/builds/[id]": { GET: "shop:read", PATCH: "builds:write" },
  "/api/builds/[id]/actions": { POST: "builds:write" },
  "/api/builds/[id]/schedule": { PATCH: "builds:schedule" },
  "/api/builds/[id]/traveler": { GET: "shop:read" },
  "/api/builds/[id]/labels": { GET: "shop:read" },
  "/api/floor": { GET: "shop:read" },
  "/api/floor/unscheduled": { GET: "shop:read" },
  "/api/plans": { POST: "plan:propose" },
  "/api/plans/[id]": { GET: "shop:read", PATCH: "plan:apply" },

  // wash batches and furnace runs
  "/api/batches": { GET: "shop:read" },
  "/api/batches/suggest": { POST: "wash:write" },
  "/api/batches/suggest/apply": { POST: "wash:write" },
  "/api/batches/suggest/refuse": { POST: "wash:write" },
  "/api/wash-batches": { GET: "shop:read", POST: "wash:write" },
  "/api/wash-batches/[id]": { GET: "shop:read" },
  "/api/wash-batches/[id]/cancel": { POST: "wash:write" },
  "/api/wash-batches/[id]/finish": { POST: "wash:record" },
  "/api/wash-batches/[id]/masses": { PUT: "wash:record" },
  "/api/wash-batches/[id]/schedule": { PATCH: "wash:write" },
  "/api/wash-batches/[id]/start": { POST: "wash:write" },
  "/api/wash-batches/[id]/units": { POST: "wash:write" },
  "/api/wash-batches/[id]/units/[unitId]": { DELETE: "wash:write" },
  "/api/furnace-runs": { GET: "shop:read", POST: "furnace:write" },
  "/api/furnace-runs/[id]": { GET: "shop:read" },
  "/api/furnace-runs/[id]/sheet": { GET: "shop:read" },
  "/api/furnace-runs/[id]/labels": { GET: "shop:read" },
  "/api/furnace-runs/[id]/cancel": { POST: "furnace:write" },
  "/api/furnace-runs/[id]/schedule": { PATCH: "furnace:write" },
  "/api/furnace-runs/[id]/start": { POST: "furnace:operate" },
  "/api/furnace-runs/[id]/unload": { POST: "furnace:operate" },
  "/api/furnace-runs/[id]/units": { POST: "furnace:write" },
  "/api/furnace-runs/[id]/units/[unitId]": { DELETE: "furnace:write" },

  // finishing, inspections, calibration
  "/api/finishing": { GET: "shop:read" },
  "/api/finishing/[id]": { GET: "shop:read", POST: "finishing:write" },
  "/api/inspections": { GET: "shop:read", POST: "inspections:write" },
  "/api/inspections/[id]": { PATCH: { gate: "calibration:apply", note: "excluding an inspection from calibration" } },
  "/api/inspections/[id]/files": { POST: "inspections:write" },
  "/api/inspections/[id]/files/[fileId]": { GET: "shop:read" },
  "/api/calibration": { GET: "shop:read" },
  "/api/calibration/[materialId]": { GET: "shop:read" },
  "/api/calibration/[materialId]/apply": { POST: "calibration:apply" },

  // capacity, calendars, mail, jobs
  "/api/capacity": { GET: "capacity:read" },
  "/api/capacity/export": { GET: "capacity:read" },
  "/api/calendar/token": { GET: "capacity:read", POST: "capacity:read", DELETE: "capacity:read" },
  "/api/calendar/feeds/[token]/[resource]": { GET: { gate: "public", note: "the secret in the address is the credential; an unknown one is a 404" } },
  "/api/mail": { GET: "mail:read" },
  "/api/jobs": { GET: "jobs:read" },
  // quotes
  "/api/quotes": { GET: "quotes:read", POST: "quotes:write" },
  "/api/quotes/[id]": { GET: "quotes:read", PATCH: "quotes:write" },
  "/api/quotes/[id]/lines": { POST: "quotes:write" },
  "/api/quotes/[id]/lines/[lineId]": { DELETE: "quotes:write" },
  "/api/quotes/[id]/actions": { POST: "quotes:write" },
  "/api/quotes/[id]/pdf": { GET: "quotes:read" },
  "/api/quotes/[id]/capable": { GET: "quotes:read" },
  "/api/quotes/geometry": { POST: { gate: "quotes:write", body: null, note: "an empty upload is refused after the gate" } },
  "/api/quotes/learning": { GET: "capacity:read" },
  "/api/quote-settings": { GET: "quotes:read", PUT: "setup:write" },
  "/api/quote-settings/materials": { PUT: "setup:write" },
  "/api/quote-settings/equipment": { PUT: "setup:write" },
};

/**
 * Server actions, keyed by the file that declares them (repository-relative) and the exported
 * name. Actions answer with an ActionState whose `code` is "unauthenticated" or "forbidden" when
 * the gate refuses (lib/auth/action-state.ts: actionFailure).
 */
export const ACTION_PERMISSIONS: Record<string, Record<string, Gate>> = {
  "app/(app)/setup/users/actions.ts": {
    createUser: "users:admin",
    changeRole: "users:admin",
    setActive: "users:admin",
    sendLink: "users:admin",
    signOutEverywhere: "users:admin",
  },
};
