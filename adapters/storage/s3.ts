import { CreateBucketCommand, HeadBucketCommand, S3Client } from "@aws-sdk/client-s3";
import { getEnv } from "@/lib/env";

let client: S3Client | undefined;

/** S3 client for the configured endpoint: the local s3rver fake, or any S3-compatible store. */
export function getS3(): S3Client {
  if (!client) {
    const env = getEnv();
    client = new S3Client({
      region: env.S3_REGION,
      endpoint: env.S3_ENDPOINT,
      forcePathStyle: env.S3_FORCE_PATH_STYLE === "true",
      credentials: { accessKeyId: env.S3_ACCESS_KEY_ID, secretAccessKey: env.S3_SECRET_ACCESS_KEY },
    });
  }
  return client;
}

export async function checkBucket(): Promise<void> {
  await getS3().send(new HeadBucketCommand({ Bucket: getEnv().S3_BUCKET }));
}

export async function ensureBucket(): Promise<void> {
  try {
    await checkBucket();
  } catch {
    await getS3().send(new CreateBucketCommand({ Bucket: getEnv().S3_BUCKET }));
  }
}
