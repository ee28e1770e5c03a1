import { CreateBucketCommand, DeleteObjectCommand, HeadBucketCommand, S3Client } from "@aws-sdk/client-s3";
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
