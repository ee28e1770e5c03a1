import { describe, expect, it } from "vitest";
import { boxMesh, sphereWithTriangles, tessellatedBox, uvSphereMesh, writeAsciiStl, writeBinaryStl } from "@/lib/geometry/generate";
import { measureTriangles } from "@/lib/geometry/mesh";
import { analyzeStl, detectStlFormat, parseStl, StlError, type StlErrorCode } from "@/lib/geometry/stl";
import { ComputationError } from "@/lib/errors";

const text = (s: string) => new TextEncoder().encode(s);

function stlCode(fn: () => unknown): StlErrorCode {
  try {
    fn();
  } catch (e) {
    expect(e).toBeInstanceOf(StlError);
    expect(e).toBeInstanceOf(ComputationError);
    expect((e as StlError).message.length).toBeGreaterThan(10);
    expect((e as StlError).details?.code).toBe((e as StlError).stlCode);
    return (e as StlError).stlCode;
  }
  throw new Error("expected an StlError");
}

describe("STL parser errors", () => {
  it("empty input", () => {
    expect(stlCode(() => parseStl(new Uint8Array(0)))).toBe("empty");
    expect(stlCode(() => parseStl(writeBinaryStl(new Float32Array(0))))).toBe("empty");
    expect(stlCode(() => parseStl(text("solid nothing\nendsolid nothing\n")))).toBe("empty");
    expect(stlCode(() => parseStl(text("   \n  ")))).toBe("not_stl");
  });

  it("a binary file cut short", () => {
    const full = writeBinaryStl(boxMesh(1, 2, 3));
    expect(stlCode(() => parseStl(full.slice(0, full.length - 7)))).toBe("truncated");
    expect(stlCode(() => parseStl(full.slice(0, 40)))).toBe("truncated");
  });

  it("a binary file with bytes beyond its announced count", () => {
    const full = writeBinaryStl(boxMesh(1, 2, 3));
    const longer = new Uint8Array(full.length + 50);
    longer.set(full);
    expect(stlCode(() => parseStl(longer))).toBe("count_mismatch");
  });

  it("NaN and infinite coordinates, binary and ASCII", () => {
    for (const bad of [NaN, Infinity, -Infinity]) {
      const soup = boxMesh(1, 2, 3);
      soup[40] = bad;
      expect(stlCode(() => parseStl(writeBinaryStl(soup)))).toBe("non_finite");
    }
    const ascii = writeAsciiStl(boxMesh(1, 2, 3)).replace(/vertex (\S+)/, "vertex nan");
    expect(stlCode(() => parseStl(text(ascii)))).toBe("non_finite");
    const huge = writeAsciiStl(boxMesh(1, 2, 3)).replace(/vertex (\S+)/, "vertex 1e39");
    expect(stlCode(() => parseStl(text(huge)))).toBe("non_finite");
  });

  it("names the first bad triangle", () => {
    const soup = tessellatedBox(1, 1, 1, 3);
    soup[9 * 17 + 4] = NaN;
    expect(() => parseStl(writeBinaryStl(soup))).toThrow(/triangle 18 /);
    expect(() => measureTriangles(soup)).toThrow(/triangle 18 /);
  });

  it("over the size limit", () => {
    const bytes = writeBinaryStl(tessellatedBox(1, 1, 1, 4));
    expect(stlCode(() => parseStl(bytes, { maxBytes: bytes.length - 1 }))).toBe("too_large");
    expect(parseStl(bytes, { maxBytes: bytes.length }).triangleCount).toBe(192);
  });

  it("text that is not STL, and malformed ASCII", () => {
    expect(stlCode(() => parseStl(text("v 0 0 0\nv 1 0 0\nf 1 2 3\n")))).toBe("not_stl");
    const ascii = writeAsciiStl(boxMesh(1, 2, 3));
    expect(stlCode(() => parseStl(text(ascii.replace("outer loop", "outer lop"))))).toBe("not_stl");
    expect(stlCode(() => parseStl(text(ascii.replace(/vertex (\S+)/, "vertex abc"))))).toBe("not_stl");
    expect(stlCode(() => parseStl(text(ascii.slice(0, ascii.length / 2))))).toBe("truncated");
  });
});

describe("ASCII and binary of the same mesh", () => {
  it.each([
    ["box", boxMesh(10, 20, 30, [5, -7, 100])],
    ["sphere", uvSphereMesh(12.3, 24, 12)],
  ])("%s gives the same measures", (_name, soup) => {
    const bin = analyzeStl(writeBinaryStl(soup));
    const asc = analyzeStl(text(writeAsciiStl(soup, "part 7")));
    expect(bin.format).toBe("binary");
    expect(asc.format).toBe("ascii");
    expect(asc.label).toBe("part 7");
    expect(asc.measures).toEqual(bin.measures);
    expect(asc.closed).toEqual(bin.closed);
    expect(bin.closed!.closed).toBe(true);
  });

  it("ASCII keywords are read case-insensitively and CRLF line ends are fine", () => {
    const soup = boxMesh(1, 2, 3);
    const ascii = writeAsciiStl(soup).toUpperCase().replace(/\n/g, "\r\n");
    expect(parseStl(text(ascii)).measures.volumeMm3).toBeCloseTo(6, 6);
  });

  it("reads LF, CR LF and lone-CR (classic Mac OS) line ends alike", () => {
    const lf = writeAsciiStl(tessellatedBox(2, 3, 4, 2), "mac part");
    const reference = parseStl(text(lf));
    for (const end of ["\r\n", "\r"]) {
      const parsed = parseStl(text(lf.replace(/\n/g, end)));
      expect(parsed.label).toBe("mac part");
      expect(parsed.triangleCount).toBe(reference.triangleCount);
      expect(parsed.positions).toEqual(reference.positions);
      expect(parsed.measures).toEqual(reference.measures);
    }
  });

  it("errors name the line an editor shows, whatever the line ends", () => {
    const lf = writeAsciiStl(boxMesh(1, 2, 3));
    const lines = lf.split("\n");
    const bad = lines.findIndex((l, i) => i > 20 && l.trim().startsWith("vertex"));
    lines[bad] = lines[bad].replace(/vertex (\S+)/, "vertex abc");
    const cut = lines.slice(0, bad + 1);
    for (const end of ["\n", "\r\n", "\r"]) {
      expect(() => parseStl(text(lines.join(end)))).toThrow(new RegExp(`^line ${bad + 1}: "abc" is not a number`));
      // A blank line of each kind before the facet moves it down by one.
      const blank = [lines[0], "", ...lines.slice(1)].join(end);
      expect(() => parseStl(text(blank))).toThrow(new RegExp(`^line ${bad + 2}: `));
      // Cut after the bad line's x: the end of the file is on that same line.
      const short = cut.join(end).replace(/vertex abc.*$/, "vertex 1");
      expect(() => parseStl(text(short))).toThrow(new RegExp(`\\(line ${bad + 1}\\): it was cut short`));
    }
  });

  it("several solids in one ASCII file are read in order", () => {
    const a = writeAsciiStl(boxMesh(1, 1, 1), "a");
    const b = writeAsciiStl(boxMesh(1, 1, 1, [5, 0, 0]), "b");
    const parsed = parseStl(text(a + b));
    expect(parsed.triangleCount).toBe(24);
    expect(parsed.measures.volumeMm3).toBeCloseTo(2, 6);
  });
});

describe("binary vs ASCII detection", () => {
  it("a binary file whose header begins with \"solid\" is binary by its size", () => {
    const bytes = writeBinaryStl(sphereWithTriangles(200), { header: "solid exported by a CAD program" });
    expect(detectStlFormat(bytes)).toBe("binary");
    const parsed = parseStl(bytes);
    expect(parsed.format).toBe("binary");
    expect(parsed.label).toBe("solid exported by a CAD program");
    expect(parsed.triangleCount).toBe(200);
  });

  it("such a file with a wrong count is reported as binary damage, not as bad ASCII", () => {
    const bytes = writeBinaryStl(boxMesh(1, 2, 3), { header: "solid x" });
    expect(stlCode(() => parseStl(bytes.slice(0, bytes.length - 50)))).toBe("truncated");
  });

  it("an ASCII file is ASCII; a text file without \"solid\" is not STL", () => {
    expect(detectStlFormat(text(writeAsciiStl(boxMesh(1, 2, 3))))).toBe("ascii");
    expect(detectStlFormat(text("  \n solid x\nendsolid x\n"))).toBe("ascii");
    expect(stlCode(() => detectStlFormat(text("hello, this is a note about a part")))).toBe("not_stl");
  });
});

describe("one-pass binary measures", () => {
  it("equal measureTriangles over the same floats", () => {
    const soup = uvSphereMesh(7, 30, 15);
    const parsed = parseStl(writeBinaryStl(soup));
    expect(parsed.positions).toEqual(soup);
    expect(parsed.measures).toEqual(measureTriangles(soup));
  });

  it("reuseInput writes the vertices over the input and gives the same result", () => {
    const soup = uvSphereMesh(7, 31, 15); // an odd number of facets exercises the 2-byte offsets
    const bytes = writeBinaryStl(soup);
    const copy = parseStl(bytes);
    const inPlace = parseStl(bytes, { reuseInput: true });
    expect(inPlace.positions.buffer).toBe(bytes.buffer);
    expect(inPlace.positions).toEqual(soup);
    expect(inPlace.measures).toEqual(copy.measures);
    expect(inPlace.label).toBe("Hearth binary STL");
    // An unaligned view falls back to a fresh array and leaves the input alone.
    const big = new Uint8Array(bytes.length + 1);
    const again = writeBinaryStl(soup);
    big.set(again, 1);
    const view = big.subarray(1);
    const fallback = parseStl(view, { reuseInput: true });
    expect(fallback.positions.buffer).not.toBe(big.buffer);
    expect(Array.from(view.subarray(0, 84))).toEqual(Array.from(again.subarray(0, 84)));
    expect(fallback.measures).toEqual(copy.measures);
  });

  it("state the unit assumption", () => {
    const m = parseStl(writeBinaryStl(boxMesh(1, 1, 1))).measures;
    expect(m.unit).toBe("mm");
    expect(m.unitAssumption).toMatch(/millimetres/);
  });

  it("accept an ArrayBuffer and a Uint8Array that is a view into a larger buffer", () => {
    const bytes = writeBinaryStl(boxMesh(2, 2, 2));
    expect(parseStl(bytes.buffer.slice(0) as ArrayBuffer).measures.volumeMm3).toBeCloseTo(8, 9);
    const big = new Uint8Array(bytes.length + 3);
    big.set(bytes, 3);
    expect(parseStl(big.subarray(3)).measures.volumeMm3).toBeCloseTo(8, 9);
  });
});
