// The API's operations, one line per route handler: its method and path, the permission it checks
// first (lib/auth/permissions.ts), what it does, and the very zod schemas it validates its body and
// query with, imported from the modules the route imports them from. /api/openapi.json is made from
// this list (lib/api/openapi.ts); tests/integrations/openapi.test.ts reads every route file and fails
// when a handler is missing here, or when the schema it parses is not the object listed for it.
import type { z } from "zod";
import type { Permission } from "@/lib/auth/permissions";
import * as activitySchemas from "@/lib/activity/schemas";
import * as authApiScopes from "@/lib/auth/api-scopes";
import * as authSchemas from "@/lib/auth/schemas";
import * as batchesSchemas from "@/lib/batches/schemas";
import * as batchesWindow from "@/lib/batches/window";
import * as buildsSchemas from "@/lib/builds/schemas";
import * as capacitySchemas from "@/lib/capacity/schemas";
import * as finishingSchemas from "@/lib/finishing/schemas";
import * as floorSchemas from "@/lib/floor/schemas";
import * as integrationsWebhookSignature from "@/lib/integrations/webhook-signature";
import * as inventorySchemas from "@/lib/inventory/schemas";
import * as jobsSchemas from "@/lib/jobs/schemas";
import * as mailSchemas from "@/lib/mail/schemas";
import * as partsSchemas from "@/lib/parts/schemas";
import * as pdfPaper from "@/lib/pdf/paper";
import * as quotesSchemas from "@/lib/quotes/schemas";
import * as setupSchemas from "@/lib/setup/schemas";

export type ApiMethod = "GET" | "POST" | "PUT" | "PATCH" | "DELETE";
/** The first check a handler makes: a permission, any signed-in caller, or nobody (public). */
export type ApiGate = Permission | "public" | "signed_in";

export type ApiOperation = {
  method: ApiMethod;
  /** As the files spell it: /api/orders/[id] */
  path: string;
  gate: ApiGate;
  summary: string;
  /** The JSON body's schema. */
  body?: z.ZodType;
  /** The query string's schema. */
  query?: z.ZodType;
  /** A CSV upload: the schema each row is checked with. */
  csvRow?: z.ZodType;
  /** The keys of the JSON object the handler answers with, when it is one fixed shape. */
  answers?: readonly string[];
  status?: 200 | 201;
};

const op = (method: ApiMethod, path: string, gate: ApiGate, summary: string, more: Partial<ApiOperation> = {}): ApiOperation => ({ method, path, gate, summary, ...more });

export const API_OPERATIONS: readonly ApiOperation[] = [
  op("GET", "/api/activity", "activity:read", "the newest 500 recorded changes matching the filters, with the total (manager, admin)", { query: activitySchemas.activityFilterSchema, answers: ["events", "total"] }),
  op("GET", "/api/orders/export", "shop:read", "every order the list's filters and sort select, as formula-safe CSV (every role)", { query: partsSchemas.listOrdersSchema }),
  op("GET", "/api/parts/export", "shop:read", "every part the list's filters and sort select, as formula-safe CSV (every role)", { query: partsSchemas.listPartsSchema }),
  op("GET", "/api/units/export", "shop:read", "every unit the list's filters select, with its build, wash and furnace run, as formula-safe CSV (every role)", { query: partsSchemas.listUnitsSchema }),
  op("GET", "/api/activity/export", "activity:read", "the matching changes as CSV, formula-safe, newest first (manager, admin)", { query: activitySchemas.activityFilterSchema }),
  op("GET", "/api/activity/retention", "activity:read", "how many days the activity log keeps its events; null: for ever (manager, admin)", { answers: ["retention_days"] }),
  op("PUT", "/api/activity/retention", "setup:write", "set it: 30 to 3650 days, or null to keep events for ever; the trace's, calibration's, lots' and security events are always kept (admin)", { body: activitySchemas.activityRetentionSchema, answers: ["retention_days"] }),
  op("GET", "/api/inspections/export", "shop:read", "the inspections of one unit, one material or all, newest first, as formula-safe CSV (every role)", { query: finishingSchemas.inspectionExportSchema }),
  op("GET", "/api/calibration/export", "shop:read", "each inspection's realized shrinkage per axis, as the calibration page uses it, as formula-safe CSV (every role)", { query: finishingSchemas.calibrationExportSchema }),
  op("GET", "/api/api-tokens", "users:admin", "every token with its scopes, expiry, last use; never the token (admin)", { answers: ["tokens"] }),
  op("POST", "/api/api-tokens", "users:admin", "create a token; the answer holds the token, shown this once (admin)", { body: authApiScopes.createApiTokenSchema, answers: ["token"], status: 201 }),
  op("DELETE", "/api/api-tokens/[id]", "users:admin", "revoke a token; it stops working on its next request (admin)", { answers: ["token"] }),
  op("GET", "/api/batches", "shop:read", "the batching board: waiting units, open wash batches and furnace runs, equipment (every role)"),
  op("POST", "/api/batches/suggest", "wash:write", "propose wash batches and furnace runs for the waiting units; books nothing (technician, furnace operator, admin)", { body: batchesSchemas.suggestSchema, status: 201 }),
  op("POST", "/api/batches/suggest/apply", "wash:write", "book an accepted proposal as it was shown; 409 when stale (technician, furnace operator, admin; furnace runs need furnace:write)", { body: batchesSchemas.applyProposalSchema }),
  op("POST", "/api/batches/suggest/refuse", "wash:write", "set a proposal aside without booking it (technician, furnace operator, admin)", { body: batchesSchemas.refuseProposalSchema, answers: ["ok"] }),
  op("POST", "/api/builds", "builds:write", "group planned units of one material into a draft build (technician, admin)", { body: buildsSchemas.createBuildSchema, answers: ["build"], status: 201 }),
  op("GET", "/api/builds/[id]", "shop:read", "the build, its units, plate layout, each printer's verdict and history (every role)"),
  op("PATCH", "/api/builds/[id]", "builds:write", "material lot, notes, or (for a draft) its units, with the version (technician, admin)", { body: buildsSchemas.updateBuildSchema, answers: ["build"] }),
  op("POST", "/api/builds/[id]/actions", "builds:write", "start, complete, fail (with the reason) or cancel a build, with its version (technician, admin)", { body: buildsSchemas.buildActionSchema, answers: ["build"] }),
  op("PATCH", "/api/builds/[id]/schedule", "builds:schedule", "move a build onto a printer at a start time, or off the floor (printer_id null), with its version; 409 on a stale version or an overlap, 422 on an incompatible printer (technician, admin)", { body: buildsSchemas.scheduleBuildSchema, answers: ["build"] }),
  op("GET", "/api/builds/[id]/traveler", "shop:read", "the printable traveler PDF with a QR code to the build page (every role)"),
  op("GET", "/api/builds/[id]/labels", "shop:read", "a PDF sheet of unit labels, one per unit of the build, each with a QR code to the unit page; ?paper=a4|letter, A4 by default (every role)", { query: pdfPaper.paperQuerySchema }),
  op("GET", "/api/calendar/feeds/[token]/[resource]", "public", "one resource's bookings as iCalendar; the secret in the address stands in for a session (manager, admin)"),
  op("GET", "/api/calendar/token", "capacity:read", "whether the signed-in user has a calendar feed secret (manager, admin)"),
  op("POST", "/api/calendar/token", "capacity:read", "make a new feed secret, revoking the old one; the secret is shown only now (manager, admin)", { answers: ["active","created_at","feeds","token"], status: 201 }),
  op("DELETE", "/api/calendar/token", "capacity:read", "revoke the feed secret: every feed address made with it stops working (manager, admin)", { answers: ["active","revoked"] }),
  op("GET", "/api/calibration", "shop:read", "materials with their current shrinkage and how many inspections back it (every role)", { answers: ["materials"] }),
  op("GET", "/api/calibration/[materialId]", "shop:read", "realized shrinkage points, mean, spread, count, suggested factors and history (every role)"),
  op("POST", "/api/calibration/[materialId]/apply", "calibration:apply", "set the material's shrinkage to the measured means shown, at the material's version (admin)", { body: finishingSchemas.applyCalibrationSchema }),
  op("GET", "/api/capacity", "capacity:read", "utilization, queue, work in progress, late orders, throughput (manager, admin)", { query: capacitySchemas.capacityQuerySchema }),
  op("GET", "/api/capacity/export", "capacity:read", "one table as CSV (manager, admin)", { query: capacitySchemas.capacityExportSchema }),
  op("GET", "/api/events", "shop:read", "server-sent events: which bookings, units and inspections changed (ids and"),
  op("GET", "/api/files/[id]", "shop:read", "a stored file's status (queued, analysing, done, failed) and analysis (every role)", { answers: ["file"] }),
  op("GET", "/api/files/[id]/content", "shop:read", "the stored bytes (the 3-D preview reads the STL through this) (every role)"),
  op("GET", "/api/finishing", "shop:read", "units arriving from furnace runs, ready, in finishing, held, lately done (every role)"),
  op("GET", "/api/finishing/[id]", "shop:read", "one unit's finishing card with its inspections (every role)", { answers: ["inspections","unit"] }),
  op("POST", "/api/finishing/[id]", "finishing:write", "accept, finish, scrap (failed inspection), hold or release a unit, at the version seen (machinist, admin)", { body: finishingSchemas.finishingActionSchema, answers: ["unit"] }),
  op("GET", "/api/floor", "shop:read", "lanes (printers, wash stations, furnaces), bookings and maintenance in the visible window (every role)", { query: floorSchemas.floorWindowSchema }),
  op("GET", "/api/floor/unscheduled", "shop:read", "draft builds with every printer's verdict and print time, as { builds } (every role)"),
  op("GET", "/api/furnace-runs", "shop:read", "booked furnace runs touching a window, for the furnace lanes (every role)", { query: batchesWindow.windowSchema, answers: ["furnace_runs"] }),
  op("POST", "/api/furnace-runs", "furnace:write", "open an empty draft run on a furnace with one sinter profile (furnace operator, admin)", { body: batchesSchemas.createFurnaceRunSchema, status: 201 }),
  op("GET", "/api/furnace-runs/[id]", "shop:read", "a run with its profile curve, tray layout, checklist and unit outcomes (every role)"),
  op("GET", "/api/furnace-runs/[id]/sheet", "shop:read", "the furnace-run sheet PDF: furnace, sinter profile, trays and units, load against the limit, cautions, sign-off; ?paper=a4|letter, A4 by default (every role)", { query: pdfPaper.paperQuerySchema }),
  op("GET", "/api/furnace-runs/[id]/labels", "shop:read", "a PDF sheet of unit labels, one per unit on the run, each with a QR code to the unit page; ?paper=a4|letter, A4 by default (every role)", { query: pdfPaper.paperQuerySchema }),
  op("POST", "/api/furnace-runs/[id]/cancel", "furnace:write", "cancel a draft or scheduled run; its units wait again (furnace operator, admin)", { body: batchesSchemas.cancelSchema }),
  op("PATCH", "/api/furnace-runs/[id]/schedule", "furnace:write", "book or move a run on a furnace lane; its length is the profile's cycle, a resize is refused (furnace operator, admin)", { body: batchesSchemas.scheduleFurnaceRunSchema }),
  op("POST", "/api/furnace-runs/[id]/start", "furnace:operate", "loading checklist ticked, the run starts now (inside staffed hours); units become sintering (furnace operator, admin)", { body: batchesSchemas.startRunSchema }),
  op("POST", "/api/furnace-runs/[id]/units", "furnace:write", "put a brown unit on the run's trays; 422 with the rule it breaks (profile, height, load, room), 409 when stale (furnace operator, admin)", { body: batchesSchemas.addUnitSchema }),
  op("DELETE", "/api/furnace-runs/[id]/units/[unitId]", "furnace:write", "take a unit off a draft or scheduled run; body or ?version= (furnace operator, admin)", { query: batchesSchemas.removeUnitSchema }),
  op("POST", "/api/furnace-runs/[id]/unload", "furnace:operate", "record each unit as sintered or scrapped with a reason (furnace operator, admin)", { body: batchesSchemas.unloadRunSchema }),
  op("GET", "/api/furnaces", "shop:read", "furnaces with the sinter profiles each runs (every role)"),
  op("POST", "/api/furnaces", "setup:write", "add a furnace (admin)", { body: setupSchemas.furnaceSchema }),
  op("PATCH", "/api/furnaces/[id]", "setup:write", "change a furnace (admin)", { body: setupSchemas.updateFurnaceSchema }),
  op("GET", "/api/health", "public", "public: {status: \"up\" | \"down\"} (503 when down); an admin also gets every check's detail"),
  op("GET", "/api/inspections", "shop:read", "a unit's inspections, newest first, with attachments (every role)", { answers: ["inspections"] }),
  op("POST", "/api/inspections", "inspections:write", "record an inspection of a unit in finishing, at the unit's version (machinist, admin)", { body: finishingSchemas.createInspectionSchema, status: 201 }),
  op("PATCH", "/api/inspections/[id]", "calibration:apply", "leave a measurement out of shrinkage calibration, or take it back in (admin)", { body: finishingSchemas.excludeInspectionSchema }),
  op("POST", "/api/inspections/[id]/files", "inspections:write", "attach a photo (JPEG, PNG, WebP) or a PDF report, multipart field \"file\" (machinist, admin)", { status: 201 }),
  op("GET", "/api/inspections/[id]/files/[fileId]", "shop:read", "an inspection's attachment from object storage (every role)"),
  op("POST", "/api/inventory/baths/[id]", "consumables:write", "the solvent at this wash station was changed: its binder load starts again from zero (technician, furnace operator, admin)", { body: inventorySchemas.bathChangeSchema, answers: ["station"] }),
  op("GET", "/api/inventory/consumables", "shop:read", "each solvent bath's binder load and the process gas on hand against scheduled runs (every role)", { answers: ["baths","gas"] }),
  op("GET", "/api/inventory/forms", "shop:read", "the shop's list of feedstock forms and containers (every role)", { answers: ["forms"] }),
  op("POST", "/api/inventory/forms", "inventory:write", "add a form or container to the list (technician, manager, admin)", { body: inventorySchemas.formSchema, answers: ["form"], status: 201 }),
  op("POST", "/api/inventory/gas", "consumables:write", "record a count of a process gas on hand, in litres (technician, furnace operator, admin)", { body: inventorySchemas.gasCountSchema, answers: ["supply"], status: 201 }),
  op("GET", "/api/inventory/lots", "shop:read", "feedstock lots, filtered by material, state or text (every role)", { query: inventorySchemas.listLotsQuerySchema, answers: ["lots"] }),
  op("POST", "/api/inventory/lots", "inventory:write", "receive a lot into quarantine (technician, manager, admin)", { body: inventorySchemas.receiveLotSchema, answers: ["lot"], status: 201 }),
  op("GET", "/api/inventory/lots/[id]", "shop:read", "one lot with every unit and order it reached (every role)", { answers: ["genealogy","lot"] }),
  op("PATCH", "/api/inventory/lots/[id]", "inventory:write", "release, reject or requarantine, count what is left, notes, expiry, certificate; with its version (technician, manager, admin)", { body: inventorySchemas.updateLotSchema, answers: ["lot"] }),
  op("GET", "/api/inventory/lots/[id]/certificate", "shop:read", "the lot's certificate of analysis, streamed from object storage (every role)"),
  op("POST", "/api/inventory/lots/[id]/certificate", "inventory:write", "attach (or replace) the certificate of analysis: the raw file as the body, its type in Content-Type (PDF, JPEG, PNG, WebP), its name in x-filename, optionally ?version= of the lot as loaded (technician, manager, admin)", { query: inventorySchemas.certificateQuerySchema, answers: ["file", "lot"], status: 201 }),
  op("GET", "/api/inventory/lots/[id]/genealogy", "shop:read", "every unit the lot reached, with its path and order, as CSV (every role)"),
  op("GET", "/api/inventory/lots/[id]/label", "shop:read", "the container label PDF with a QR code that opens the lot (every role)"),
  op("POST", "/api/inventory/lots/[id]/recall", "inventory:recall", "hold every unit printed from the lot that is still in the shop; lists the rest (?format=csv for a file) (manager, admin)", { body: inventorySchemas.recallSchema }),
  op("POST", "/api/inventory/lots/import", "inventory:write", "receive lots from a CSV (text/csv body; header row: material, supplier, supplier_lot, form, received_on, expires_on, quantity_kg, storage_notes); all rows or none (technician, manager, admin)", { csvRow: inventorySchemas.lotCsvRowSchema, answers: ["lots"], status: 201 }),
  op("PATCH", "/api/inventory/materials/[id]", "inventory:write", "a material's supports allowance, purge, reorder point and lead time, with its version (technician, manager, admin)", { body: inventorySchemas.materialInventorySchema, answers: ["material"] }),
  op("GET", "/api/inventory/projection", "shop:read", "per material: on hand, committed to scheduled builds, projected day by day, first short day (every role)", { query: inventorySchemas.projectionQuerySchema }),
  op("GET", "/api/inventory/shortfalls", "shop:read", "scheduled builds whose feedstock will not be on the shelf when they start (every role)", { answers: ["builds"] }),
  op("GET", "/api/jobs", "jobs:read", "background queues, failed jobs and recent sweeps; read-only (admin)", { query: jobsSchemas.listJobsQuerySchema, answers: ["failed","installed","last_sweep","queues","sweeps"] }),
  op("GET", "/api/mail", "mail:read", "messages kept by the local capture server, with the outbox beside them (admin)", { query: mailSchemas.listMailQuerySchema, answers: ["capture_error","messages","outbox","outbox_recent"] }),
  op("GET", "/api/maintenance-windows", "shop:read", "maintenance windows overlapping a time window (every role)", { query: setupSchemas.maintenanceWindowQuerySchema, answers: ["maintenance_windows"] }),
  op("POST", "/api/maintenance-windows", "setup:write", "block a printer, wash station or furnace for maintenance (admin)", { body: setupSchemas.maintenanceWindowSchema, answers: ["error","maintenance_window"], status: 201 }),
  op("DELETE", "/api/maintenance-windows/[id]", "setup:write", "remove a maintenance window (admin)", { answers: ["ok"] }),
  op("GET", "/api/materials", "shop:read", "materials with their shrinkage, densities and wash constants (every role)"),
  op("POST", "/api/materials", "setup:write", "add a material (admin)", { body: setupSchemas.materialSchema }),
  op("PATCH", "/api/materials/[id]", "setup:write", "change a material; builds already printed keep their factors (admin)", { body: setupSchemas.updateMaterialSchema, answers: ["material"] }),
  op("GET", "/api/me", "self:write", "my own profile and preferences (any signed-in role)", { answers: ["user"] }),
  op("PATCH", "/api/me", "self:write", "change my name, unit preference or muted e-mail kinds (any signed-in role)", { body: authSchemas.updateProfileSchema, answers: ["user"] }),
  op("POST", "/api/me/password", "self:write", "change my password; ends my other sessions (any signed-in role)", { body: authSchemas.changePasswordSchema, answers: ["message","ok"] }),
  op("GET", "/api/me/sessions", "self:write", "one's open sessions, this one marked (any signed-in role)", { answers: ["sessions"] }),
  op("DELETE", "/api/me/sessions", "self:write", "sign out of every other browser and device, at once (any signed-in role)", { answers: ["message","ok","sessions_ended"] }),
  op("GET", "/api/orders", "shop:read", "orders with part and unit counts and projected completion; sort, search, pages (every role)", { query: partsSchemas.listOrdersSchema }),
  op("POST", "/api/orders", "orders:write", "create an order (technician, manager, admin)", { body: partsSchemas.createOrderSchema, answers: ["order"], status: 201 }),
  op("GET", "/api/orders/[id]", "shop:read", "one order (every role)", { answers: ["order"] }),
  op("PATCH", "/api/orders/[id]", "orders:write", "edit an order with its version; priority only by a manager or admin (technician, manager, admin)", { body: partsSchemas.updateOrderSchema, answers: ["order"] }),
  op("GET", "/api/parts", "shop:read", "parts with order, material and geometry status; sort, filter, search, pages (every role)", { query: partsSchemas.listPartsSchema }),
  op("POST", "/api/parts", "parts:write", "add a part to an order, scaled up, with its planned units (technician, admin)", { body: partsSchemas.createPartSchema, answers: ["part"], status: 201 }),
  op("GET", "/api/parts/[id]", "shop:read", "the part with its scale-up, masses, printer fits and geometry (every role)"),
  op("PATCH", "/api/parts/[id]", "parts:write", "edit a part with its version; sizes re-scale, quantity adds or removes planned units (technician, admin)", { body: partsSchemas.updatePartSchema, answers: ["part"] }),
  op("POST", "/api/parts/[id]/geometry", "geometry:upload", "upload the part's STL (raw body, name in x-filename); checked before anything is stored, analysed by the worker (technician, admin)", { answers: ["file"], status: 201 }),
  op("POST", "/api/parts/import", "parts:write", "check (dry_run) or import CSV rows of orders and parts: all or nothing, or the valid rows only (technician, admin)", { body: partsSchemas.importSchema }),
  op("POST", "/api/plans", "plan:propose", "propose a printer plan for the unscheduled builds; nothing is booked until it is applied (technician, manager, admin)", { body: floorSchemas.proposePlanSchema, status: 201 }),
  op("GET", "/api/plans/[id]", "shop:read", "one proposal as it was made (every role)", { answers: ["proposal"] }),
  op("PATCH", "/api/plans/[id]", "plan:apply", "apply a proposal in one transaction (409 when stale) or refuse it (technician, admin)", { body: floorSchemas.decidePlanSchema, answers: ["proposal"] }),
  op("GET", "/api/printers", "shop:read", "printers with the materials each takes (every role)"),
  op("POST", "/api/printers", "setup:write", "add a printer (admin)", { body: setupSchemas.printerSchema }),
  op("PATCH", "/api/printers/[id]", "setup:write", "change a printer (admin)", { body: setupSchemas.updatePrinterSchema }),
  op("GET", "/api/quote-settings", "quotes:read", "quoting rates, currency, per-material feedstock rates and per-printer and per-furnace rates (manager, admin, technician)", { answers: ["furnaces","materials","printers","settings"] }),
  op("PUT", "/api/quote-settings", "setup:write", "change the shop's quoting rates; 409 when someone changed them first (admin)", { body: quotesSchemas.quoteSettingsSchema, answers: ["settings"] }),
  op("PUT", "/api/quote-settings/materials", "setup:write", "one material's feedstock price, infill and support share (admin)", { body: quotesSchemas.materialRateSchema, answers: ["rate"] }),
  op("PUT", "/api/quote-settings/equipment", "setup:write", "one printer's hourly rate or one furnace's run, gas and energy cost; empty means the shop's (admin)", { body: quotesSchemas.equipmentRateSchema, answers: ["rate"] }),
  op("GET", "/api/quotes", "quotes:read", "quotes, newest first; sent quotes past their validity are expired on the way (manager, admin, technician)", { answers: ["quotes"] }),
  op("POST", "/api/quotes", "quotes:write", "start a draft quote (manager, admin)", { body: quotesSchemas.createQuoteSchema, answers: ["quote"], status: 201 }),
  op("GET", "/api/quotes/[id]", "quotes:read", "the quote, its lines and, for a draft, the cost and promise as the schedule stands now; a sent quote shows what was sent (manager, admin, technician)"),
  op("PATCH", "/api/quotes/[id]", "quotes:write", "edit a draft's customer, contact, notes or validity; 409 when stale (manager, admin)", { body: quotesSchemas.updateQuoteSchema, answers: ["quote"] }),
  op("POST", "/api/quotes/[id]/actions", "quotes:write", "send (PDF by e-mail), accept (order + plan proposal, nothing booked) or decline; one transaction each, 409 when stale or already decided (manager, admin)", { body: quotesSchemas.quoteActionSchema }),
  op("GET", "/api/quotes/[id]/capable", "quotes:read", "per line, how many good units the schedule allows by that date (manager, admin, technician)", { query: quotesSchemas.capableQuerySchema, answers: ["by","lines"] }),
  op("POST", "/api/quotes/[id]/lines", "quotes:write", "add a line from an existing part or an analysed STL upload (manager, admin)", { body: quotesSchemas.addLineSchema, answers: ["line"], status: 201 }),
  op("DELETE", "/api/quotes/[id]/lines/[lineId]", "quotes:write", "take a line off a draft (body: { version }) (manager, admin)", { body: quotesSchemas.removeLineSchema, answers: ["ok"] }),
  op("GET", "/api/quotes/[id]/pdf", "quotes:read", "the PDF as sent to the customer (manager, admin, technician)"),
  op("POST", "/api/quotes/geometry", "quotes:write", "a customer's STL for a quote line (raw body, name in x-filename): checked, stored and analysed by the worker exactly as a part's geometry; poll /api/files/[id] (manager, admin)", { answers: ["file"], status: 201 }),
  op("GET", "/api/quotes/learning", "capacity:read", "quotes sent, win rate, and for finished orders promised vs actual completion (manager, admin)"),
  op("GET", "/api/scan", "shop:read", "what a scanned or typed code names (unit, build, wash batch, furnace run), with its page and version (every role)", { answers: ["hits"] }),
  op("GET", "/api/session", "signed_in", "who is signed in (public; 401 when signed out)", { answers: ["home","user"] }),
  op("POST", "/api/session", "public", "sign in with e-mail and password (public; throttled per account and address)", { body: authSchemas.signInSchema, answers: ["home","user"] }),
  op("DELETE", "/api/session", "public", "sign out (public; always succeeds, even with a damaged cookie)", { answers: ["ok"] }),
  op("POST", "/api/session/password", "public", "set a password with an e-mailed link's token (public; the token is the key)", { body: authSchemas.setPasswordSchema, answers: ["email","kind","ok"] }),
  op("POST", "/api/session/reset-requests", "public", "e-mail a reset link (public; same answer for any address)", { body: authSchemas.forgotPasswordSchema, answers: ["message","ok"] }),
  op("GET", "/api/shop-settings", "shop:read", "the shop's name, time zone, staffed hours and planning margins (every role)", { answers: ["settings"] }),
  op("PUT", "/api/shop-settings", "setup:write", "replace the shop settings; `version` guards against lost updates (admin)", { body: setupSchemas.shopSettingsSchema, answers: ["settings"] }),
  op("GET", "/api/sinter-profiles", "shop:read", "every profile revision with its segments, materials, furnaces and use (every role)"),
  op("POST", "/api/sinter-profiles", "setup:write", "create a profile (admin)", { body: batchesSchemas.createProfileSchema, status: 201 }),
  op("GET", "/api/sinter-profiles/[id]", "shop:read", "one profile revision (every role)"),
  op("PUT", "/api/sinter-profiles/[id]", "setup:write", "save a profile; one held by a booked run becomes a new revision instead (admin)", { body: batchesSchemas.updateProfileSchema }),
  op("GET", "/api/units", "shop:read", "units with part, order, bookings and projected completion; sort, filter, search, pages (every role)", { query: partsSchemas.listUnitsSchema }),
  op("GET", "/api/units/[id]/origin", "shop:read", "where a unit came from: its feedstock lots, printer, wash, furnace run and profile (every role)", { answers: ["origin"] }),
  op("GET", "/api/units/[id]/trace", "shop:read", "material lot, build, printer, wash batch and masses, furnace run and profile, inspections and every event as one timeline (every role)"),
  op("GET", "/api/users", "users:admin", "every account with its role and state (admin)", { answers: ["users"] }),
  op("POST", "/api/users", "users:admin", "create an account and e-mail its invitation (admin)", { body: authSchemas.createUserSchema, status: 201 }),
  op("GET", "/api/users/[id]", "users:admin", "one account and its recent account events (admin)", { answers: ["events","user"] }),
  op("PATCH", "/api/users/[id]", "users:admin", "change name, role or active state; needs the current version (admin)", { body: authSchemas.updateUserSchema, answers: ["user"] }),
  op("POST", "/api/users/[id]/link", "users:admin", "e-mail a reset link (or a fresh invitation when no password is set yet) (admin)", { status: 201 }),
  op("DELETE", "/api/users/[id]/sessions", "users:admin", "sign the person out everywhere, at once (admin; one's own account too)", { answers: ["message","ok","sessions_ended"] }),
  op("GET", "/api/wash-batches", "shop:read", "booked wash batches touching a window, for the wash-station lanes (every role)", { query: batchesWindow.windowSchema, answers: ["wash_batches"] }),
  op("POST", "/api/wash-batches", "wash:write", "open an empty draft wash batch on a station (technician, furnace operator, admin)", { body: batchesSchemas.createWashBatchSchema, status: 201 }),
  op("GET", "/api/wash-batches/[id]", "shop:read", "a wash batch with its units, weighings and mass-loss checks (every role)"),
  op("POST", "/api/wash-batches/[id]/cancel", "wash:write", "cancel a draft or scheduled wash batch; its units wait again (technician, furnace operator, admin)", { body: batchesSchemas.cancelSchema }),
  op("POST", "/api/wash-batches/[id]/finish", "wash:record", "the basket is out: every unit weighed, units short of the mass-loss minimum are held with the reason (technician, furnace operator, admin)", { body: batchesSchemas.finishWashSchema }),
  op("PUT", "/api/wash-batches/[id]/masses", "wash:record", "record green and brown weighings; answers with each unit's mass loss against its material's minimum (technician, furnace operator, admin)", { body: batchesSchemas.recordMassesSchema }),
  op("PATCH", "/api/wash-batches/[id]/schedule", "wash:write", "book or move a wash batch on a station lane; 409 on a stale version or overlap (technician, furnace operator, admin)", { body: batchesSchemas.scheduleWashBatchSchema }),
  op("POST", "/api/wash-batches/[id]/start", "wash:write", "the basket goes in now (inside staffed hours); units become washing (technician, furnace operator, admin)", { body: batchesSchemas.versionSchema }),
  op("POST", "/api/wash-batches/[id]/units", "wash:write", "put a green unit into a wash batch; 422 with the rule it breaks, 409 when stale (technician, furnace operator, admin)", { body: batchesSchemas.addUnitSchema }),
  op("DELETE", "/api/wash-batches/[id]/units/[unitId]", "wash:write", "take a unit out of a draft or scheduled wash batch; body or ?version= (technician, furnace operator, admin)", { query: batchesSchemas.removeUnitSchema }),
  op("GET", "/api/wash-stations", "shop:read", "wash stations (every role)"),
  op("POST", "/api/wash-stations", "setup:write", "add a wash station (admin)", { body: setupSchemas.washStationSchema }),
  op("PATCH", "/api/wash-stations/[id]", "setup:write", "change a wash station (admin)", { body: setupSchemas.updateWashStationSchema }),
  op("POST", "/api/webhook-deliveries/[id]/redeliver", "setup:write", "send this delivery again, same event id (admin)", { answers: ["delivery"] }),
  op("GET", "/api/webhooks", "setup:write", "registered endpoints with their waiting and failed deliveries; never the secret (admin)", { answers: ["endpoints"] }),
  op("POST", "/api/webhooks", "setup:write", "register an endpoint; the answer holds its signing secret, shown this once (admin)", { body: integrationsWebhookSignature.createWebhookSchema, answers: ["endpoint"], status: 201 }),
  op("PATCH", "/api/webhooks/[id]", "setup:write", "switch on or off, change events, resume after a pause; needs the version (admin)", { body: integrationsWebhookSignature.updateWebhookSchema, answers: ["endpoint"] }),
  op("GET", "/api/webhooks/[id]/deliveries", "setup:write", "the endpoint's delivery log, newest first (admin)", { answers: ["deliveries"] }),
  op("GET", "/api/openapi.json", "signed_in", "this description of the API, OpenAPI 3.1 (any signed-in person or token)"),
];
