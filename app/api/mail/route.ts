import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { listOutbox, summarizeOutbox } from "@/db/outbox/reads";
import { requireUser } from "@/app/_server/session";
import { toErrorResponse } from "@/app/_server/errors";
import { AppError } from "@/lib/errors";
import { fetchCapturedMessages } from "@/adapters/mail/capture";
import { listMailQuerySchema } from "@/lib/mail/schemas";

export const dynamic = "force-dynamic";

// GET /api/mail – messages kept by the local capture server, with the outbox beside them (admin)
export async function GET(req: Request) {
  try {
    await requireUser("mail:read");
    const query = listMailQuerySchema.parse(Object.fromEntries(new URL(req.url).searchParams));
    const db = getDb();
    const [outbox, recent] = await Promise.all([summarizeOutbox(db), listOutbox(db, { limit: 50 })]);
    let messages: Awaited<ReturnType<typeof fetchCapturedMessages>> = [];
    let capture_error: string | null = null;
    try {
      messages = await fetchCapturedMessages(query);
    } catch (err) {
      // The outbox is still worth showing when the capture server is away.
      if (!(err instanceof AppError)) throw err;
      capture_error = err.message;
    }
    return NextResponse.json({ messages, capture_error, outbox, outbox_recent: recent }, { headers: { "cache-control": "no-store" } });
  } catch (err) {
    return toErrorResponse(err);
  }
}
