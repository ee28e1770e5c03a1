// The last step of `npm run start:cluster`: nginx on PORT in front of two app instances
// (PORT+1, PORT+2) and two workers, with the local fakes, until Ctrl-C.
import path from "node:path";
import { DEMO_PASSWORD, DEMO_USERS } from "../db/seed-users";
import { startCluster } from "./cluster";

async function main() {
  const port = Number(process.env.PORT ?? 3000);
  const dir = path.resolve(process.env.HEARTH_DATA_DIR ?? ".data", "nginx");
  const cluster = await startCluster({ proxyPort: port, appPorts: [port + 1, port + 2], workers: 2, env: process.env, dir, fakes: true });
  console.log(`\n  Hearth is running behind nginx at ${cluster.url}`);
  console.log(`  app instances: http://127.0.0.1:${port + 1} (app-1), http://127.0.0.1:${port + 2} (app-2); 2 workers; nginx files in ${dir}`);
  console.log(`  Demo sign-ins (password "${DEMO_PASSWORD}"): ${DEMO_USERS.map((u) => u.email).join(", ")}`);
  console.log(`  Health: ${cluster.url}/api/health   Stop: Ctrl-C\n`);
  let stopping = false;
  const stop = async () => {
    if (stopping) return;
    stopping = true;
    console.log("\n[hearth] stopping nginx, the apps, the workers and the fakes");
    await cluster.stop();
    process.exit(0);
  };
  process.on("SIGINT", () => void stop());
  process.on("SIGTERM", () => void stop());
  const procs = [cluster.nginx, ...cluster.apps, ...cluster.workers, ...cluster.others];
  await Promise.race(procs.map((p) => p.exited));
  if (!stopping) {
    console.error("[hearth] a process stopped unexpectedly; shutting down the others");
    await stop();
  }
}

main().catch((err) => {
  console.error("[hearth] failed to start:", err instanceof Error ? err.message : err);
  process.exit(1);
});
