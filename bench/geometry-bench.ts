// Geometry throughput: a 1,000,000-triangle binary STL read plainly, then read, parsed and
// measured; and the closed-mesh check on the same triangles. Imported by bench/run.ts.

import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { sphereWithTriangles, writeBinaryStl } from "@/lib/geometry/generate";
import { checkClosedMesh } from "@/lib/geometry/mesh";
import { parseStl } from "@/lib/geometry/stl";
import { median } from "./stats";

export type BenchResult = { name: string; value: number; unit: string; target?: string; ok?: boolean };

const TRIANGLES = 1_000_000;
const RUNS = 7;

function time<T>(fn: () => T): [number, T] {
  const t0 = performance.now();
  const value = fn();
  return [(performance.now() - t0) / 1000, value];
}

export async function runGeometryBench(): Promise<BenchResult[]> {
  const file = path.join(os.tmpdir(), `hearth-geometry-bench-${process.pid}.stl`);
  const soup = sphereWithTriangles(TRIANGLES);
  fs.writeFileSync(file, writeBinaryStl(soup));
  try {
    const bytes = fs.statSync(file).size;
    const mb = bytes / 1e6;
    // Warm the page cache and the JIT once, so every timed run sees the same conditions.
    parseStl(fs.readFileSync(file));

    const read: number[] = [];
    const readSum: number[] = [];
    const parse: number[] = [];
    const parseInPlace: number[] = [];
    let triangles = 0;
    for (let r = 0; r < RUNS; r++) {
      // Interleaved, so drift in machine load affects all three alike.
      read.push(time(() => fs.readFileSync(file).length)[0]);
      readSum.push(
        time(() => {
          const b = fs.readFileSync(file);
          let s = 0;
          for (let i = 0; i < b.length; i++) s += b[i];
          return s;
        })[0],
      );
      const [t, parsed] = time(() => parseStl(fs.readFileSync(file)));
      parse.push(t);
      triangles = parsed.triangleCount;
      parseInPlace.push(time(() => parseStl(fs.readFileSync(file), { reuseInput: true }))[0]);
    }
    if (triangles !== TRIANGLES) throw new Error(`parsed ${triangles} triangles, expected ${TRIANGLES}`);

    const positions = parseStl(fs.readFileSync(file)).positions;
    const closedTimes: number[] = [];
    let closed = false;
    for (let r = 0; r < 3; r++) {
      const [t, report] = time(() => checkClosedMesh(positions));
      closedTimes.push(t);
      closed = report.closed;
    }
    if (!closed) throw new Error("the benchmark sphere should be closed");

    const readMbS = mb / median(read);
    const readSumMbS = mb / median(readSum);
    const parseMbS = mb / median(parse);
    const ratio = parseMbS / readMbS;
    const inPlaceMbS = mb / median(parseInPlace);
    const inPlaceRatio = inPlaceMbS / readMbS;
    const closedS = median(closedTimes);
    const label = `1M-triangle binary STL, ${mb.toFixed(1)} MB`;
    return [
      { name: `geometry: plain read (${label})`, value: round(readMbS), unit: "MB/s" },
      { name: "geometry: read + byte sum", value: round(readSumMbS), unit: "MB/s" },
      { name: "geometry: read + parse + measure", value: round(parseMbS), unit: "MB/s" },
      {
        name: "geometry: parse-and-measure / plain-read throughput",
        value: Math.round(ratio * 1000) / 1000,
        unit: "ratio",
        target: "≥ 0.25",
        ok: ratio >= 0.25,
      },
      { name: "geometry: read + parse + measure, vertices over the input (reuseInput)", value: round(inPlaceMbS), unit: "MB/s" },
      {
        name: "geometry: same with reuseInput / plain-read throughput",
        value: Math.round(inPlaceRatio * 1000) / 1000,
        unit: "ratio",
        target: "≥ 0.25",
        ok: inPlaceRatio >= 0.25,
      },
      {
        name: "geometry: closed-mesh check, 1M triangles",
        value: Math.round(closedS * 1000) / 1000,
        unit: "s",
        target: "< 1.5 s",
        ok: closedS < 1.5,
      },
    ];
  } finally {
    fs.rmSync(file, { force: true });
  }
}

const round = (x: number) => Math.round(x * 10) / 10;
