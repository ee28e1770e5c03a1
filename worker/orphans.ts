import { DeleteObjectCommand, ListObjectsV2Command } from "@aws-sdk/client-s3";
import type { Database } from "@/db/client";
import { listKnownObjectKeys } from "@/db/files/reads";
import { getEnv } from "@/lib/env";
import { CERTIFICATE_PREFIX } from "@/lib/inventory/certificate";
import { getS3 } from "@/adapters/storage/s3";

// The object store and the files table cannot change in one transaction: an upload stores its
// object before its row commits, and a replaced file's object is deleted after. When a process
// dies between the two, or the store refused the delete, an object is left that no row names.
// This pass removes such objects once they are older than any upload still in progress could be.

export const ORPHAN_PREFIXES = ["geometry/", "inspections/", CERTIFICATE_PREFIX];

export type OrphanSweepResult = { listed: number; deleted: string[] };

export async function sweepOrphanObjects(db: Database, opts: { minAgeSeconds: number; prefixes?: string[]; now?: Date }): Promise<OrphanSweepResult> {
  const s3 = getS3();
  const bucket = getEnv().S3_BUCKET;
  const cutoff = (opts.now ?? new Date()).getTime() - opts.minAgeSeconds * 1000;
  const deleted: string[] = [];
  let listed = 0;
  for (const prefix of opts.prefixes ?? ORPHAN_PREFIXES) {
    let token: string | undefined;
    do {
      const page = await s3.send(new ListObjectsV2Command({ Bucket: bucket, Prefix: prefix, ContinuationToken: token, MaxKeys: 500 }));
      token = page.IsTruncated ? page.NextContinuationToken : undefined;
      const old = (page.Contents ?? []).filter((o) => o.Key && o.LastModified && o.LastModified.getTime() < cutoff).map((o) => o.Key!);
      listed += page.Contents?.length ?? 0;
      const known = await listKnownObjectKeys(db, bucket, old);
      const orphans = old.filter((k) => !known.has(k));
      // One by one: a batch delete needs a checksum header that not every S3-compatible store takes.
      for (const Key of orphans) {
        await s3.send(new DeleteObjectCommand({ Bucket: bucket, Key }));
        deleted.push(Key);
      }
    } while (token);
  }
  return { listed, deleted };
}
