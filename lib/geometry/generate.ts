import { ComputationError } from "@/lib/errors";
import { BINARY_HEADER_BYTES, BINARY_PREAMBLE_BYTES, BINARY_FACET_BYTES, binaryStlSize } from "@/lib/geometry/stl";

// Closed test meshes as triangle soups (9 floats per triangle, outward counter-clockwise
// winding) and STL writers. Shared corners are computed by one expression from integer
// lattice indices, so neighbouring triangles repeat them bit for bit and the mesh welds closed.

function requireCount(value: number, field: string, min: number) {
  if (!Number.isInteger(value) || value < min) {
    throw new ComputationError(`${field} must be a whole number ≥ ${min} (got ${value})`, field);
  }
}

function requireSize(value: number, field: string) {
  if (!(value > 0) || !Number.isFinite(value)) {
    throw new ComputationError(`${field} must be greater than 0 (got ${value})`, field);
  }
}

/**
 * Axis-aligned box from `origin` with edges sx × sy × sz, each face split into a
 * divisions × divisions grid: 12·divisions² triangles.
 */
export function tessellatedBox(
  sx: number,
  sy: number,
  sz: number,
  divisions = 1,
  origin: [number, number, number] = [0, 0, 0],
): Float32Array {
  requireSize(sx, "sx");
  requireSize(sy, "sy");
  requireSize(sz, "sz");
  requireCount(divisions, "divisions", 1);
  const size = [sx, sy, sz];
  const n = divisions;
  const coord = (axis: number, k: number) => origin[axis] + (k * size[axis]) / n;
  const out = new Float32Array(12 * n * n * 9);
  let o = 0;
  const put = (p: number[]) => {
    out[o++] = p[0];
    out[o++] = p[1];
    out[o++] = p[2];
  };
  for (let axis = 0; axis < 3; axis++) {
    for (const side of [0, 1]) {
      // Cyclic (u, v) gives u × v = +axis; swapping them turns the face outward on the low side.
      const u = side ? (axis + 1) % 3 : (axis + 2) % 3;
      const v = side ? (axis + 2) % 3 : (axis + 1) % 3;
      const point = (i: number, j: number) => {
        const p = [0, 0, 0];
        p[axis] = coord(axis, side * n);
        p[u] = coord(u, i);
        p[v] = coord(v, j);
        return p;
      };
      for (let i = 0; i < n; i++) {
        for (let j = 0; j < n; j++) {
          const p00 = point(i, j), p10 = point(i + 1, j), p11 = point(i + 1, j + 1), p01 = point(i, j + 1);
          put(p00); put(p10); put(p11);
          put(p00); put(p11); put(p01);
        }
      }
    }
  }
  return out;
}

/** A 12-triangle box: the smallest closed test mesh with a known volume. */
export function boxMesh(sx: number, sy: number, sz: number, origin: [number, number, number] = [0, 0, 0]) {
  return tessellatedBox(sx, sy, sz, 1, origin);
}

/** The unit right tetrahedron (0,0,0), (1,0,0), (0,1,0), (0,0,1): volume 1/6. */
export function tetrahedronMesh(): Float32Array {
  const v = [
    [0, 0, 0],
    [1, 0, 0],
    [0, 1, 0],
    [0, 0, 1],
  ];
  const faces = [
    [0, 2, 1],
    [0, 1, 3],
    [0, 3, 2],
    [1, 2, 3],
  ];
  return new Float32Array(faces.flatMap((f) => f.flatMap((i) => v[i])));
}

/**
 * UV sphere: `segments` around the axis, `stacks` bands from pole to pole, single-vertex poles.
 * 2·segments·(stacks − 1) triangles (segments 1000, stacks 501 → 1,000,000).
 */
export function uvSphereMesh(radius: number, segments: number, stacks: number): Float32Array {
  requireSize(radius, "radius");
  requireCount(segments, "segments", 3);
  requireCount(stacks, "stacks", 2);
  const rings = stacks - 1;
  const grid = new Float32Array(rings * segments * 3);
  for (let i = 0; i < rings; i++) {
    const theta = (Math.PI * (i + 1)) / stacks;
    const st = Math.sin(theta);
    const ct = Math.cos(theta);
    for (let j = 0; j < segments; j++) {
      const phi = (2 * Math.PI * j) / segments;
      const g = 3 * (i * segments + j);
      grid[g] = radius * st * Math.cos(phi);
      grid[g + 1] = radius * st * Math.sin(phi);
      grid[g + 2] = radius * ct;
    }
  }
  const triangles = 2 * segments * rings;
  const out = new Float32Array(triangles * 9);
  let o = 0;
  const putGrid = (i: number, j: number) => {
    const g = 3 * (i * segments + (j % segments));
    out[o++] = grid[g];
    out[o++] = grid[g + 1];
    out[o++] = grid[g + 2];
  };
  const putPole = (z: number) => {
    out[o++] = 0;
    out[o++] = 0;
    out[o++] = z;
  };
  for (let j = 0; j < segments; j++) {
    putPole(radius);
    putGrid(0, j);
    putGrid(0, j + 1);
  }
  for (let i = 0; i < rings - 1; i++) {
    for (let j = 0; j < segments; j++) {
      putGrid(i, j); putGrid(i + 1, j); putGrid(i + 1, j + 1);
      putGrid(i, j); putGrid(i + 1, j + 1); putGrid(i, j + 1);
    }
  }
  for (let j = 0; j < segments; j++) {
    putPole(-radius);
    putGrid(rings - 1, j + 1);
    putGrid(rings - 1, j);
  }
  return out;
}

/** A closed sphere of exactly `triangles` triangles (an even number, at least 6 × 2 · 3). */
export function sphereWithTriangles(triangles: number, radius = 25): Float32Array {
  requireCount(triangles, "triangles", 12);
  if (triangles % 2 !== 0) throw new ComputationError("a UV sphere has an even number of triangles", "triangles");
  // 2·s·(stacks − 1) = T with s ≈ 2·(stacks − 1) keeps the quads near square.
  const half = triangles / 2;
  let segments = Math.max(3, Math.round(Math.sqrt(2 * half)));
  while (segments > 3 && half % segments !== 0) segments--;
  if (half % segments !== 0) {
    throw new ComputationError(`cannot make a UV sphere with exactly ${triangles} triangles`, "triangles");
  }
  return uvSphereMesh(radius, segments, half / segments + 1);
}

/** Reverse every triangle's winding (turns the mesh inside out). */
export function reverseWinding(positions: Float32Array): Float32Array {
  const out = new Float32Array(positions);
  for (let i = 0; i < out.length; i += 9) {
    for (let k = 0; k < 3; k++) {
      const t = out[i + 3 + k];
      out[i + 3 + k] = out[i + 6 + k];
      out[i + 6 + k] = t;
    }
  }
  return out;
}

/** Scale about the origin by k, then translate. */
export function transformMesh(positions: Float32Array, scale = 1, translate: [number, number, number] = [0, 0, 0]) {
  const out = new Float32Array(positions.length);
  for (let i = 0; i < positions.length; i += 3) {
    out[i] = positions[i] * scale + translate[0];
    out[i + 1] = positions[i + 1] * scale + translate[1];
    out[i + 2] = positions[i + 2] * scale + translate[2];
  }
  return out;
}

function facetNormal(p: Float32Array, i: number): [number, number, number] {
  const e1x = p[i + 3] - p[i], e1y = p[i + 4] - p[i + 1], e1z = p[i + 5] - p[i + 2];
  const e2x = p[i + 6] - p[i], e2y = p[i + 7] - p[i + 1], e2z = p[i + 8] - p[i + 2];
  const nx = e1y * e2z - e1z * e2y, ny = e1z * e2x - e1x * e2z, nz = e1x * e2y - e1y * e2x;
  const len = Math.hypot(nx, ny, nz);
  return len > 0 ? [nx / len, ny / len, nz / len] : [0, 0, 0];
}

/**
 * Binary STL of a triangle soup. The header must not begin with "solid" (the format's own
 * advice); tests that need such a file pass `header` explicitly.
 */
export function writeBinaryStl(triangles: Float32Array, options: { header?: string } = {}): Uint8Array {
  if (triangles.length % 9 !== 0) {
    throw new ComputationError("a triangle array holds 9 numbers per triangle", "triangles");
  }
  const count = triangles.length / 9;
  const bytes = new Uint8Array(binaryStlSize(count));
  const header = options.header ?? "Hearth binary STL";
  for (let i = 0; i < Math.min(header.length, BINARY_HEADER_BYTES); i++) bytes[i] = header.charCodeAt(i) & 0xff;
  const view = new DataView(bytes.buffer);
  view.setUint32(BINARY_HEADER_BYTES, count, true);
  let offset = BINARY_PREAMBLE_BYTES;
  for (let t = 0; t < count; t++, offset += BINARY_FACET_BYTES) {
    const i = 9 * t;
    const [nx, ny, nz] = facetNormal(triangles, i);
    view.setFloat32(offset, nx, true);
    view.setFloat32(offset + 4, ny, true);
    view.setFloat32(offset + 8, nz, true);
    for (let k = 0; k < 9; k++) view.setFloat32(offset + 12 + 4 * k, triangles[i + k], true);
    // attribute byte count stays 0
  }
  return bytes;
}

/** ASCII STL; coordinates written with enough digits to read back the same float32. */
export function writeAsciiStl(triangles: Float32Array, name = "hearth"): string {
  if (triangles.length % 9 !== 0) {
    throw new ComputationError("a triangle array holds 9 numbers per triangle", "triangles");
  }
  const f = (x: number) => x.toPrecision(9);
  const lines = [`solid ${name}`];
  for (let i = 0; i < triangles.length; i += 9) {
    const [nx, ny, nz] = facetNormal(triangles, i);
    lines.push(`  facet normal ${f(nx)} ${f(ny)} ${f(nz)}`, "    outer loop");
    for (let k = 0; k < 9; k += 3) {
      lines.push(`      vertex ${f(triangles[i + k])} ${f(triangles[i + k + 1])} ${f(triangles[i + k + 2])}`);
    }
    lines.push("    endloop", "  endfacet");
  }
  lines.push(`endsolid ${name}`, "");
  return lines.join("\n");
}
