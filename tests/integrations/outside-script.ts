// Another shop program, as its authors would write it from Hearth's published API description:
// it holds an API token and reads /api/openapi.json, and knows nothing else of Hearth (no import
// from the app). It finds each call by its operationId, checks every body it sends against the
// described JSON Schema (Ajv, draft 2020-12, the dialect OpenAPI 3.1 uses) and every answer's
// status against the described responses. Its own webhook endpoint is the local receiver fake.
import Ajv2020 from "ajv/dist/2020";

type Json = Record<string, unknown>;
type Operation = { method: string; path: string; op: Json };

export type OutsideConfig = {
  baseUrl: string;
  token: string;
  /** This program's own webhook endpoint (the receiver fake), without the trailing name. */
  receiverUrl: string;
  hookName: string;
  printer: string;
  washStation: string;
  furnace: string;
  material: string;
  log?: (line: string) => void;
};

export class OutsideClient {
  private ops = new Map<string, Operation>();
  private ajv = new Ajv2020({ strict: false, validateFormats: false, allErrors: true });
  readonly calls: string[] = [];

  private constructor(private cfg: OutsideConfig, readonly doc: Json) {
    for (const [path, item] of Object.entries(doc.paths as Record<string, Record<string, Json>>)) {
      for (const [method, op] of Object.entries(item)) this.ops.set(op.operationId as string, { method: method.toUpperCase(), path, op });
    }
  }

  static async connect(cfg: OutsideConfig): Promise<OutsideClient> {
    const res = await fetch(`${cfg.baseUrl}/api/openapi.json`, { headers: { authorization: `Bearer ${cfg.token}` } });
    if (res.status !== 200) throw new Error(`openapi.json: ${res.status}`);
    const doc = (await res.json()) as Json;
    if (doc.openapi !== "3.1.0") throw new Error(`not OpenAPI 3.1: ${String(doc.openapi)}`);
    return new OutsideClient(cfg, doc);
  }

  operation(id: string): Operation {
    const found = this.ops.get(id);
    if (!found) throw new Error(`the description has no operation ${id}`);
    return found;
  }

  /** The JSON Schema the description gives for an operation's JSON body. */
  bodySchema(id: string): Json | undefined {
    const rb = this.operation(id).op.requestBody as { content?: Record<string, { schema: Json }> } | undefined;
    return rb?.content?.["application/json"]?.schema;
  }

  async call<T = Json>(id: string, opts: { params?: Record<string, string>; query?: Record<string, string>; body?: unknown } = {}): Promise<T> {
    const { method, path, op } = this.operation(id);
    const url = new URL(this.cfg.baseUrl + path.replace(/\{(\w+)\}/g, (_, k: string) => {
      const v = opts.params?.[k];
      if (v === undefined) throw new Error(`${id}: path parameter ${k} missing`);
      return encodeURIComponent(v);
    }));
    for (const [k, v] of Object.entries(opts.query ?? {})) url.searchParams.set(k, v);
    const schema = this.bodySchema(id);
    if (opts.body !== undefined) {
      if (!schema) throw new Error(`${id} takes no JSON body`);
      const validate = this.ajv.compile(schema);
      if (!validate(opts.body)) throw new Error(`${id}: the body does not match the description: ${this.ajv.errorsText(validate.errors)}`);
    }
    const res = await fetch(url, {
      method,
      headers: { authorization: `Bearer ${this.cfg.token}`, ...(opts.body !== undefined ? { "content-type": "application/json" } : {}) },
      body: opts.body !== undefined ? JSON.stringify(opts.body) : undefined,
    });
    const text = await res.text();
    this.calls.push(`${id} ${res.status}`);
    this.cfg.log?.(`${method} ${url.pathname} → ${res.status}`);
    const responses = op.responses as Record<string, { content?: Record<string, { schema?: { required?: string[] } }> }>;
    if (!responses[String(res.status)]) throw new Error(`${id}: answered ${res.status}, which the description does not list`);
    if (res.status >= 300) throw new Error(`${id}: ${res.status} ${text.slice(0, 500)}`);
    const body = text ? (JSON.parse(text) as Json) : {};
    for (const key of responses[String(res.status)].content?.["application/json"]?.schema?.required ?? []) {
      if (!(key in body)) throw new Error(`${id}: the answer lacks "${key}", which the description promises`);
    }
    return body as T;
  }
}

type Row = { id: string; version: number; [k: string]: unknown };
const one = (body: Json, key: string): Row => (key in body ? (body[key] as Row) : (body as Row));

/**
 * Creates an order with a part of two units, groups them into a build and schedules it, records
 * the print, the wash and the furnace load, and returns once its own endpoint has received the
 * signed furnace_run.finished notice for that run (the worker sends it when the cycle ends).
 */
export async function runOutsideScript(cfg: OutsideConfig, opts: { waitMs: number }) {
  const api = await OutsideClient.connect(cfg);
  const stamp = Date.now().toString(36).toUpperCase();

  // What the shop calls its equipment and materials: looked up by name, as a person would say them.
  const materials = (await api.call<{ materials: Row[] }>("getMaterials")).materials;
  const material = materials.find((m) => m.code === cfg.material);
  const printer = (await api.call<{ printers: Row[] }>("getPrinters")).printers.find((p) => p.name === cfg.printer);
  const station = (await api.call<{ wash_stations: Row[] }>("getWashStations")).wash_stations.find((s) => s.name === cfg.washStation);
  const furnace = (await api.call<{ furnaces: Row[] }>("getFurnaces")).furnaces.find((f) => f.name === cfg.furnace);
  if (!material || !printer || !station || !furnace) throw new Error("the shop's equipment or material is not there");

  // Its own endpoint for the notices, signed with a secret Hearth shows once.
  const hook = await api.call<{ endpoint: { id: string; secret: string } }>("postWebhooks", {
    body: { url: `${cfg.receiverUrl}/hooks/${cfg.hookName}`, description: `outside script ${stamp}`, events: ["order.created", "build.scheduled", "furnace_run.finished"] },
  });
  await fetch(`${cfg.receiverUrl}/_fake/hooks/${cfg.hookName}`, { method: "PUT", headers: { "content-type": "application/json" }, body: JSON.stringify({ secret: hook.endpoint.secret }) });

  const order = one(await api.call("postOrders", {
    body: { code: `EXT-${stamp}`, customer: "Outside ordering system", project: "", due_at: new Date(Date.now() + 21 * 86_400_000).toISOString(), priority: 3, notes: "" },
  }), "order");
  const part = one(await api.call("postParts", {
    body: {
      order_id: order.id, part_number: `EXT-P-${stamp}`, revision: "A", name: "Bracket from the outside", material_id: material.id, quantity: 2,
      nominal_x_mm: 20, nominal_y_mm: 16, nominal_z_mm: 8, thickest_wall_mm: 4,
      stock_x_neg_mm: 0, stock_x_pos_mm: 0, stock_y_neg_mm: 0, stock_y_pos_mm: 0, stock_z_neg_mm: 0, stock_z_pos_mm: 0,
      finishing_notes: "", target_ra_um: null, tolerance_um: null, tolerance_grade: null,
    },
  }), "part");
  const unitsNow = async () => (await api.call<{ rows: Row[] }>("getUnits", { query: { part_id: part.id, page_size: "50" } })).rows;
  let units = await unitsNow();
  if (units.length !== 2) throw new Error(`expected 2 planned units, got ${units.length}`);

  // The build, scheduled on the printer, printed.
  let build = one(await api.call("postBuilds", { body: { unit_ids: units.map((u) => u.id), material_lot: "", notes: "" } }), "build");
  build = one(await api.call("patchBuildsByIdSchedule", { params: { id: build.id }, body: { version: build.version, printer_id: printer.id, starts_at: new Date(Date.now() + 60_000).toISOString() } }), "build");
  const scheduled = { ...build };
  build = one(await api.call("postBuildsByIdActions", { params: { id: build.id }, body: { action: "start", version: build.version } }), "build");
  build = one(await api.call("postBuildsByIdActions", { params: { id: build.id }, body: { action: "complete", version: build.version } }), "build");

  // Washed: weighed green, then brown with at least the material's minimum mass loss.
  units = await unitsNow();
  let wash = one(await api.call("postWashBatches", { body: { wash_station_id: station.id, notes: "" } }), "batch");
  for (const u of units) wash = one(await api.call("postWashBatchesByIdUnits", { params: { id: wash.id }, body: { version: wash.version, unit_id: u.id, unit_version: u.version } }), "batch");
  wash = one(await api.call("postWashBatchesByIdStart", { params: { id: wash.id }, body: { version: wash.version } }), "batch");
  const loss = Number(material.min_mass_loss) + 0.01;
  wash = one(await api.call("postWashBatchesByIdFinish", {
    params: { id: wash.id },
    body: { version: wash.version, masses: units.map((u) => ({ unit_id: u.id, green_mass_g: 50, brown_mass_g: Math.round(50 * (1 - loss) * 10) / 10 })) },
  }), "batch");

  // Into the furnace once the washed units count as brown (after the shop's drying time).
  const dryBy = Date.now() + opts.waitMs;
  while ((units = await unitsNow()).some((u) => u.state !== "brown")) {
    if (Date.now() > dryBy) throw new Error(`units not brown: ${units.map((u) => u.state).join(", ")}`);
    await new Promise((r) => setTimeout(r, 1000));
  }
  let run = one(await api.call("postFurnaceRuns", { body: { furnace_id: furnace.id, profile_id: material.default_profile_id, notes: "" } }), "run");
  for (const u of units) run = one(await api.call("postFurnaceRunsByIdUnits", { params: { id: run.id }, body: { version: run.version, unit_id: u.id, unit_version: u.version } }), "run");
  // The loading checklist's items are the ones the description requires.
  const checklistSchema = (api.bodySchema("postFurnaceRunsByIdStart")!.properties as Record<string, { required?: string[] }>).checklist;
  const checklist = Object.fromEntries((checklistSchema.required ?? []).map((k) => [k, true]));
  run = one(await api.call("postFurnaceRunsByIdStart", { params: { id: run.id }, body: { version: run.version, checklist } }), "run");

  // Nothing more to do: the notice arrives when the cycle ends.
  type Delivery = { event_id: string; type: string; verified: boolean; reason: string | null; body: { id: string; type: string; data: Json } };
  const until = Date.now() + opts.waitMs;
  let finished: Delivery | undefined;
  let all: Delivery[] = [];
  while (!finished && Date.now() < until) {
    all = ((await (await fetch(`${cfg.receiverUrl}/_fake/hooks/${cfg.hookName}`)).json()) as { deliveries: Delivery[] }).deliveries;
    finished = all.find((d) => d.type === "furnace_run.finished" && d.body.data.id === run.id);
    if (!finished) await new Promise((r) => setTimeout(r, 500));
  }
  return { order, part, build: scheduled, run, wash, finished, deliveries: all, calls: api.calls };
}
