import http from "node:http";

export type RawResponse = { status: number; headers: http.IncomingHttpHeaders; bytes: Buffer };

/**
 * A request with exactly these headers and this path, as sent: fetch() would add
 * Accept-Encoding (and undo the coding) and would normalise ".." in the path.
 * An event stream never ends by itself: its answer is the status and the headers
 * (no body), and then the request is closed.
 */
export function rawRequest(origin: string, path: string, headers: Record<string, string> = {}, method = "GET", body?: string | Buffer): Promise<RawResponse> {
  const { hostname, port } = new URL(origin);
  return new Promise((resolve, reject) => {
    const req = http.request({ host: hostname, port: Number(port), path, method, headers }, (res) => {
      if (String(res.headers["content-type"] ?? "").startsWith("text/event-stream")) {
        resolve({ status: res.statusCode ?? 0, headers: res.headers, bytes: Buffer.alloc(0) });
        req.destroy();
        return;
      }
      const chunks: Buffer[] = [];
      res.on("data", (c: Buffer) => chunks.push(c));
      res.on("end", () => resolve({ status: res.statusCode ?? 0, headers: res.headers, bytes: Buffer.concat(chunks) }));
      res.on("error", reject);
    });
    req.on("error", reject);
    req.end(body);
  });
}
