import { describe, expect, it } from "vitest";
import { boxMesh, reverseWinding, tessellatedBox, tetrahedronMesh, uvSphereMesh, writeBinaryStl } from "@/lib/geometry/generate";
import { measureTriangles, weldVertices } from "@/lib/geometry/mesh";
import { analyzeStl, binaryStlSize } from "@/lib/geometry/stl";

// Signed tetrahedra: V = (1/6) Σ v1·(v2 × v3) (Zhang & Chen, "Efficient feature extraction for
// 2D/3D objects in mesh representation", ICIP 2001). Worked cases from REFERENCES §11.
describe("signed-tetrahedra volume (Zhang & Chen 2001)", () => {
  it("box 10 × 20 × 30 mm as 12 triangles: 6000 mm³, bbox 10 × 20 × 30", () => {
    const m = measureTriangles(boxMesh(10, 20, 30));
    expect(m.triangleCount).toBe(12);
    expect(m.signedVolumeMm3).toBeCloseTo(6000, 9);
    expect(m.bounds.size).toEqual({ x: 10, y: 20, z: 30 });
    expect(m.surfaceAreaMm2).toBeCloseTo(2 * (10 * 20 + 20 * 30 + 10 * 30), 9);
  });

  it("translated by (5, −7, 100) it is still 6000", () => {
    const m = measureTriangles(boxMesh(10, 20, 30, [5, -7, 100]));
    expect(m.signedVolumeMm3).toBeCloseTo(6000, 9);
    expect(m.bounds.min).toEqual({ x: 5, y: -7, z: 100 });
  });

  it("reversed winding gives −6000", () => {
    const m = measureTriangles(reverseWinding(boxMesh(10, 20, 30)));
    expect(m.signedVolumeMm3).toBeCloseTo(-6000, 9);
    expect(m.volumeMm3).toBeCloseTo(6000, 9);
  });

  it("unit right tetrahedron: 1/6", () => {
    expect(measureTriangles(tetrahedronMesh()).signedVolumeMm3).toBeCloseTo(1 / 6, 12);
  });

  it("a UV sphere converges to 4/3·π·r³ from below as it is refined", () => {
    const r = 10;
    const exact = (4 / 3) * Math.PI * r ** 3;
    const errors = [8, 16, 32, 64, 128].map((n) => {
      const v = measureTriangles(uvSphereMesh(r, 2 * n, n)).signedVolumeMm3;
      expect(v).toBeLessThan(exact); // an inscribed polyhedron
      return (exact - v) / exact;
    });
    for (let k = 1; k < errors.length; k++) {
      // Second-order convergence: halving the facet size cuts the error about fourfold.
      expect(errors[k]).toBeLessThan(errors[k - 1] / 3.5);
    }
    expect(errors[errors.length - 1]).toBeLessThan(5e-4);
  });

  it("binary STL size is 84 + 50·n: the box file is 684 bytes (STL binary layout)", () => {
    const bytes = writeBinaryStl(boxMesh(10, 20, 30));
    expect(bytes.length).toBe(684);
    expect(binaryStlSize(12)).toBe(684);
    const a = analyzeStl(bytes);
    expect(a.format).toBe("binary");
    expect(a.measures.volumeMm3).toBeCloseTo(6000, 9);
  });
});

// Cross-check against an independent implementation: manifold-3d (WASM) builds its own
// manifold from the welded mesh and reports volume and area.
describe("cross-check with manifold-3d", async () => {
  const Module = (await import("manifold-3d")).default;
  const wasm = await Module();
  wasm.setup();
  const cases: Array<[string, Float32Array]> = [
    ["box", boxMesh(10, 20, 30, [5, -7, 100])],
    ["tessellated box", tessellatedBox(12.5, 3, 40, 7, [-20, 1, 2])],
    ["tetrahedron", tetrahedronMesh()],
    ["UV sphere", uvSphereMesh(17, 64, 33)],
    ["coarse sphere", uvSphereMesh(3, 5, 3)],
  ];
  it.each(cases)("%s", (_name, soup) => {
    const { vertices, indices } = weldVertices(soup);
    const manifold = new wasm.Manifold(new wasm.Mesh({ numProp: 3, vertProperties: vertices, triVerts: indices }));
    try {
      expect(manifold.status()).toBe("NoError");
      const ours = measureTriangles(soup);
      expect(ours.signedVolumeMm3 / manifold.volume()).toBeCloseTo(1, 9);
      expect(ours.surfaceAreaMm2 / manifold.surfaceArea()).toBeCloseTo(1, 9);
    } finally {
      manifold.delete();
    }
  });
});
