// A second Hearth beside the test run's own: ports moved by `offset` inside the slot's range
// (scripts/test.sh gives each slot twenty), so that it never meets the run's stack or another slot.
import { execFileSync, spawn, type ChildProcess } from "node:child_process";
import path from "node:path";

/** Where the test run's own stack writes its processes' output (tests/helpers/global-setup.ts). */
export const stackLogDir = () => path.resolve(process.env.HEARTH_DATA_DIR ?? ".data/test", "logs");

/**
 * The run's stack moved by `offset` ports: the names and addresses come from the one place that
 * lists them, scripts/lib.sh's stack_env, asked in a clean shell so that none is inherited.
 */
export function spareStackEnv(offset: number): Record<string, string> {
  // scripts/test.sh starts the run's stack at PORT = 3000 + its base.
  const base = Number(process.env.PORT ?? 3100) - 3000 + offset;
  const script = 'source scripts/lib.sh && before="$(compgen -e | sort)" && stack_env "$1" && for v in $(comm -13 <(printf "%s\\n" "$before") <(compgen -e | sort)); do printf "%s=%s\\n" "$v" "${!v}"; done';
  const out = execFileSync("bash", ["-c", script, "spare-stack", String(base)], { cwd: path.resolve(__dirname, "../.."), env: { PATH: process.env.PATH ?? "/usr/bin:/bin", NODE_ENV: "test" }, encoding: "utf8", stdio: ["ignore", "pipe", "pipe"] });
  const env: Record<string, string> = {};
  for (const line of out.split("\n")) {
    const at = line.indexOf("=");
    if (at > 0 && line.slice(0, at) !== "HEARTH_DATA_DIR") env[line.slice(0, at)] = line.slice(at + 1);
  }
  if (!env.PORT || !env.APP_URL) throw new Error(`scripts/lib.sh stack_env gave no ports: ${out}`);
  return env;
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
