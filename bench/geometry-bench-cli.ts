// Runs the geometry benchmark alone: npx tsx bench/geometry-bench-cli.ts
import { runGeometryBench } from "./geometry-bench";

async function main() {
  const results = await runGeometryBench();
  for (const r of results) {
    const verdict = r.ok === undefined ? "" : r.ok ? "  ok" : "  MISSED";
    console.log(`${r.name}: ${r.value} ${r.unit}${r.target ? ` (target ${r.target})` : ""}${verdict}`);
  }
  if (results.some((r) => r.ok === false)) process.exitCode = 1;
}

main().catch((err) => {
  console.error(err);
  process.exit(1);
});
