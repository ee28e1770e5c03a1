import { gunzipSync } from "node:zlib";
import { describe, expect, it } from "vitest";
import { WindowBody } from "@/lib/floor/window-body";
import { acceptsGzip } from "@/lib/http/accept-encoding";

// The floor window's encoded body and the Accept-Encoding rule (RFC 9110 §12.5.3: a coding is
// acceptable when listed or covered by "*" with a weight above zero; "q=0" means "not acceptable").

describe("acceptsGzip", () => {
  it("reads the header as RFC 9110 §12.5.3 says", () => {
    expect(acceptsGzip("gzip, deflate, br")).toBe(true); // what browsers send
    expect(acceptsGzip("br;q=1.0, gzip;q=0.8, *;q=0.1")).toBe(true);
    expect(acceptsGzip("GZIP")).toBe(true);
    expect(acceptsGzip("x-gzip")).toBe(true);
    expect(acceptsGzip("*")).toBe(true);
    expect(acceptsGzip("gzip;q=0")).toBe(false);
    expect(acceptsGzip("gzip;q=0.000, identity")).toBe(false);
    expect(acceptsGzip("*;q=0.5, gzip;q=0")).toBe(false); // the named coding wins over "*"
    expect(acceptsGzip("br, deflate")).toBe(false);
    expect(acceptsGzip("identity")).toBe(false);
    expect(acceptsGzip("")).toBe(false);
    expect(acceptsGzip(null)).toBe(false);
    expect(acceptsGzip(undefined)).toBe(false);
    expect(acceptsGzip("gzip;q=abc")).toBe(false);
  });
});

describe("WindowBody", () => {
  const json = JSON.stringify({ events: Array.from({ length: 200 }, (_, i) => ({ id: i, title: `B-${i} · 17-4PH`, state: "scheduled" })) });

  it("keeps the UTF-8 bytes and describes them", () => {
    const body = WindowBody.fromJson(json);
    const { bytes, headers } = body.encoded(false);
    expect(bytes.toString("utf8")).toBe(json);
    expect(headers["content-length"]).toBe(String(Buffer.byteLength(json)));
    expect(headers["content-encoding"]).toBeUndefined();
    expect(headers.vary).toBe("Accept-Encoding");
  });

  it("gzips once and serves the same bytes after", () => {
    const body = WindowBody.fromJson(json);
    const first = body.encoded(true);
    expect(first.headers["content-encoding"]).toBe("gzip");
    expect(gunzipSync(first.bytes).toString("utf8")).toBe(json);
    expect(first.bytes.length).toBeLessThan(Buffer.byteLength(json) / 4);
    expect(body.encoded(true).bytes).toBe(first.bytes);
  });

  it("ready() compresses off the event loop and answers the same bytes and tag as fromJson", async () => {
    const body = await WindowBody.ready(json);
    const plain = WindowBody.fromJson(json);
    const zipped = body.encoded(true);
    expect(zipped.headers["content-encoding"]).toBe("gzip");
    expect(gunzipSync(zipped.bytes).toString("utf8")).toBe(json);
    // Already made: asking again hands back the very buffer, nothing compressed on the request.
    expect(body.encoded(true).bytes).toBe(zipped.bytes);
    expect(body.etag).toBe(plain.etag);
    expect(body.encoded(false).bytes.equals(plain.encoded(false).bytes)).toBe(true);
  });
});

describe("WindowBody entity tag", () => {
  it("tags the bytes (weak: plain and gzip are one answer) and matches If-None-Match as RFC 9110 §13.1.2 says", () => {
    const a = WindowBody.fromJson('{"builds":[1]}');
    const b = WindowBody.fromJson('{"builds":[2]}');
    expect(a.etag).toMatch(/^W\/"[A-Za-z0-9_-]{32}"$/);
    expect(a.etag).toBe(WindowBody.fromJson('{"builds":[1]}').etag);
    expect(a.etag).not.toBe(b.etag);
    expect(a.encoded(true).headers.etag).toBe(a.etag);
    expect(a.encoded(false).headers.etag).toBe(a.etag);
    expect(a.encoded(false).headers["cache-control"]).toBe("private, no-cache");
    expect(a.notModified(a.etag)).toBe(true);
    expect(a.notModified(a.etag.slice(2))).toBe(true); // weak comparison ignores W/
    expect(a.notModified(`${b.etag}, ${a.etag}`)).toBe(true);
    expect(a.notModified("*")).toBe(true);
    expect(a.notModified(b.etag)).toBe(false);
    expect(a.notModified("")).toBe(false);
    expect(a.notModified(undefined)).toBe(false);
    expect(a.notModifiedHeaders).toEqual({ etag: a.etag, "cache-control": "private, no-cache", vary: "Accept-Encoding" });
  });
});
