// Starts the local fakes, the built app and one worker against the test database for the
// integration and browser projects, and stops them afterwards. scripts/test.sh has already
// created, migrated and seeded the database and built the app.
import { startStack, stopProcs, type Proc } from "../../scripts/stack";

let procs: Proc[] = [];

export async function setup() {
  if (process.env.HEARTH_TEST_NO_STACK) return;
  const port = Number(process.env.PORT ?? 3100);
  // The tests stand in for a reverse proxy: they name client addresses in X-Forwarded-For.
  procs = await startStack({ port, env: { TRUSTED_PROXIES: "127.0.0.1, ::1", ...process.env }, quiet: !process.env.HEARTH_TEST_VERBOSE });
}

export async function teardown() {
  await stopProcs(procs);
}
