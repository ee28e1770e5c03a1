// Starts and stops the processes of a running Hearth: the local fakes, the web app, the worker.
import { spawn, type ChildProcess } from "node:child_process";
import path from "node:path";

export type Proc = { name: string; child: ChildProcess; exited: Promise<number | null> };

const COLORS: Record<string, string> = { app: "38;5;173", worker: "38;5;108", fakes: "38;5;110" };

export function startProc(name: string, command: string, args: string[], env: NodeJS.ProcessEnv = process.env, quiet = false): Proc {
  const child = spawn(command, args, { env, stdio: ["ignore", "pipe", "pipe"], detached: false });
  const prefix = `\x1b[${COLORS[name] ?? "37"}m[${name}]\x1b[0m `;
  const pipe = (stream: NodeJS.ReadableStream | null, out: NodeJS.WriteStream) => {
    if (!stream) return;
    let buf = "";
    stream.on("data", (chunk: Buffer) => {
      buf += chunk.toString();
      const lines = buf.split("\n");
      buf = lines.pop() ?? "";
      if (!quiet) for (const line of lines) out.write(prefix + line + "\n");
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

export type StackOptions = { port: number; env: NodeJS.ProcessEnv; quiet?: boolean };

/**
 * The built app's web server (scripts/serve.ts) in one process, so that a signal reaches it
 * directly; PORT says where it listens.
 */
export function startApp(port: number, env: NodeJS.ProcessEnv, quiet = false): Proc {
  return startProc("app", process.execPath, ["--import", "tsx", "scripts/serve.ts"], { ...env, PORT: String(port), HOSTNAME: "127.0.0.1" }, quiet);
}

/** The fakes, the web server and one worker; resolves when the app answers its health check. */
export async function startStack({ port, env, quiet }: StackOptions): Promise<Proc[]> {
  const procs: Proc[] = [];
  procs.push(startProc("fakes", bin("tsx"), ["scripts/fakes.ts"], env, quiet));
  procs.push(startProc("worker", bin("tsx"), ["worker/index.ts"], env, quiet));
  procs.push(startApp(port, env, quiet));
  try {
    await waitFor(`http://127.0.0.1:${port}/api/health`, 90_000, (s) => s === 200);
  } catch (err) {
    await stopProcs(procs);
    throw err;
  }
  return procs;
}
