import http from "node:http";
import { EVENT_ID_HEADER, EVENT_TYPE_HEADER, SIGNATURE_HEADER, verifySignature } from "../../lib/integrations/webhook-signature";

// A local webhook receiver: endpoints are /hooks/<name>. Each keeps the deliveries it got, checks
// their Hearth-Signature against the secret registered for the name with the documented scheme
// (lib/integrations/webhook-signature.ts, README "Webhooks"), and can be told to fail.
//   PUT    /_fake/hooks/<name>   {"secret": "...", "fail_next": 2, "fail_status": 500, "delay_ms": 0}
//   GET    /_fake/hooks/<name>   {"deliveries": [{ event_id, type, verified, reason, status, body, received_at }]}
//   DELETE /_fake/hooks/<name>   forget it

export type ReceivedDelivery = { event_id: string | null; type: string | null; verified: boolean; reason: string | null; status: number; body: unknown; received_at: string };
type Hook = { secret: string | null; fail_next: number; fail_status: number; delay_ms: number; deliveries: ReceivedDelivery[] };

const MAX_BODY = 1 << 20;

function readBody(req: http.IncomingMessage): Promise<string> {
  return new Promise((resolve, reject) => {
    let size = 0;
    const chunks: Buffer[] = [];
    req.on("data", (c: Buffer) => {
      size += c.length;
      if (size > MAX_BODY) req.destroy(new Error("body too large"));
      else chunks.push(c);
    });
    req.on("end", () => resolve(Buffer.concat(chunks).toString("utf8")));
    req.on("error", reject);
  });
}

export async function startWebhookReceiver(opts: { port: number; host?: string }) {
  const hooks = new Map<string, Hook>();
  const hook = (name: string) => {
    let h = hooks.get(name);
    if (!h) hooks.set(name, (h = { secret: null, fail_next: 0, fail_status: 500, delay_ms: 0, deliveries: [] }));
    return h;
  };
  const json = (res: http.ServerResponse, status: number, body: unknown) => {
    res.writeHead(status, { "content-type": "application/json" });
    res.end(JSON.stringify(body));
  };

  const server = http.createServer(async (req, res) => {
    try {
      const url = new URL(req.url ?? "/", "http://fake");
      const control = /^\/_fake\/hooks\/([\w.-]{1,80})$/.exec(url.pathname);
      const endpoint = /^\/hooks\/([\w.-]{1,80})$/.exec(url.pathname);
      if (control) {
        const name = control[1];
        if (req.method === "GET") return json(res, 200, { deliveries: hooks.get(name)?.deliveries ?? [] });
        if (req.method === "DELETE") return (hooks.delete(name), json(res, 200, { ok: true }));
        if (req.method === "PUT") {
          const cfg = JSON.parse((await readBody(req)) || "{}") as Partial<Hook>;
          const h = hook(name);
          if (typeof cfg.secret === "string") h.secret = cfg.secret;
          if (typeof cfg.fail_next === "number") h.fail_next = cfg.fail_next;
          if (typeof cfg.fail_status === "number") h.fail_status = cfg.fail_status;
          if (typeof cfg.delay_ms === "number") h.delay_ms = cfg.delay_ms;
          return json(res, 200, { ok: true });
        }
        return json(res, 405, { error: "GET, PUT or DELETE" });
      }
      if (endpoint && req.method === "POST") {
        const h = hook(endpoint[1]);
        const raw = await readBody(req);
        if (h.delay_ms) await new Promise((r) => setTimeout(r, h.delay_ms));
        const check = h.secret ? verifySignature(h.secret, req.headers[SIGNATURE_HEADER.toLowerCase()] as string | undefined, raw, Math.floor(Date.now() / 1000)) : { ok: false as const, reason: "no secret registered" };
        const failing = h.fail_next > 0;
        if (failing) h.fail_next--;
        const status = failing ? h.fail_status : check.ok ? 204 : 401;
        let body: unknown = raw;
        try {
          body = JSON.parse(raw);
        } catch {
          /* kept as text */
        }
        h.deliveries.push({
          event_id: (req.headers[EVENT_ID_HEADER.toLowerCase()] as string) ?? null,
          type: (req.headers[EVENT_TYPE_HEADER.toLowerCase()] as string) ?? null,
          verified: check.ok,
          reason: check.ok ? null : check.reason,
          status,
          body,
          received_at: new Date().toISOString(),
        });
        res.writeHead(status);
        return res.end();
      }
      json(res, 404, { error: "POST /hooks/<name>, or /_fake/hooks/<name> to read and configure" });
    } catch (err) {
      json(res, 400, { error: (err as Error).message });
    }
  });
  await new Promise<void>((resolve) => server.listen(opts.port, opts.host ?? "127.0.0.1", resolve));
  return { close: () => new Promise<void>((resolve) => server.close(() => resolve())) };
}
