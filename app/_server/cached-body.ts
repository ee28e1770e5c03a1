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
