import { z } from "zod";
import { ComputationError } from "@/lib/errors";
import { parseInput } from "@/lib/process/validate";

// Measures of a triangle soup: a Float32Array of 9 numbers per triangle (v1, v2, v3; x y z
// each), the layout STL itself has. Nothing here builds per-triangle objects: a million-facet
// upload is measured in one pass over the floats.

/** STL carries no units; every length here is taken to be millimetres. */
export const MESH_UNIT_ASSUMPTION =
  "STL has no units field; coordinates are taken to be millimetres (areas mm², volumes mm³)";

export type Vec3 = { x: number; y: number; z: number };
export type Bounds = { min: Vec3; max: Vec3; size: Vec3 };

export type MeshMeasures = {
  triangleCount: number;
  bounds: Bounds;
  surfaceAreaMm2: number;
  /**
   * Signed-tetrahedra volume, V = (1/6) Σ v1·(v2 × v3) (Zhang & Chen, ICIP 2001): positive for
   * outward-facing triangles, negative when the winding is reversed. Meaningful for closed meshes.
   */
  signedVolumeMm3: number;
  volumeMm3: number;
  unit: "mm";
  unitAssumption: string;
};

function checkSoup(positions: Float32Array): number {
  if (!(positions instanceof Float32Array)) {
    throw new ComputationError("triangles must be a Float32Array", "positions");
  }
  if (positions.length % 9 !== 0) {
    throw new ComputationError(
      `a triangle array holds 9 numbers per triangle; ${positions.length} is not a multiple of 9`,
      "positions",
    );
  }
  const count = positions.length / 9;
  if (count === 0) throw new ComputationError("the mesh has no triangles", "positions", { code: "empty" });
  return count;
}

/**
 * Triangle count, bounding box, area and volume in one pass. The volume is summed about the
 * first vertex instead of the origin: the same value for a closed mesh, but without the
 * cancellation that a part placed far from the origin would suffer.
 */
export function measureTriangles(positions: Float32Array): MeshMeasures {
  const triangleCount = checkSoup(positions);
  const p = positions;
  const ox = p[0];
  const oy = p[1];
  const oz = p[2];
  let minX = Infinity, minY = Infinity, minZ = Infinity;
  let maxX = -Infinity, maxY = -Infinity, maxZ = -Infinity;
  let area2 = 0;
  let volume6 = 0;
  for (let i = 0, n = p.length; i < n; i += 9) {
    const ax = p[i], ay = p[i + 1], az = p[i + 2];
    const bx = p[i + 3], by = p[i + 4], bz = p[i + 5];
    const cx = p[i + 6], cy = p[i + 7], cz = p[i + 8];
    if (ax < minX) minX = ax; if (ax > maxX) maxX = ax;
    if (bx < minX) minX = bx; if (bx > maxX) maxX = bx;
    if (cx < minX) minX = cx; if (cx > maxX) maxX = cx;
    if (ay < minY) minY = ay; if (ay > maxY) maxY = ay;
    if (by < minY) minY = by; if (by > maxY) maxY = by;
    if (cy < minY) minY = cy; if (cy > maxY) maxY = cy;
    if (az < minZ) minZ = az; if (az > maxZ) maxZ = az;
    if (bz < minZ) minZ = bz; if (bz > maxZ) maxZ = bz;
    if (cz < minZ) minZ = cz; if (cz > maxZ) maxZ = cz;
    const ux = ax - ox, uy = ay - oy, uz = az - oz;
    const vx = bx - ox, vy = by - oy, vz = bz - oz;
    const wx = cx - ox, wy = cy - oy, wz = cz - oz;
    // Area from the edge cross product; volume from the triple product about the origin o.
    const e1x = vx - ux, e1y = vy - uy, e1z = vz - uz;
    const e2x = wx - ux, e2y = wy - uy, e2z = wz - uz;
    const nx = e1y * e2z - e1z * e2y;
    const ny = e1z * e2x - e1x * e2z;
    const nz = e1x * e2y - e1y * e2x;
    area2 += Math.sqrt(nx * nx + ny * ny + nz * nz);
    volume6 += ux * (vy * wz - vz * wy) + uy * (vz * wx - vx * wz) + uz * (vx * wy - vy * wx);
  }
  if (!Number.isFinite(area2) || !Number.isFinite(volume6)) {
    const bad = firstNonFiniteTriangle(p);
    throw new ComputationError(`triangle ${bad + 1} has a coordinate that is not a finite number`, "positions", {
      code: "non_finite",
      triangle: bad,
    });
  }
  return measuresFrom(triangleCount, minX, minY, minZ, maxX, maxY, maxZ, area2, volume6);
}

/** Index of the first triangle with a NaN or infinite coordinate, or −1. */
export function firstNonFiniteTriangle(positions: Float32Array): number {
  for (let i = 0; i < positions.length; i++) {
    if (!Number.isFinite(positions[i])) return Math.floor(i / 9);
  }
  return -1;
}

/** Assembles the result from the one-pass sums (twice the area, six times the volume). */
export function measuresFrom(
  triangleCount: number,
  minX: number, minY: number, minZ: number,
  maxX: number, maxY: number, maxZ: number,
  area2: number,
  volume6: number,
): MeshMeasures {
  const signedVolumeMm3 = volume6 / 6;
  return {
    triangleCount,
    bounds: {
      min: { x: minX, y: minY, z: minZ },
      max: { x: maxX, y: maxY, z: maxZ },
      size: { x: maxX - minX, y: maxY - minY, z: maxZ - minZ },
    },
    surfaceAreaMm2: area2 / 2,
    signedVolumeMm3,
    volumeMm3: Math.abs(signedVolumeMm3),
    unit: "mm",
    unitAssumption: MESH_UNIT_ASSUMPTION,
  };
}

function nextPow2(n: number): number {
  let p = 16;
  while (p < n) p *= 2;
  return p;
}

export type WeldedMesh = {
  /** Distinct vertex positions, 3 floats each. */
  vertices: Float32Array;
  /** Three vertex indices per triangle, in the soup's order. */
  indices: Uint32Array;
};

/**
 * Joins vertices whose coordinates are bit-for-bit equal (−0 counted as +0), through an
 * open-addressing table keyed on the float bits. No tolerance: a writer that repeats a shared
 * corner with different rounding leaves a crack, and that is what the closed check must see.
 * The table starts small (a closed mesh has about one vertex per six corners) and doubles
 * when half full, so it stays cache-sized for the common case.
 */
export function weldVertices(positions: Float32Array): WeldedMesh {
  checkSoup(positions);
  const bits = new Uint32Array(positions.buffer, positions.byteOffset, positions.length);
  const corners = positions.length / 3;
  let capacity = nextPow2(Math.ceil(corners / 3));
  let mask = capacity - 1;
  let table = new Int32Array(capacity).fill(-1);
  const unique = new Uint32Array(positions.length);
  const indices = new Uint32Array(corners);
  let count = 0;
  const hash = (x: number, y: number, z: number) => {
    let h = Math.imul(x, 0x9e3779b1) ^ Math.imul(y ^ (y >>> 16), 0x85ebca77) ^ Math.imul(z ^ (z >>> 13), 0xc2b2ae3d);
    h ^= h >>> 15;
    h = Math.imul(h, 0x2c1b3c6d);
    return h ^ (h >>> 12);
  };
  for (let v = 0; v < corners; v++) {
    let x = bits[3 * v], y = bits[3 * v + 1], z = bits[3 * v + 2];
    if (x === 0x80000000) x = 0;
    if (y === 0x80000000) y = 0;
    if (z === 0x80000000) z = 0;
    let slot = hash(x, y, z) & mask;
    for (;;) {
      const id = table[slot];
      if (id < 0) {
        table[slot] = count;
        unique[3 * count] = x;
        unique[3 * count + 1] = y;
        unique[3 * count + 2] = z;
        indices[v] = count++;
        if (2 * count > capacity) {
          capacity *= 2;
          mask = capacity - 1;
          table = new Int32Array(capacity).fill(-1);
          for (let id2 = 0; id2 < count; id2++) {
            let s2 = hash(unique[3 * id2], unique[3 * id2 + 1], unique[3 * id2 + 2]) & mask;
            while (table[s2] >= 0) s2 = (s2 + 1) & mask;
            table[s2] = id2;
          }
        }
        break;
      }
      if (unique[3 * id] === x && unique[3 * id + 1] === y && unique[3 * id + 2] === z) {
        indices[v] = id;
        break;
      }
      slot = (slot + 1) & mask;
    }
  }
  const vertices = new Float32Array(unique.buffer.slice(0, count * 12));
  return { vertices, indices };
}

export type ClosedMeshReport = {
  /** Every undirected edge is used exactly twice, once in each direction. */
  closed: boolean;
  triangleCount: number;
  vertexCount: number;
  edgeCount: number;
  /** Edges used once: holes or cracks. */
  boundaryEdges: number;
  /** Edges used twice in the same direction: neighbouring triangles wound oppositely. */
  misorientedEdges: number;
  /** Edges used more than twice. */
  nonManifoldEdges: number;
  /** Triangles with a repeated corner; they carry no area and are left out of the edge count. */
  degenerateTriangles: number;
  /** V − E + F of the welded mesh: 2 for a closed mesh without handles. */
  eulerCharacteristic: number;
  reason: string;
};

/**
 * Closed-and-consistently-oriented check. Vertices are welded by exact equality; then every
 * directed edge is filed under its lower vertex id (a CSR layout: count, prefix-sum, fill),
 * with the other id and the direction in one word. Sorting each vertex's short list puts the
 * uses of one undirected edge side by side. Vertex ids follow the file order, so the lists
 * touched by neighbouring triangles sit near each other in memory: no hash table, few misses.
 */
export function checkClosedMesh(positions: Float32Array): ClosedMeshReport {
  const { vertices, indices } = weldVertices(positions);
  const triangleCount = indices.length / 3;
  const vertexCount = vertices.length / 3;
  if (vertexCount >= 0x80000000) throw new ComputationError("too many vertices for the closed check", "positions");
  const start = new Uint32Array(vertexCount + 1);
  let degenerateTriangles = 0;
  for (let t = 0; t < triangleCount; t++) {
    const a = indices[3 * t], b = indices[3 * t + 1], c = indices[3 * t + 2];
    if (a === b || b === c || c === a) {
      degenerateTriangles++;
      continue;
    }
    start[a < b ? a : b]++;
    start[b < c ? b : c]++;
    start[c < a ? c : a]++;
  }
  let sum = 0;
  for (let v = 0; v <= vertexCount; v++) {
    const n = start[v];
    start[v] = sum;
    sum += n;
  }
  const fill = start.slice(0, vertexCount);
  // Entry: (higher id << 1) | 1 when the edge runs from the higher id to the lower.
  const entries = new Uint32Array(sum);
  const file = (from: number, to: number) => {
    if (from < to) entries[fill[from]++] = to * 2;
    else entries[fill[to]++] = from * 2 + 1;
  };
  for (let t = 0; t < triangleCount; t++) {
    const a = indices[3 * t], b = indices[3 * t + 1], c = indices[3 * t + 2];
    if (a === b || b === c || c === a) continue;
    file(a, b);
    file(b, c);
    file(c, a);
  }

  let boundaryEdges = 0;
  let misorientedEdges = 0;
  let nonManifoldEdges = 0;
  let edgeCount = 0;
  for (let v = 0; v < vertexCount; v++) {
    const lo = start[v];
    const hi = start[v + 1];
    // Insertion sort for the usual handful of edges; a fan around a pole can have thousands.
    if (hi - lo > 32) {
      entries.subarray(lo, hi).sort();
    } else {
      for (let i = lo + 1; i < hi; i++) {
        const e = entries[i];
        let j = i - 1;
        while (j >= lo && entries[j] > e) {
          entries[j + 1] = entries[j];
          j--;
        }
        entries[j + 1] = e;
      }
    }
    for (let i = lo; i < hi; ) {
      const other = entries[i] >>> 1;
      let forward = 0;
      let backward = 0;
      while (i < hi && entries[i] >>> 1 === other) {
        if (entries[i] & 1) backward++;
        else forward++;
        i++;
      }
      edgeCount++;
      const total = forward + backward;
      if (forward === 1 && backward === 1) continue;
      if (total === 1) boundaryEdges++;
      else if (total === 2) misorientedEdges++;
      else nonManifoldEdges++;
    }
  }

  const faces = triangleCount - degenerateTriangles;
  const closed = faces > 0 && boundaryEdges === 0 && misorientedEdges === 0 && nonManifoldEdges === 0;
  const problems: string[] = [];
  if (faces === 0) problems.push("no triangle with three distinct corners");
  if (boundaryEdges) problems.push(`${boundaryEdges} open edge(s) (holes or cracks)`);
  if (misorientedEdges) problems.push(`${misorientedEdges} edge(s) between triangles wound in opposite senses`);
  if (nonManifoldEdges) problems.push(`${nonManifoldEdges} edge(s) shared by more than two triangles`);
  return {
    closed,
    triangleCount,
    vertexCount,
    edgeCount,
    boundaryEdges,
    misorientedEdges,
    nonManifoldEdges,
    degenerateTriangles,
    eulerCharacteristic: vertexCount - edgeCount + faces,
    reason: closed ? "closed and consistently oriented" : problems.join("; "),
  };
}

// Masses ------------------------------------------------------------------------------------

export const massMaterialSchema = z.object({
  /** Density of the printed green part with its binder, g/cm³. */
  greenDensity: z.number().positive(),
  /** Density after sintering, g/cm³. */
  sinteredDensity: z.number().positive(),
  /** Binder taken out in the wash, as a fraction of the green mass. */
  washLossFraction: z.number().gt(0).lt(1),
  /** Linear shrinkage in X/Y and in Z (build direction). */
  shrinkXY: z.number().gt(0).lt(0.5),
  shrinkZ: z.number().gt(0).lt(0.5),
});
export type MassMaterial = z.infer<typeof massMaterialSchema>;

export type PartMasses = {
  greenG: number;
  brownG: number;
  removedBinderG: number;
  sinteredG: number;
  sinteredVolumeMm3: number;
};

/**
 * Green, brown and sintered masses of a printed part from its green (printed) volume:
 * green = V·ρ_green; brown = green minus the binder removed in the wash; sintered = the
 * shrunken volume V·(1 − s_xy)²·(1 − s_z) times the sintered density.
 */
export function greenMasses(volumeMm3: number, material: MassMaterial): PartMasses {
  if (!(volumeMm3 > 0) || !Number.isFinite(volumeMm3)) {
    throw new ComputationError(`the green volume must be greater than 0 mm³ (got ${volumeMm3})`, "volumeMm3");
  }
  const m = parseInput(massMaterialSchema, material, "masses");
  const cm3 = volumeMm3 / 1000;
  const greenG = cm3 * m.greenDensity;
  const removedBinderG = greenG * m.washLossFraction;
  const brownG = greenG - removedBinderG;
  const sinteredVolumeMm3 = volumeMm3 * (1 - m.shrinkXY) ** 2 * (1 - m.shrinkZ);
  const sinteredG = (sinteredVolumeMm3 / 1000) * m.sinteredDensity;
  if (sinteredG > brownG) {
    throw new ComputationError(
      `the material data are inconsistent: the sintered part (${sinteredG.toFixed(1)} g) would weigh more ` +
        `than the brown part (${brownG.toFixed(1)} g); check densities, shrinkage and wash loss`,
      "material",
      { sinteredG, brownG },
    );
  }
  return { greenG, brownG, removedBinderG, sinteredG, sinteredVolumeMm3 };
}
