// Starts the local fakes, the built app and one worker against the test database for the
// integration and browser projects, and stops them afterwards. scripts/test.sh has already
// created, migrated and seeded the database and built the app.
import fs from "node:fs";
import { startStack, stopProcs, type Proc } from "../../scripts/stack";
import { stackLogDir } from "./spare-stack";

let procs: Proc[] = [];

export async function setup() {
  if (process.env.HEARTH_TEST_NO_STACK) return;
  const port = Number(process.env.PORT ?? 3100);
  // The tests stand in for a reverse proxy: they name client addresses in X-Forwarded-For.
  // Each process's output also goes to <data dir>/logs/<name>.log (the log tests read app.log).
  const logDir = stackLogDir();
  fs.rmSync(logDir, { recursive: true, force: true });
  procs = await startStack({ port, env: { TRUSTED_PROXIES: "127.0.0.1, ::1", ...process.env }, quiet: !process.env.HEARTH_TEST_VERBOSE, logDir });
}

export async function teardown() {
  await stopProcs(procs);
}
