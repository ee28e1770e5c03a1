// Maximal-rectangles bin for 2-D packing without a guillotine restriction, after J. Jylänki,
// "A Thousand Ways to Pack the Bin – A Practical Approach to Two-Dimensional Rectangle Bin
// Packing" (2010) [from memory]: the free space is kept as the list of all maximal empty
// rectangles; a rectangle goes to the bottom-left corner of the free rectangle that the chosen
// rule scores best, and every free rectangle it intersects is split into up to four maximal parts.

/** Float noise allowance for comparisons of coordinates in mm (not a fit tolerance). */
export const GEOMETRY_EPS = 1e-7;

export interface Rect {
  x: number;
  y: number;
  w: number;
  h: number;
}

/**
 * Placement rules. short-side: smallest leftover on the short side (BSSF); long-side: BLSF;
 * area: smallest free rectangle (BAF); bottom-left: lowest top edge (Tetris-like);
 * contact: most perimeter touching bin walls or placed rectangles.
 */
export type PlacementRule = "short-side" | "long-side" | "area" | "bottom-left" | "contact";

export const PLACEMENT_RULES: readonly PlacementRule[] = ["short-side", "area", "contact", "bottom-left", "long-side"];

export interface Fit extends Rect {
  rotated: boolean;
  s1: number;
  s2: number;
}

function overlapLength(a0: number, a1: number, b0: number, b1: number): number {
  return Math.min(a1, b1) - Math.max(a0, b0);
}

export class MaxRectsBin {
  free: Rect[];
  used: Rect[] = [];
  usedArea = 0;
  /** Largest short side and largest long side over the free rectangles: a quick "cannot fit". */
  private maxShort = 0;
  private maxLong = 0;

  /**
   * @param minSide free rectangles thinner than this are dropped: nothing that will be offered
   * to this bin is that thin, and slivers left by tolerances would only slow the search.
   */
  constructor(
    readonly width: number,
    readonly height: number,
    readonly minSide = GEOMETRY_EPS,
  ) {
    this.free = width >= minSide && height >= minSide ? [{ x: 0, y: 0, w: width, h: height }] : [];
    this.refreshLimits();
  }

  private refreshLimits(): void {
    let s = 0;
    let l = 0;
    for (const f of this.free) {
      s = Math.max(s, Math.min(f.w, f.h));
      l = Math.max(l, Math.max(f.w, f.h));
    }
    this.maxShort = s;
    this.maxLong = l;
  }

  clone(): MaxRectsBin {
    const b = new MaxRectsBin(this.width, this.height, this.minSide);
    b.free = this.free.map((r) => ({ ...r }));
    b.used = this.used.map((r) => ({ ...r }));
    b.usedArea = this.usedArea;
    b.maxShort = this.maxShort;
    b.maxLong = this.maxLong;
    return b;
  }

  get freeArea(): number {
    return this.width * this.height - this.usedArea;
  }

  /** Best position for a w×h rectangle (optionally turned 90°) under `rule`, or null. */
  find(w: number, h: number, rule: PlacementRule, allowRotate: boolean): Fit | null {
    if (Math.min(w, h) > this.maxShort + GEOMETRY_EPS || Math.max(w, h) > this.maxLong + GEOMETRY_EPS) return null;
    let best: Fit | null = null;
    // Both orientations in one loop (no closure: this is the packer's innermost call).
    const turns = allowRotate && Math.abs(w - h) > GEOMETRY_EPS ? 2 : 1;
    for (let turn = 0; turn < turns; turn++) {
      const ow = turn === 0 ? w : h;
      const oh = turn === 0 ? h : w;
      for (const f of this.free) {
        if (ow > f.w + GEOMETRY_EPS || oh > f.h + GEOMETRY_EPS) continue;
        let s1: number;
        let s2: number;
        switch (rule) {
          case "short-side": {
            const lw = f.w - ow;
            const lh = f.h - oh;
            s1 = Math.min(lw, lh);
            s2 = Math.max(lw, lh);
            break;
          }
          case "long-side": {
            const lw = f.w - ow;
            const lh = f.h - oh;
            s1 = Math.max(lw, lh);
            s2 = Math.min(lw, lh);
            break;
          }
          case "area":
            s1 = f.w * f.h - ow * oh;
            s2 = Math.min(f.w - ow, f.h - oh);
            break;
          case "bottom-left":
            s1 = f.y + oh;
            s2 = f.x;
            break;
          case "contact":
            s1 = -this.contact(f.x, f.y, ow, oh);
            s2 = f.y + oh;
            break;
        }
        if (
          best === null ||
          s1 < best.s1 - GEOMETRY_EPS ||
          (s1 <= best.s1 + GEOMETRY_EPS && s2 < best.s2 - GEOMETRY_EPS)
        ) {
          best = { x: f.x, y: f.y, w: ow, h: oh, rotated: turn === 1, s1, s2 };
        }
      }
    }
    return best;
  }

  private contact(x: number, y: number, w: number, h: number): number {
    let score = 0;
    if (Math.abs(x) < GEOMETRY_EPS || Math.abs(x + w - this.width) < GEOMETRY_EPS) score += h;
    if (Math.abs(y) < GEOMETRY_EPS || Math.abs(y + h - this.height) < GEOMETRY_EPS) score += w;
    for (const u of this.used) {
      if (Math.abs(u.x - (x + w)) < GEOMETRY_EPS || Math.abs(u.x + u.w - x) < GEOMETRY_EPS) {
        score += Math.max(0, overlapLength(u.y, u.y + u.h, y, y + h));
      }
      if (Math.abs(u.y - (y + h)) < GEOMETRY_EPS || Math.abs(u.y + u.h - y) < GEOMETRY_EPS) {
        score += Math.max(0, overlapLength(u.x, u.x + u.w, x, x + w));
      }
    }
    return score;
  }

  place(r: Rect): void {
    const kept: Rect[] = [];
    const added: Rect[] = [];
    const rx1 = r.x + r.w;
    const ry1 = r.y + r.h;
    for (const f of this.free) {
      const fx1 = f.x + f.w;
      const fy1 = f.y + f.h;
      if (
        overlapLength(f.x, fx1, r.x, rx1) <= GEOMETRY_EPS ||
        overlapLength(f.y, fy1, r.y, ry1) <= GEOMETRY_EPS
      ) {
        kept.push(f);
        continue;
      }
      if (r.x - f.x >= this.minSide) added.push({ x: f.x, y: f.y, w: r.x - f.x, h: f.h });
      if (fx1 - rx1 >= this.minSide) added.push({ x: rx1, y: f.y, w: fx1 - rx1, h: f.h });
      if (r.y - f.y >= this.minSide) added.push({ x: f.x, y: f.y, w: f.w, h: r.y - f.y });
      if (fy1 - ry1 >= this.minSide) added.push({ x: f.x, y: ry1, w: f.w, h: fy1 - ry1 });
    }
    // Only the new pieces can be contained in something; old free rectangles were maximal.
    const survivors: Rect[] = [];
    for (let i = 0; i < added.length; i++) {
      const a = added[i];
      let contained = false;
      for (const k of kept) {
        if (contains(k, a)) {
          contained = true;
          break;
        }
      }
      if (!contained) {
        for (let j = 0; j < added.length; j++) {
          if (j === i) continue;
          const b = added[j];
          // Identical duplicates: keep the first one only.
          if (contains(b, a) && (!contains(a, b) || j < i)) {
            contained = true;
            break;
          }
        }
      }
      if (!contained) survivors.push(a);
    }
    this.free = kept.concat(survivors);
    this.refreshLimits();
    this.used.push({ x: r.x, y: r.y, w: r.w, h: r.h });
    this.usedArea += r.w * r.h;
  }
}

function contains(outer: Rect, inner: Rect): boolean {
  return (
    inner.x >= outer.x - GEOMETRY_EPS &&
    inner.y >= outer.y - GEOMETRY_EPS &&
    inner.x + inner.w <= outer.x + outer.w + GEOMETRY_EPS &&
    inner.y + inner.h <= outer.y + outer.h + GEOMETRY_EPS
  );
}
