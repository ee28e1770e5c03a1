import type { WindowBody } from "@/lib/floor/window-body";

/**
 * A response body over cached bytes themselves: a Uint8Array body would be copied per response,
 * and the floor's window and the board are answered from shared buffers many times a second.
 */
export function cachedBody(bytes: Uint8Array): ReadableStream<Uint8Array> {
  return new ReadableStream({
    start(controller) {
      controller.enqueue(bytes);
      controller.close();
    },
  });
}

/**
 * A shared read's answer from a route handler: 304 when the browser already holds this body
 * (If-None-Match), else the plain bytes (Next.js compresses a handler's response itself, and
 * would do it twice).
 */
export function sharedReadResponse(req: Request, body: WindowBody): Response {
  if (body.notModified(req.headers.get("if-none-match"))) return new Response(null, { status: 304, headers: body.notModifiedHeaders });
  const { bytes, headers } = body.encoded(false);
  return new Response(cachedBody(bytes), { headers });
}
