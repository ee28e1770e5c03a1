import { describe, expect, it } from "vitest";
import { boxMesh, writeAsciiStl, writeBinaryStl } from "@/lib/geometry/generate";
import { checkStlShape, parseStl, StlError } from "@/lib/geometry/stl";

// The check a streamed upload gets from its first and last bytes agrees with the whole-file
// parser on the files the parser accepts, and refuses what a head and a tail can show is broken.
const shape = (bytes: Uint8Array) => checkStlShape(bytes.subarray(0, 4096), bytes.length, bytes.subarray(Math.max(0, bytes.length - 1024)));

describe("checkStlShape", () => {
  it("accepts a binary STL with the parser's triangle count, and an ASCII one", () => {
    const bin = writeBinaryStl(boxMesh(10, 20, 30));
    expect(shape(bin)).toEqual({ format: "binary", triangles: parseStl(bin).triangleCount });
    expect(shape(new TextEncoder().encode(writeAsciiStl(boxMesh(1, 1, 1), "cube")))).toEqual({ format: "ascii", triangles: null });
  });

  it("refuses a cut-short binary file, a cut-short ASCII file and text that is not STL", () => {
    const bin = writeBinaryStl(boxMesh(10, 20, 30));
    const cases: Array<[Uint8Array, string]> = [
      [bin.subarray(0, bin.length - 7), "truncated"],
      [new TextEncoder().encode(writeAsciiStl(boxMesh(1, 1, 1), "cube").slice(0, 300)), "truncated"],
      [new TextEncoder().encode("this is a plain text file, not a mesh"), "not_stl"],
      [new Uint8Array(0), "empty"],
    ];
    for (const [bytes, code] of cases) {
      try {
        shape(bytes);
        expect.unreachable(`accepted a ${code} file`);
      } catch (err) {
        expect(err).toBeInstanceOf(StlError);
        expect((err as StlError).stlCode).toBe(code);
      }
    }
  });
});
