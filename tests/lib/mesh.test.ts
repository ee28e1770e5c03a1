import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { ComputationError } from "@/lib/errors";
import {
  boxMesh,
  reverseWinding,
  sphereWithTriangles,
  tessellatedBox,
  tetrahedronMesh,
  transformMesh,
  uvSphereMesh,
} from "@/lib/geometry/generate";
import { checkClosedMesh, greenMasses, measureTriangles, weldVertices } from "@/lib/geometry/mesh";

describe("closed-mesh check", () => {
  it.each([
    ["box", boxMesh(10, 20, 30)],
    ["tessellated box", tessellatedBox(3, 4, 5, 6, [-1, 2, 3])],
    ["tetrahedron", tetrahedronMesh()],
    ["UV sphere", uvSphereMesh(5, 16, 8)],
  ])("%s is closed and consistently oriented, Euler characteristic 2", (_n, soup) => {
    const r = checkClosedMesh(soup);
    expect(r.closed).toBe(true);
    expect(r.reason).toBe("closed and consistently oriented");
    expect(r.eulerCharacteristic).toBe(2);
    expect(r.edgeCount).toBe((3 * r.triangleCount) / 2);
  });

  it("a reversed mesh is still closed (orientation is global; the volume sign shows it)", () => {
    const r = checkClosedMesh(reverseWinding(boxMesh(1, 1, 1)));
    expect(r.closed).toBe(true);
  });

  it("a missing triangle leaves three open edges", () => {
    const soup = boxMesh(1, 1, 1).slice(9);
    const r = checkClosedMesh(soup);
    expect(r.closed).toBe(false);
    expect(r.boundaryEdges).toBe(3);
    expect(r.reason).toMatch(/open edge/);
  });

  it("one flipped triangle is caught as misoriented", () => {
    const soup = boxMesh(1, 1, 1);
    const flipped = reverseWinding(soup.slice(0, 9));
    soup.set(flipped, 0);
    const r = checkClosedMesh(soup);
    expect(r.closed).toBe(false);
    expect(r.misorientedEdges).toBe(3);
    expect(r.boundaryEdges).toBe(0);
  });

  it("a duplicated triangle makes edges non-manifold", () => {
    const soup = boxMesh(1, 1, 1);
    const doubled = new Float32Array(soup.length + 9);
    doubled.set(soup);
    doubled.set(soup.slice(0, 9), soup.length);
    const r = checkClosedMesh(doubled);
    expect(r.closed).toBe(false);
    expect(r.nonManifoldEdges).toBe(3);
  });

  it("a crack: a corner repeated with a different float does not weld", () => {
    const soup = boxMesh(1, 1, 1);
    soup[0] = Math.fround(soup[0] + 1e-6);
    expect(checkClosedMesh(soup).closed).toBe(false);
  });

  it("−0 and +0 weld together", () => {
    const soup = boxMesh(1, 1, 1);
    for (let i = 0; i < soup.length; i += 9) if (soup[i] === 0) soup[i] = -0;
    expect(checkClosedMesh(soup).closed).toBe(true);
  });

  it("degenerate triangles are counted and left out", () => {
    const soup = boxMesh(1, 1, 1);
    const withSliver = new Float32Array(soup.length + 9);
    withSliver.set(soup);
    withSliver.set([0, 0, 0, 0, 0, 0, 1, 1, 1], soup.length);
    const r = checkClosedMesh(withSliver);
    expect(r.degenerateTriangles).toBe(1);
    expect(r.closed).toBe(true);
  });

  it("two disjoint boxes are closed with Euler characteristic 4", () => {
    const a = boxMesh(1, 1, 1);
    const b = boxMesh(1, 1, 1, [3, 0, 0]);
    const both = new Float32Array(a.length + b.length);
    both.set(a);
    both.set(b, a.length);
    const r = checkClosedMesh(both);
    expect(r.closed).toBe(true);
    expect(r.eulerCharacteristic).toBe(4);
  });

  it("welding finds the expected vertex count", () => {
    expect(weldVertices(boxMesh(1, 2, 3)).vertices.length / 3).toBe(8);
    expect(weldVertices(uvSphereMesh(1, 10, 6)).vertices.length / 3).toBe(2 + 10 * 5);
    expect(weldVertices(tessellatedBox(1, 1, 1, 4)).vertices.length / 3).toBe(6 * 16 + 2);
  });

  it("sphereWithTriangles makes exactly that many triangles", () => {
    expect(measureTriangles(sphereWithTriangles(2000)).triangleCount).toBe(2000);
    expect(() => sphereWithTriangles(1001)).toThrow(ComputationError);
  });
});

describe("mesh measures: properties", () => {
  const scaleArb = fc.double({ min: 0.05, max: 40, noNaN: true });
  const shiftArb = fc.tuple(
    fc.double({ min: -500, max: 500, noNaN: true }),
    fc.double({ min: -500, max: 500, noNaN: true }),
    fc.double({ min: -500, max: 500, noNaN: true }),
  );
  const base = uvSphereMesh(3, 12, 7);
  const baseMeasures = measureTriangles(base);

  it("scaling by k scales volume by k³ and area by k²", () => {
    fc.assert(
      fc.property(scaleArb, (k) => {
        const m = measureTriangles(transformMesh(base, k));
        // Float32 storage rounds each coordinate by up to 6e-8 relative.
        expect(m.signedVolumeMm3 / (baseMeasures.signedVolumeMm3 * k ** 3)).toBeCloseTo(1, 5);
        expect(m.surfaceAreaMm2 / (baseMeasures.surfaceAreaMm2 * k ** 2)).toBeCloseTo(1, 5);
      }),
    );
  });

  it("translation changes neither volume nor area", () => {
    fc.assert(
      fc.property(shiftArb, (t) => {
        const m = measureTriangles(transformMesh(base, 1, t));
        expect(m.signedVolumeMm3 / baseMeasures.signedVolumeMm3).toBeCloseTo(1, 4);
        expect(m.surfaceAreaMm2 / baseMeasures.surfaceAreaMm2).toBeCloseTo(1, 4);
      }),
    );
  });

  it("box volume and area for any box", () => {
    fc.assert(
      fc.property(
        fc.double({ min: 0.1, max: 300, noNaN: true }),
        fc.double({ min: 0.1, max: 300, noNaN: true }),
        fc.double({ min: 0.1, max: 300, noNaN: true }),
        fc.integer({ min: 1, max: 4 }),
        (x, y, z, n) => {
          const soup = tessellatedBox(x, y, z, n);
          const m = measureTriangles(soup);
          const [fx, fy, fz] = [Math.fround(x), Math.fround(y), Math.fround(z)];
          expect(m.signedVolumeMm3 / (fx * fy * fz)).toBeCloseTo(1, 5);
          expect(m.surfaceAreaMm2 / (2 * (fx * fy + fy * fz + fx * fz))).toBeCloseTo(1, 5);
          expect(Number.isNaN(m.volumeMm3)).toBe(false);
          expect(checkClosedMesh(soup).closed).toBe(true);
        },
      ),
    );
  });

  it("invalid arrays throw ComputationError", () => {
    expect(() => measureTriangles(new Float32Array(0))).toThrow(ComputationError);
    expect(() => measureTriangles(new Float32Array(10))).toThrow(ComputationError);
    expect(() => measureTriangles([1, 2, 3] as unknown as Float32Array)).toThrow(ComputationError);
    expect(() => checkClosedMesh(new Float32Array(0))).toThrow(ComputationError);
  });
});

describe("green, brown and sintered masses", () => {
  const material = { greenDensity: 5.05, sinteredDensity: 7.55, washLossFraction: 0.04, shrinkXY: 0.148, shrinkZ: 0.148 };

  it("green = V·ρ_green; brown = green − binder removed; sintered from the shrunken volume", () => {
    const m = greenMasses(10_000, material);
    expect(m.greenG).toBeCloseTo(50.5, 9);
    expect(m.removedBinderG).toBeCloseTo(2.02, 9);
    expect(m.brownG).toBeCloseTo(48.48, 9);
    expect(m.sinteredVolumeMm3).toBeCloseTo(10_000 * 0.852 ** 3, 6);
    expect(m.sinteredG).toBeCloseTo(10 * 0.852 ** 3 * 7.55, 6);
  });

  it("with consistent data the sintered mass is the powder mass: φ·ρ_T·V (mass conserved)", () => {
    // 17-4 PH: φ 0.60, ρ_T 7.783, f_s 0.97, isotropic s from German's relation.
    const phi = 0.6;
    const rhoT = 7.783;
    const s = 1 - Math.cbrt(phi / 0.97);
    const m = greenMasses(1000, { ...material, sinteredDensity: 0.97 * rhoT, shrinkXY: s, shrinkZ: s });
    expect(m.sinteredG).toBeCloseTo(phi * rhoT, 9);
  });

  it("refuses data that make the sintered part heavier than the brown part", () => {
    expect(() => greenMasses(1000, { ...material, sinteredDensity: 20 })).toThrow(/inconsistent/);
    expect(() => greenMasses(0, material)).toThrow(ComputationError);
    expect(() => greenMasses(100, { ...material, washLossFraction: 1.2 })).toThrow(ComputationError);
  });
});
