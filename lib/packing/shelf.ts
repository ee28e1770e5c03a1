// Shelf first fit, kept only as the plain baseline the benchmark prints beside the tray packer:
// first-fit decreasing height (FFDH, Coffman, Garey, Johnson & Tarjan, SIAM J. Comput. 9(4),
// 1980 [from memory]) extended to several trays per run and a run load limit. Each piece lies
// with its short side across the shelf; shelves are opened bottom-up on the first tray with
// height left.

import { GEOMETRY_EPS } from "./rectangles";
import { buildTrayModel } from "./tray-model";
import type { TrayPackInput } from "./types";

interface Shelf {
  y: number;
  h: number;
  used: number;
}

interface ShelfRun {
  mass: number;
  trays: { top: number; shelves: Shelf[] }[];
}

/** Run count of shelf first fit, per profile on the profile's largest furnace. */
export function shelfFirstFitRuns(input: TrayPackInput): number {
  const model = buildTrayModel(input);
  let total = 0;
  for (const pm of model.profiles) {
    const f = [...pm.furnaces].sort((a, b) => b.runArea - a.runArea)[0];
    const items = pm.items
      .filter((it) => it.eligibleMask.has(f.idx))
      .map((it) => {
        // Short side up the shelf, unless that does not fit the tray width.
        let w = Math.max(it.pw, it.ph);
        let h = Math.min(it.pw, it.ph);
        if (w > f.W + GEOMETRY_EPS) [w, h] = [h, w];
        return { w, h, mass: it.mass };
      })
      .sort((a, b) => b.h - a.h || b.w - a.w);
    const runs: ShelfRun[] = [];
    for (const it of items) {
      let placed = false;
      for (const run of runs) {
        if (run.mass + it.mass > f.load * (1 + 1e-12)) continue;
        for (const tray of run.trays) {
          const shelf = tray.shelves.find((s) => it.h <= s.h + GEOMETRY_EPS && s.used + it.w <= f.W + GEOMETRY_EPS);
          if (shelf) {
            shelf.used += it.w;
            placed = true;
            break;
          }
        }
        if (!placed) {
          const tray = run.trays.find((t) => t.top + it.h <= f.D + GEOMETRY_EPS);
          if (tray) {
            tray.shelves.push({ y: tray.top, h: it.h, used: it.w });
            tray.top += it.h;
            placed = true;
          }
        }
        if (placed) {
          run.mass += it.mass;
          break;
        }
      }
      if (!placed) {
        const trays = Array.from({ length: f.trays }, () => ({ top: 0, shelves: [] as Shelf[] }));
        trays[0].shelves.push({ y: 0, h: it.h, used: it.w });
        trays[0].top = it.h;
        runs.push({ mass: it.mass, trays });
      }
    }
    total += runs.length;
  }
  return total;
}
