import { randomUUID } from "node:crypto";
import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { requireUser } from "@/app/_server/session";
import { getEnv } from "@/lib/env";
import { toErrorResponse } from "@/app/_server/errors";
import { deleteObjectQuietly } from "@/adapters/storage/s3";
import { receiveStl, recordStl, storeStl, type ReceivedStl } from "@/app/_server/stl-upload";

// POST /api/quotes/geometry – a customer's STL for a quote line (raw body, name in x-filename): spooled to disk as it arrives, checked, stored and analysed by the worker exactly as a part's geometry; poll /api/files/[id] (manager, admin)
export async function POST(req: Request) {
  let stl: ReceivedStl | null = null;
  let storedKey: string | null = null;
  try {
    const user = await requireUser("quotes:write");
    stl = await receiveStl(req);
    const fileId = randomUUID();
    const key = `geometry/quotes/${fileId}.stl`;
    storedKey = key;
    await storeStl(key, stl.upload);
    const received = stl;
    const row = await getDb().transaction().execute((trx) => recordStl(trx, fileId, key, received, user.id));
    storedKey = null;
    return NextResponse.json({ file: { id: row.id, filename: row.filename, status: row.status, size_bytes: row.size_bytes, triangles: stl.triangles } }, { status: 201 });
  } catch (err) {
    if (storedKey) await deleteObjectQuietly(getEnv().S3_BUCKET, storedKey);
    return toErrorResponse(err);
  } finally {
    await stl?.upload.dispose();
  }
}
