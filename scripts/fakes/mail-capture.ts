import { promises as fs, createWriteStream } from "node:fs";
import http from "node:http";
import path from "node:path";
import { SMTPServer } from "smtp-server";
import { simpleParser } from "mailparser";

export type CapturedMessage = {
  id: string;
  received_at: string;
  from: string;
  to: string[];
  subject: string;
  text: string;
  html: string;
  message_id: string | null;
  /** Name, type and size of each attachment (the bytes are not kept). */
  attachments?: Array<{ filename: string; content_type: string; size: number }>;
};

/**
 * A local SMTP capture server: accepts every message on loopback, keeps it (in memory and
 * appended to a JSON-lines file) and serves the list over a small HTTP API for /mail and tests.
 */
export async function startMailCapture(opts: { smtpPort: number; apiPort: number; dir: string; host?: string }) {
  const host = opts.host ?? "127.0.0.1";
  await fs.mkdir(opts.dir, { recursive: true });
  const file = path.join(opts.dir, "messages.jsonl");
  const messages: CapturedMessage[] = [];
  try {
    for (const line of (await fs.readFile(file, "utf8")).split("\n")) if (line.trim()) messages.push(JSON.parse(line));
  } catch {
    /* first start */
  }
  const out = createWriteStream(file, { flags: "a" });
  let down = false; // tests switch the relay "off" to check that the outbox keeps messages

  const smtp = new SMTPServer({
    authOptional: true,
    disabledCommands: ["STARTTLS"],
    banner: "Hearth mail capture",
    onConnect(_session, cb) {
      if (down) return cb(new Error("capture server is switched off"));
      cb();
    },
    onData(stream, session, cb) {
      simpleParser(stream)
        .then((parsed) => {
          const msg: CapturedMessage = {
            id: `${Date.now().toString(36)}-${Math.random().toString(36).slice(2, 8)}`,
            received_at: new Date().toISOString(),
            from: parsed.from?.text ?? String(session.envelope.mailFrom && session.envelope.mailFrom.address),
            to: session.envelope.rcptTo.map((r) => r.address),
            subject: parsed.subject ?? "",
            text: parsed.text ?? "",
            html: typeof parsed.html === "string" ? parsed.html : "",
            message_id: parsed.messageId ?? null,
            attachments: parsed.attachments.map((a) => ({ filename: a.filename ?? "", content_type: a.contentType, size: a.size })),
          };
          messages.push(msg);
          out.write(`${JSON.stringify(msg)}\n`);
          cb();
        })
        .catch((err) => cb(err));
    },
  });
  await new Promise<void>((resolve, reject) => {
    smtp.once("error", reject);
    smtp.listen(opts.smtpPort, host, () => {
      smtp.off("error", reject);
      resolve();
    });
  });
  // Once listening, a session's socket error (a sender killed mid-message: ECONNRESET) is that
  // session's end, not the server's: smtp-server reports it on the server, where an unheard
  // "error" event would bring the whole process down.
  smtp.on("error", (err: NodeJS.ErrnoException) => {
    if (err.code !== "ECONNRESET" && err.code !== "EPIPE") console.warn("[mail-capture]", err.message);
  });

  const api = http.createServer((req, res) => {
    const url = new URL(req.url ?? "/", `http://${host}`);
    const send = (status: number, body: unknown) => {
      res.writeHead(status, { "content-type": "application/json" });
      res.end(JSON.stringify(body));
    };
    if (url.pathname === "/health") return send(200, { ok: true, down, count: messages.length });
    if (url.pathname === "/messages" && req.method === "GET") {
      const to = url.searchParams.get("to")?.toLowerCase();
      const list = to ? messages.filter((m) => m.to.some((t) => t.toLowerCase() === to)) : messages;
      return send(200, { messages: [...list].reverse() });
    }
    if (url.pathname === "/messages" && req.method === "DELETE") {
      messages.length = 0;
      void fs.writeFile(file, "");
      return send(200, { ok: true });
    }
    if (url.pathname === "/switch" && req.method === "POST") {
      down = url.searchParams.get("down") === "1";
      return send(200, { ok: true, down });
    }
    send(404, { error: "not found" });
  });
  await new Promise<void>((resolve, reject) => {
    api.once("error", reject);
    api.listen(opts.apiPort, host, () => resolve());
  });

  return {
    close: async () => {
      await new Promise<void>((r) => smtp.close(() => r()));
      await new Promise<void>((r) => api.close(() => r()));
      out.end();
    },
  };
}
