import { Readable } from "node:stream";
import { CreateBucketCommand, DeleteObjectCommand, GetObjectCommand, HeadBucketCommand, S3Client } from "@aws-sdk/client-s3";
import { NodeHttpHandler } from "@smithy/node-http-handler";
import { getEnv } from "@/lib/env";

let client: S3Client | undefined;

// A store that accepts connections and never answers must not hold a request for ever:
// connecting is given up after S3_CONNECT_TIMEOUT_MS, a request whose socket stays silent for
// S3_IDLE_TIMEOUT_MS fails (@smithy/node-http-handler's connectionTimeout and socketTimeout;
// its requestTimeout would bound the whole transfer, which a large upload on a slow link may
// rightly exceed), and the SDK tries twice at most.
export const HEALTH_CHECK_MS = 3_000;

/** S3 client for the configured endpoint: the local s3rver fake, or any S3-compatible store. */
export function getS3(): S3Client {
  if (!client) {
    const env = getEnv();
    client = new S3Client({
      region: env.S3_REGION,
      endpoint: env.S3_ENDPOINT,
      forcePathStyle: env.S3_FORCE_PATH_STYLE === "true",
      credentials: { accessKeyId: env.S3_ACCESS_KEY_ID, secretAccessKey: env.S3_SECRET_ACCESS_KEY },
      maxAttempts: 2,
      // A checksum only where S3 requires one: with the default ("when supported"), a streamed
      // body is sent aws-chunked with a trailing checksum, which several S3-compatible stores
      // (the local fake among them) store as it came, framing and all.
      requestChecksumCalculation: "WHEN_REQUIRED",
      responseChecksumValidation: "WHEN_REQUIRED",
      requestHandler: new NodeHttpHandler({ connectionTimeout: env.S3_CONNECT_TIMEOUT_MS, socketTimeout: env.S3_IDLE_TIMEOUT_MS }),
    });
  }
  return client;
}

/** Whether the bucket answers, within HEALTH_CHECK_MS whatever the store does. */
export async function checkBucket(): Promise<void> {
  await getS3().send(new HeadBucketCommand({ Bucket: getEnv().S3_BUCKET }), { abortSignal: AbortSignal.timeout(HEALTH_CHECK_MS) });
}

export async function ensureBucket(): Promise<void> {
  try {
    await checkBucket();
  } catch {
    await getS3().send(new CreateBucketCommand({ Bucket: getEnv().S3_BUCKET }));
  }
}

/** Removes an object; a failure is logged and left to the worker's orphan sweep. */
export async function deleteObjectQuietly(bucket: string, key: string): Promise<boolean> {
  try {
    await getS3().send(new DeleteObjectCommand({ Bucket: bucket, Key: key }));
    return true;
  } catch (err) {
    console.error(`[storage] could not delete ${key}; the orphan sweep will:`, err instanceof Error ? err.message : err);
    return false;
  }
}

/** How long the store may take to start answering a read (its headers); the body then streams under S3_IDLE_TIMEOUT_MS. */
export const OPEN_OBJECT_MS = 10_000;

export type OpenedObject = { body: ReadableStream<Uint8Array>; length: number | undefined };

/**
 * Opens a stored object as a stream instead of holding it in memory. The wait for the store's
 * answer is bounded by OPEN_OBJECT_MS (not the whole transfer, which may rightly be long on a slow
 * link; a silent socket mid-body fails by the client's socketTimeout). When `signal` aborts (the
 * reader went away) or the returned stream is cancelled, the store's response is destroyed, so a
 * dropped download leaves no open socket behind.
 */
export async function openObject(bucket: string, key: string, signal?: AbortSignal): Promise<OpenedObject> {
  const abort = new AbortController();
  const onGone = () => abort.abort(signal?.reason);
  if (signal?.aborted) onGone();
  signal?.addEventListener("abort", onGone, { once: true });
  const timer = setTimeout(() => abort.abort(new Error(`object store did not answer within ${OPEN_OBJECT_MS} ms`)), OPEN_OBJECT_MS);
  try {
    const res = await getS3().send(new GetObjectCommand({ Bucket: bucket, Key: key }), { abortSignal: abort.signal });
    if (!res.Body) throw new Error(`object store returned no body for ${key}`);
    const node = res.Body as unknown as Readable;
    // The abort listener stays until the body ends: a reader leaving mid-body destroys the socket.
    node.once("close", () => signal?.removeEventListener("abort", onGone));
    return { body: Readable.toWeb(node) as ReadableStream<Uint8Array>, length: res.ContentLength };
  } catch (err) {
    signal?.removeEventListener("abort", onGone);
    throw err;
  } finally {
    clearTimeout(timer);
  }
}
