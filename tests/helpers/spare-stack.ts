// A second Hearth beside the test run's own: ports moved by `offset` inside the slot's range
// (scripts/test.sh gives each slot twenty), so that it never meets the run's stack or another slot.
import { spawn, type ChildProcess } from "node:child_process";
import path from "node:path";

/** Where the test run's own stack writes its processes' output (tests/helpers/global-setup.ts). */
export const stackLogDir = () => path.resolve(process.env.HEARTH_DATA_DIR ?? ".data/test", "logs");

export function spareStackEnv(offset: number): Record<string, string> {
  const from = (name: string, fallback: number) => String(Number(process.env[name] ?? fallback) + offset);
  const port = from("PORT", 3100);
  const smtp = from("SMTP_PORT", 2625);
  const capture = from("MAIL_CAPTURE_PORT", 2626);
  const s3 = from("S3_PORT", 4669);
  const webhooks = from("WEBHOOK_RECEIVER_PORT", 2527);
  return {
    WEBHOOK_RECEIVER_PORT: webhooks,
    WEBHOOK_RECEIVER_URL: `http://127.0.0.1:${webhooks}`,
    PORT: port,
    SMTP_PORT: smtp,
    MAIL_CAPTURE_PORT: capture,
    S3_PORT: s3,
    APP_URL: `http://127.0.0.1:${port}`,
    MAIL_CAPTURE_URL: `http://127.0.0.1:${capture}`,
    S3_ENDPOINT: `http://127.0.0.1:${s3}`,
    SMTP_HOST: "127.0.0.1",
  };
}

export type Spawned = { child: ChildProcess; output: () => string; exited: Promise<number | null>; stop: (graceMs?: number) => Promise<void> };

/** Spawns a command in a process group of its own, keeping its output for the checks. */
export function spawnCollecting(command: string, args: string[], opts: { cwd?: string; env: NodeJS.ProcessEnv }): Spawned {
  const child = spawn(command, args, { cwd: opts.cwd, env: opts.env, stdio: ["ignore", "pipe", "pipe"], detached: true });
  let out = "";
  child.stdout?.on("data", (c: Buffer) => (out += c.toString()));
  child.stderr?.on("data", (c: Buffer) => (out += c.toString()));
  const exited = new Promise<number | null>((resolve) => child.on("exit", (code) => resolve(code)));
  const signalGroup = (sig: NodeJS.Signals) => {
    try {
      process.kill(-child.pid!, sig);
    } catch {
      // already gone
    }
  };
  return {
    child,
    output: () => out,
    exited,
    stop: async (graceMs = 20_000) => {
      if (child.exitCode !== null || child.signalCode !== null) return;
      signalGroup("SIGTERM");
      const timer = setTimeout(() => signalGroup("SIGKILL"), graceMs);
      await exited;
      clearTimeout(timer);
    },
  };
}

export async function waitUntil<T>(what: string, fn: () => Promise<T | null | undefined | false>, timeoutMs: number, everyMs = 250): Promise<T> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const v = await fn().catch(() => null);
    if (v) return v;
    if (Date.now() > deadline) throw new Error(`${what}: not within ${timeoutMs} ms`);
    await new Promise((r) => setTimeout(r, everyMs));
  }
}
