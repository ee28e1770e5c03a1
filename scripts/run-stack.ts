// The last step of `npm start`: runs the fakes, the app and the worker until Ctrl-C.
import { DEMO_PASSWORD, DEMO_USERS } from "../db/seed-users";
import { ROLE_LABELS } from "../lib/auth/permissions";
import { stackSpecs, Supervisor, waitFor } from "./stack";

async function main() {
  const port = Number(process.env.PORT ?? 3000);
  // A worker, fake or app that crashes starts again by itself while the rest keep running.
  const supervisor = new Supervisor(stackSpecs({ port, env: process.env }));
  let stopping = false;
  const stop = async () => {
    if (stopping) return;
    stopping = true;
    console.log("\n[hearth] stopping the app, the worker and the fakes");
    await supervisor.stop();
    process.exit(0);
  };
  process.on("SIGINT", () => void stop());
  process.on("SIGTERM", () => void stop());
  supervisor.start();
  try {
    await waitFor(`http://127.0.0.1:${port}/api/health`, 90_000, (s) => s === 200);
  } catch (err) {
    await supervisor.stop();
    throw err;
  }
  const url = `http://127.0.0.1:${port}`;
  console.log(`\n  Hearth is running at ${url}\n\n  Demo sign-ins (password "${DEMO_PASSWORD}"):`);
  for (const u of DEMO_USERS) console.log(`    ${ROLE_LABELS[u.role].padEnd(17)} ${u.email}`);
  console.log(`\n  Health: ${url}/api/health   Stop: Ctrl-C\n`);
}

main().catch((err) => {
  console.error("[hearth] failed to start:", err instanceof Error ? err.message : err);
  process.exit(1);
});
