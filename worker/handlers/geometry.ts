import { GetObjectCommand } from "@aws-sdk/client-s3";
import type PgBoss from "pg-boss";
import { getDb } from "@/db/client";
import { findFileById } from "@/db/files/reads";
import { setFileStatus } from "@/db/files/commands";
import { getEnv } from "@/lib/env";
import { analyzeStl } from "@/lib/geometry/stl";
import { ComputationError } from "@/lib/errors";
import { geometryJobSchema } from "@/lib/jobs/queues";
import { getS3 } from "@/adapters/storage/s3";

// Measures an uploaded STL: volume, bounding box, area and the closed-mesh verdict, then
// gives the part its finished volume when the mesh is closed (an open mesh has no volume to
// trust). pg-boss retries on a throw, so a second run of the same job changes nothing: a file
// already done or failed is left alone, and only a transient failure (storage down) throws.

async function readObject(bucket: string, key: string): Promise<Uint8Array> {
  const res = await getS3().send(new GetObjectCommand({ Bucket: bucket, Key: key }));
  if (!res.Body) throw new Error(`the stored object ${key} has no body`);
  return res.Body.transformToByteArray();
}

export type GeometryAnalysis = {
  format: "binary" | "ascii";
  triangles: number;
  bounds: { min: { x: number; y: number; z: number }; max: { x: number; y: number; z: number }; size: { x: number; y: number; z: number } };
  surface_area_mm2: number;
  volume_mm3: number;
  signed_volume_mm3: number;
  closed: boolean;
  closed_reason: string;
  boundary_edges: number;
  misoriented_edges: number;
  non_manifold_edges: number;
  unit_assumption: string;
  analysed_ms: number;
};

export async function analyseFile(fileId: string, attempt: { retryCount: number; retryLimit: number }) {
  const db = getDb();
  const file = await findFileById(db, fileId);
  if (!file || file.status === "done" || file.status === "failed") return;
  await setFileStatus(db, fileId, ["queued", "analysing"], "analysing");
  let bytes: Uint8Array;
  try {
    bytes = await readObject(file.bucket, file.object_key);
  } catch (err) {
    const reason = `could not read the stored file: ${err instanceof Error ? err.message : String(err)}`;
    if (attempt.retryCount >= attempt.retryLimit) {
      await setFileStatus(db, fileId, ["queued", "analysing"], "failed", { error: reason });
      return;
    }
    throw new Error(reason);
  }
  const t0 = performance.now();
  try {
    const a = analyzeStl(bytes, { maxBytes: getEnv().UPLOAD_MAX_BYTES, closedCheck: true });
    const closed = a.closed!;
    const analysis: GeometryAnalysis = {
      format: a.format,
      triangles: a.measures.triangleCount,
      bounds: a.measures.bounds,
      surface_area_mm2: a.measures.surfaceAreaMm2,
      volume_mm3: a.measures.volumeMm3,
      signed_volume_mm3: a.measures.signedVolumeMm3,
      closed: closed.closed,
      closed_reason: closed.reason,
      boundary_edges: closed.boundaryEdges,
      misoriented_edges: closed.misorientedEdges,
      non_manifold_edges: closed.nonManifoldEdges,
      unit_assumption: a.measures.unitAssumption,
      analysed_ms: Math.round(performance.now() - t0),
    };
    await db.transaction().execute(async (trx) => {
      const moved = await setFileStatus(trx, fileId, ["analysing"], "done", { analysis, error: null });
      if (moved && closed.closed && analysis.volume_mm3 > 0) {
        await trx
          .updateTable("parts")
          .set({ volume_mm3: Math.round(analysis.volume_mm3 * 1000) / 1000, updated_at: new Date() })
          .where("geometry_file_id", "=", fileId)
          .execute();
      }
    });
  } catch (err) {
    if (err instanceof ComputationError) {
      await setFileStatus(db, fileId, ["analysing"], "failed", { error: err.message });
      return;
    }
    throw err;
  }
}

export async function handleGeometry(jobs: PgBoss.JobWithMetadata<unknown>[]) {
  for (const job of jobs) {
    const { file_id } = geometryJobSchema.parse(job.data);
    await analyseFile(file_id, { retryCount: job.retryCount, retryLimit: job.retryLimit });
  }
}
