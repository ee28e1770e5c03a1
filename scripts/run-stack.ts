// The last step of `npm start`: runs the fakes, the app and the worker until Ctrl-C.
import { DEMO_PASSWORD, DEMO_USERS } from "../db/seed-users";
import { ROLE_LABELS } from "../lib/auth/permissions";
import { startStack, stopProcs } from "./stack";

async function main() {
  const port = Number(process.env.PORT ?? 3000);
  const procs = await startStack({ port, env: process.env });
  const url = `http://127.0.0.1:${port}`;
  console.log(`\n  Hearth is running at ${url}\n\n  Demo sign-ins (password "${DEMO_PASSWORD}"):`);
  for (const u of DEMO_USERS) console.log(`    ${ROLE_LABELS[u.role].padEnd(17)} ${u.email}`);
  console.log(`\n  Health: ${url}/api/health   Stop: Ctrl-C\n`);

  let stopping = false;
  const stop = async () => {
    if (stopping) return;
    stopping = true;
    console.log("\n[hearth] stopping the app, the worker and the fakes");
    await stopProcs(procs);
    process.exit(0);
  };
  process.on("SIGINT", () => void stop());
  process.on("SIGTERM", () => void stop());
  // If any process dies, stop the rest rather than leave half a shop running.
  await Promise.race(procs.map((p) => p.exited.then((code) => ({ p, code }))));
  if (!stopping) {
    console.error("[hearth] a process stopped unexpectedly; shutting down the others");
    await stop();
  }
}

main().catch((err) => {
  console.error("[hearth] failed to start:", err instanceof Error ? err.message : err);
  process.exit(1);
});
