import { z } from "zod";
import { ComputationError } from "@/lib/errors";
import {
  checkClosedMesh,
  firstNonFiniteTriangle,
  measureTriangles,
  measuresFrom,
  type ClosedMeshReport,
  type MeshMeasures,
} from "@/lib/geometry/mesh";

// STL reader. Binary layout (little-endian IEEE-754): 80-byte header, UINT32 facet count, then
// 50 bytes per facet: normal (3 × REAL32), three vertices (9 × REAL32), UINT16 attribute
// count; file size = 84 + 50·n. ASCII: solid name / facet normal … / outer loop /
// vertex x y z ×3 / endloop / endfacet / endsolid, lines ending in LF, CR LF or a lone CR.
// Facet normals are not used: they are often wrong or zero in the wild, and the vertex order
// carries the orientation.

export type StlErrorCode = "empty" | "truncated" | "count_mismatch" | "non_finite" | "too_large" | "not_stl";

/** A file that cannot be read as STL; `stlCode` says why in one word, the message in words. */
export class StlError extends ComputationError {
  constructor(
    readonly stlCode: StlErrorCode,
    message: string,
    details?: Record<string, unknown>,
  ) {
    super(message, "file", { ...details, code: stlCode });
    this.name = "StlError";
  }
}

export const BINARY_HEADER_BYTES = 80;
export const BINARY_PREAMBLE_BYTES = 84;
export const BINARY_FACET_BYTES = 50;
/** Same default as the upload limit; callers pass their own. */
export const DEFAULT_MAX_STL_BYTES = 100 * 1024 * 1024;

export const stlParseOptionsSchema = z.object({
  maxBytes: z.number().int().positive().default(DEFAULT_MAX_STL_BYTES),
  /**
   * Binary only: write the vertices over the input's own memory instead of a new array, so a
   * large upload is not held twice. The input bytes are then no longer an STL file (also when
   * parsing fails part-way); use it only for a buffer that is thrown away after parsing.
   */
  reuseInput: z.boolean().default(false),
});
export type StlParseOptions = z.input<typeof stlParseOptionsSchema>;

export type ParsedStl = {
  format: "binary" | "ascii";
  triangleCount: number;
  /** 9 floats per triangle: v1, v2, v3. */
  positions: Float32Array;
  /** Binary: the 80-byte header as text; ASCII: the solid's name. */
  label: string;
  /** Measured while reading (binary) or in one pass over the floats (ASCII). */
  measures: MeshMeasures;
};

export const binaryStlSize = (triangles: number) => BINARY_PREAMBLE_BYTES + BINARY_FACET_BYTES * triangles;

function asBytes(data: Uint8Array | ArrayBuffer): Uint8Array {
  if (data instanceof Uint8Array) return data;
  if (data instanceof ArrayBuffer) return new Uint8Array(data);
  throw new StlError("not_stl", "the file content must be bytes (Uint8Array or ArrayBuffer)");
}

function startsWithSolid(bytes: Uint8Array): boolean {
  let i = 0;
  if (bytes[0] === 0xef && bytes[1] === 0xbb && bytes[2] === 0xbf) i = 3; // UTF-8 BOM
  while (i < bytes.length && (bytes[i] === 0x20 || bytes[i] === 0x09 || bytes[i] === 0x0a || bytes[i] === 0x0d)) i++;
  const word = "solid";
  for (let k = 0; k < word.length; k++) {
    const c = bytes[i + k];
    if (c === undefined || (c | 0x20) !== word.charCodeAt(k)) return false;
  }
  return true;
}

/** Text has no NUL bytes and few control bytes; binary float data has plenty of both. */
function looksLikeText(bytes: Uint8Array, from: number, length: number): boolean {
  const end = Math.min(bytes.length, from + length);
  let odd = 0;
  for (let i = from; i < end; i++) {
    const c = bytes[i];
    if (c === 0) return false;
    if (c < 32 && c !== 9 && c !== 10 && c !== 13 && c !== 12) odd++;
  }
  return odd <= (end - from) / 100;
}

/**
 * Binary or ASCII? A binary header may itself begin with "solid" (several exporters write
 * that), so the size rule 84 + 50·n decides first. An ASCII file cannot pass that rule by
 * accident: four text bytes read as a count are at least 0x09090909, i.e. gigabytes.
 */
export function detectStlFormat(bytes: Uint8Array): "binary" | "ascii" {
  if (bytes.length === 0) throw new StlError("empty", "the file is empty");
  const solid = startsWithSolid(bytes);
  if (bytes.length >= BINARY_PREAMBLE_BYTES) {
    const count = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength).getUint32(BINARY_HEADER_BYTES, true);
    if (binaryStlSize(count) === bytes.length) return "binary";
  }
  if (solid && looksLikeText(bytes, 0, 4096)) return "ascii";
  if (looksLikeText(bytes, 0, Math.min(bytes.length, 4096)) && !solid) {
    throw new StlError("not_stl", "the file is text but does not begin with \"solid\": it is not an STL file");
  }
  return "binary";
}

export function parseStl(data: Uint8Array | ArrayBuffer, options: StlParseOptions = {}): ParsedStl {
  const bytes = asBytes(data);
  const { maxBytes, reuseInput } = stlParseOptionsSchema.parse(options);
  if (bytes.length > maxBytes) {
    throw new StlError("too_large", `the file is ${bytes.length} bytes; the limit is ${maxBytes} bytes`, {
      bytes: bytes.length,
      maxBytes,
    });
  }
  return detectStlFormat(bytes) === "binary" ? parseBinaryStl(bytes, { reuseInput }) : parseAsciiStl(bytes);
}

export function parseBinaryStl(bytes: Uint8Array, options: { reuseInput?: boolean } = {}): ParsedStl {
  if (bytes.length === 0) throw new StlError("empty", "the file is empty");
  if (bytes.length < BINARY_PREAMBLE_BYTES) {
    throw new StlError(
      "truncated",
      `the file is ${bytes.length} bytes, shorter than the 84-byte header and facet count of a binary STL`,
    );
  }
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  const count = view.getUint32(BINARY_HEADER_BYTES, true);
  const expected = binaryStlSize(count);
  if (expected > bytes.length) {
    const whole = Math.floor((bytes.length - BINARY_PREAMBLE_BYTES) / BINARY_FACET_BYTES);
    throw new StlError(
      "truncated",
      `the header announces ${count} triangles (${expected} bytes) but the file has ${bytes.length} bytes ` +
        `(${whole} whole triangles): it was cut short`,
      { declared: count, bytes: bytes.length },
    );
  }
  if (expected < bytes.length) {
    throw new StlError(
      "count_mismatch",
      `the header announces ${count} triangles (${expected} bytes) but the file has ${bytes.length} bytes`,
      { declared: count, bytes: bytes.length },
    );
  }
  if (count === 0) throw new StlError("empty", "the file holds no triangles");

  // Read before the loop: with reuseInput the header is the first thing overwritten.
  let label = "";
  for (let i = 0; i < BINARY_HEADER_BYTES && bytes[i] !== 0; i++) label += String.fromCharCode(bytes[i]);

  // One pass: copy the vertices out (the facet records are not 4-byte aligned, so a DataView
  // reads them) and accumulate the measures as measureTriangles does, so a million-facet file
  // is not walked twice. tests/lib/stl.test.ts checks that both give the same numbers.
  // In place, facet t is read (bytes 96 + 50t on) before its floats are written (36t on), and
  // every later read lies beyond every earlier write.
  const p =
    options.reuseInput && bytes.byteOffset % 4 === 0
      ? new Float32Array(bytes.buffer, bytes.byteOffset, count * 9)
      : new Float32Array(count * 9);
  const first = BINARY_PREAMBLE_BYTES + 12; // skip each facet's normal
  const ox = view.getFloat32(first, true);
  const oy = view.getFloat32(first + 4, true);
  const oz = view.getFloat32(first + 8, true);
  let minX = Infinity, minY = Infinity, minZ = Infinity;
  let maxX = -Infinity, maxY = -Infinity, maxZ = -Infinity;
  let area2 = 0;
  let volume6 = 0;
  for (let t = 0, i = 0, off = first; t < count; t++, i += 9, off += BINARY_FACET_BYTES) {
    const ax = view.getFloat32(off, true), ay = view.getFloat32(off + 4, true), az = view.getFloat32(off + 8, true);
    const bx = view.getFloat32(off + 12, true), by = view.getFloat32(off + 16, true), bz = view.getFloat32(off + 20, true);
    const cx = view.getFloat32(off + 24, true), cy = view.getFloat32(off + 28, true), cz = view.getFloat32(off + 32, true);
    p[i] = ax; p[i + 1] = ay; p[i + 2] = az;
    p[i + 3] = bx; p[i + 4] = by; p[i + 5] = bz;
    p[i + 6] = cx; p[i + 7] = cy; p[i + 8] = cz;
    minX = Math.min(minX, ax, bx, cx); maxX = Math.max(maxX, ax, bx, cx);
    minY = Math.min(minY, ay, by, cy); maxY = Math.max(maxY, ay, by, cy);
    minZ = Math.min(minZ, az, bz, cz); maxZ = Math.max(maxZ, az, bz, cz);
    const ux = ax - ox, uy = ay - oy, uz = az - oz;
    const vx = bx - ox, vy = by - oy, vz = bz - oz;
    const wx = cx - ox, wy = cy - oy, wz = cz - oz;
    const e1x = vx - ux, e1y = vy - uy, e1z = vz - uz;
    const e2x = wx - ux, e2y = wy - uy, e2z = wz - uz;
    const nx = e1y * e2z - e1z * e2y, ny = e1z * e2x - e1x * e2z, nz = e1x * e2y - e1y * e2x;
    area2 += Math.sqrt(nx * nx + ny * ny + nz * nz);
    volume6 += ux * (vy * wz - vz * wy) + uy * (vz * wx - vx * wz) + uz * (vx * wy - vy * wx);
  }
  // A NaN or infinite coordinate always reaches the area sum (0·∞ and NaN·x are NaN), and
  // finite float32 values cannot overflow it (products of four stay below 1e155), so the
  // per-value test runs only when a sum has gone bad, to name the first bad triangle.
  if (!Number.isFinite(area2) || !Number.isFinite(volume6)) {
    const bad = firstNonFiniteTriangle(p);
    throw new StlError("non_finite", `triangle ${bad + 1} has a coordinate that is NaN or infinite`, {
      triangle: bad,
    });
  }
  const measures = measuresFrom(count, minX, minY, minZ, maxX, maxY, maxZ, area2, volume6);
  return { format: "binary", triangleCount: count, positions: p, label: label.trim(), measures };
}

const NON_FINITE_WORD = /^[-+]?(?:nan|inf|infinity)$/i;

export function parseAsciiStl(bytes: Uint8Array): ParsedStl {
  if (bytes.length === 0) throw new StlError("empty", "the file is empty");
  const text = new TextDecoder("utf-8", { fatal: false }).decode(bytes);
  // A line ends at LF, CR LF or a lone CR: files from classic Mac OS exporters still use the
  // last, and the line numbers in errors must match what an editor shows for all three.
  const lineOf = (index: number) => {
    let line = 1;
    for (let i = 0, end = Math.min(index, text.length); i < end; i++) {
      const c = text.charCodeAt(i);
      if (c === 10 || (c === 13 && text.charCodeAt(i + 1) !== 10)) line++;
    }
    return line;
  };
  const token = /\S+/g;
  let match: RegExpExecArray | null = null;
  const next = (): string | undefined => {
    match = token.exec(text);
    return match ? match[0] : undefined;
  };
  const at = () => (match ? lineOf(match.index) : lineOf(text.length));
  const unexpected = (expected: string, got: string | undefined): never => {
    if (got === undefined) {
      throw new StlError("truncated", `the file ends where "${expected}" was expected (line ${at()}): it was cut short`);
    }
    throw new StlError("not_stl", `line ${at()}: expected "${expected}" but found "${got.slice(0, 40)}"`);
  };
  const expectWord = (word: string) => {
    const got = next();
    if (got === undefined || got.toLowerCase() !== word) unexpected(word, got);
  };
  const restOfLine = () => {
    const from = token.lastIndex;
    let end = from;
    while (end < text.length && text.charCodeAt(end) !== 10 && text.charCodeAt(end) !== 13) end++;
    token.lastIndex = end;
    return text.slice(from, end).trim();
  };

  let capacity = Math.max(9, Math.ceil(bytes.length / 250) * 9);
  let positions = new Float32Array(capacity);
  let used = 0;
  let label = "";
  let solids = 0;

  const readNumber = (what: string): number => {
    const got = next();
    if (got === undefined) unexpected(what, got);
    const value = Number(got);
    if (NON_FINITE_WORD.test(got!) || value === Infinity || value === -Infinity) {
      throw new StlError("non_finite", `line ${at()}: the ${what} "${got}" is not a finite number`);
    }
    if (Number.isNaN(value)) throw new StlError("not_stl", `line ${at()}: "${got!.slice(0, 40)}" is not a number`);
    const stored = Math.fround(value);
    if (!Number.isFinite(stored)) {
      throw new StlError("non_finite", `line ${at()}: ${got} is beyond the range of a 32-bit float`);
    }
    return stored;
  };

  let word = next();
  if (word === undefined) throw new StlError("empty", "the file holds only white space");
  while (word !== undefined) {
    if (word.toLowerCase() !== "solid") unexpected("solid", word);
    const name = restOfLine();
    if (solids === 0) label = name;
    solids++;
    for (;;) {
      word = next();
      const lower = word?.toLowerCase();
      if (lower === "endsolid") {
        restOfLine();
        break;
      }
      if (lower !== "facet") unexpected("facet\" or \"endsolid", word);
      expectWord("normal");
      for (let k = 0; k < 3; k++) {
        const got = next();
        if (got === undefined) unexpected("normal component", got);
      }
      expectWord("outer");
      expectWord("loop");
      if (used + 9 > capacity) {
        capacity *= 2;
        const grown = new Float32Array(capacity);
        grown.set(positions.subarray(0, used));
        positions = grown;
      }
      for (let v = 0; v < 3; v++) {
        expectWord("vertex");
        positions[used++] = readNumber("x coordinate");
        positions[used++] = readNumber("y coordinate");
        positions[used++] = readNumber("z coordinate");
      }
      expectWord("endloop");
      expectWord("endfacet");
    }
    word = next();
  }
  if (used === 0) throw new StlError("empty", "the file holds no triangles");
  const exact = positions.slice(0, used);
  return { format: "ascii", triangleCount: used / 9, positions: exact, label, measures: measureTriangles(exact) };
}

export type StlAnalysis = {
  format: "binary" | "ascii";
  label: string;
  bytes: number;
  measures: MeshMeasures;
  /** Present when asked for: the closed check costs more than the measures. */
  closed?: ClosedMeshReport;
};

/** Parse, measure and (optionally) check closure of an STL file's bytes. */
export function analyzeStl(
  data: Uint8Array | ArrayBuffer,
  options: StlParseOptions & { closedCheck?: boolean } = {},
): StlAnalysis {
  const { closedCheck = true, ...parseOptions } = options;
  const bytes = asBytes(data);
  const parsed = parseStl(bytes, parseOptions);
  return {
    format: parsed.format,
    label: parsed.label,
    bytes: bytes.length,
    measures: parsed.measures,
    ...(closedCheck ? { closed: checkClosedMesh(parsed.positions) } : {}),
  };
}

/**
 * The checks a file too large to parse in a request can pass from its first bytes, its size and
 * its last bytes: a binary STL's size is 84 + 50·n for the count in its header; an ASCII STL
 * begins with "solid" and ends with "endsolid". The worker measures the whole file afterwards
 * and marks it failed with the parser's reason if the rest is broken. Returns the format and,
 * for a binary file, its triangle count.
 */
export function checkStlShape(head: Uint8Array, size: number, tail: Uint8Array): { format: "binary" | "ascii"; triangles: number | null } {
  if (size === 0) throw new StlError("empty", "the file is empty");
  if (head.length >= BINARY_PREAMBLE_BYTES) {
    const count = new DataView(head.buffer, head.byteOffset, head.byteLength).getUint32(BINARY_HEADER_BYTES, true);
    if (binaryStlSize(count) === size) {
      if (count === 0) throw new StlError("empty", "the file holds no triangles");
      return { format: "binary", triangles: count };
    }
  }
  if (startsWithSolid(head) && looksLikeText(head, 0, 4096)) {
    const end = new TextDecoder().decode(tail).trimEnd();
    if (!/endsolid[^\n]*$/i.test(end)) throw new StlError("truncated", "the file does not end with \"endsolid\": it was cut short");
    return { format: "ascii", triangles: null };
  }
  if (looksLikeText(head, 0, Math.min(head.length, 4096))) {
    throw new StlError("not_stl", "the file is text but does not begin with \"solid\": it is not an STL file");
  }
  if (head.length < BINARY_PREAMBLE_BYTES) {
    throw new StlError("truncated", `the file is ${size} bytes, shorter than the 84-byte header and facet count of a binary STL`);
  }
  const count = new DataView(head.buffer, head.byteOffset, head.byteLength).getUint32(BINARY_HEADER_BYTES, true);
  const expected = binaryStlSize(count);
  throw new StlError(
    expected > size ? "truncated" : "count_mismatch",
    `the header announces ${count} triangles (${expected} bytes) but the file has ${size} bytes${expected > size ? ": it was cut short" : ""}`,
    { declared: count, bytes: size },
  );
}
