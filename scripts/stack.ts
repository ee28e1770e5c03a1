// Starts and stops the processes of a running Hearth: the local fakes, the web app, the worker.
import { spawn, type ChildProcess } from "node:child_process";
import fs from "node:fs";
import path from "node:path";

export type Proc = { name: string; child: ChildProcess; exited: Promise<number | null> };

const COLORS: Record<string, string> = { app: "38;5;173", worker: "38;5;108", fakes: "38;5;110" };

/**
 * Spawns one process of the stack; its lines go to the terminal with a coloured prefix (unless
 * quiet) and, when logDir is given, unprefixed to logDir/<name>.log as well (the tests read them).
 */
export function startProc(name: string, command: string, args: string[], env: NodeJS.ProcessEnv = process.env, quiet = false, logDir?: string): Proc {
  const child = spawn(command, args, { env, stdio: ["ignore", "pipe", "pipe"], detached: false });
  const prefix = `\x1b[${COLORS[name] ?? "37"}m[${name}]\x1b[0m `;
  let file: fs.WriteStream | undefined;
  if (logDir) {
    fs.mkdirSync(logDir, { recursive: true });
    file = fs.createWriteStream(path.join(logDir, `${name}.log`), { flags: "a" });
    child.on("exit", () => file?.end());
  }
  const pipe = (stream: NodeJS.ReadableStream | null, out: NodeJS.WriteStream) => {
    if (!stream) return;
    let buf = "";
    stream.on("data", (chunk: Buffer) => {
      buf += chunk.toString();
      const lines = buf.split("\n");
      buf = lines.pop() ?? "";
      for (const line of lines) {
        if (!quiet) out.write(prefix + line + "\n");
        file?.write(line + "\n");
      }
    });
  };
  pipe(child.stdout, process.stdout);
  pipe(child.stderr, process.stderr);
  const exited = new Promise<number | null>((resolve) => child.on("exit", (code) => resolve(code)));
  return { name, child, exited };
}

export const bin = (name: string) => path.resolve("node_modules/.bin", name);

export async function waitFor(url: string, timeoutMs: number, ok: (status: number) => boolean = (s) => s < 500): Promise<void> {
  const deadline = Date.now() + timeoutMs;
  let last = "";
  while (Date.now() < deadline) {
    try {
      const res = await fetch(url, { signal: AbortSignal.timeout(3000) });
      if (ok(res.status)) return;
      last = `status ${res.status}`;
    } catch (err) {
      last = err instanceof Error ? err.message : String(err);
    }
    await new Promise((r) => setTimeout(r, 300));
  }
  throw new Error(`${url} did not answer in ${timeoutMs} ms (${last})`);
}

export async function stopProcs(procs: Proc[], graceMs = 10_000) {
  await Promise.all(
    procs.map(async (p) => {
      if (p.child.exitCode !== null) return;
      p.child.kill("SIGTERM");
      const timer = setTimeout(() => p.child.kill("SIGKILL"), graceMs);
      await p.exited;
      clearTimeout(timer);
    }),
  );
}

export type StackOptions = { port: number; env: NodeJS.ProcessEnv; quiet?: boolean; logDir?: string };

/**
 * The built app's web server (scripts/serve.ts) in one process, so that a signal reaches it
 * directly; PORT says where it listens.
 */
export function startApp(port: number, env: NodeJS.ProcessEnv, quiet = false, logDir?: string): Proc {
  return startProc("app", process.execPath, ["--import", "tsx", "scripts/serve.ts"], { ...env, PORT: String(port), HOSTNAME: "127.0.0.1" }, quiet, logDir);
}

/**
 * How to start each process of a running Hearth: the fakes, one worker and the web server. The
 * worker runs as one node process (not tsx's wrapper), so that a signal reaches it directly.
 */
export function stackSpecs({ port, env, quiet, logDir }: StackOptions): ProcSpec[] {
  return [
    { name: "fakes", start: () => startProc("fakes", process.execPath, ["--import", "tsx", "scripts/fakes.ts"], env, quiet, logDir) },
    { name: "worker", start: () => startProc("worker", process.execPath, ["--import", "tsx", "worker/index.ts"], env, quiet, logDir) },
    { name: "app", start: () => startApp(port, env, quiet, logDir) },
  ];
}

/** The fakes, the web server and one worker; resolves when the app answers its health check. */
export async function startStack(options: StackOptions): Promise<Proc[]> {
  const procs = stackSpecs(options).map((s) => s.start());
  const { port } = options;
  try {
    await waitFor(`http://127.0.0.1:${port}/api/health`, 90_000, (s) => s === 200);
  } catch (err) {
    await stopProcs(procs);
    throw err;
  }
  return procs;
}

export type ProcSpec = { name: string; start: () => Proc };

export type SupervisorOptions = {
  /** first wait before a restart; it doubles with each crash up to maxDelayMs */
  baseDelayMs?: number;
  maxDelayMs?: number;
  /** a process that ran this long before it stopped starts again after baseDelayMs */
  healthyMs?: number;
  log?: (line: string) => void;
};

/**
 * Keeps each process running: one that stops without being asked to starts again after a wait
 * that doubles with every crash in a row (1 s, 2 s, 4 s … 30 s) and falls back to the first
 * after a minute of healthy running, so that a crash loop neither spins nor gives up.
 */
export class Supervisor {
  readonly procs = new Map<string, Proc>();
  private readonly delays = new Map<string, number>();
  private readonly timers = new Set<NodeJS.Timeout>();
  private stopping = false;
  private readonly base: number;
  private readonly max: number;
  private readonly healthy: number;
  private readonly log: (line: string) => void;

  constructor(
    private readonly specs: ProcSpec[],
    opts: SupervisorOptions = {},
  ) {
    this.base = opts.baseDelayMs ?? 1_000;
    this.max = opts.maxDelayMs ?? 30_000;
    this.healthy = opts.healthyMs ?? 60_000;
    this.log = opts.log ?? ((line) => console.error(line));
  }

  start(): void {
    for (const spec of this.specs) this.launch(spec);
  }

  private launch(spec: ProcSpec): void {
    const proc = spec.start();
    const startedAt = Date.now();
    this.procs.set(spec.name, proc);
    proc.child.on("exit", (code, signal) => {
      if (this.stopping) return;
      const ranMs = Date.now() - startedAt;
      const previous = this.delays.get(spec.name);
      const delay = previous === undefined || ranMs >= this.healthy ? this.base : Math.min(previous * 2, this.max);
      this.delays.set(spec.name, delay);
      this.log(`[hearth] ${spec.name} stopped (${signal ?? `exit ${code}`}) after ${Math.round(ranMs / 1000)} s; starting it again in ${delay / 1000} s`);
      const timer = setTimeout(() => {
        this.timers.delete(timer);
        if (!this.stopping) this.launch(spec);
      }, delay);
      this.timers.add(timer);
    });
  }

  async stop(graceMs?: number): Promise<void> {
    this.stopping = true;
    for (const t of this.timers) clearTimeout(t);
    this.timers.clear();
    await stopProcs([...this.procs.values()], graceMs);
  }
}
