import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { findByCode, findById } from "@/db/scan/reads";
import { requireUser } from "@/app/_server/session";
import { toErrorResponse } from "@/app/_server/errors";
import { AppError } from "@/lib/errors";
import { parseScan } from "@/lib/scan/codes";

// GET /api/scan?code= – what a scanned or typed code names (unit, build, wash batch, furnace run), with its page and version (every role)
export async function GET(req: Request) {
  try {
    await requireUser("shop:read");
    const raw = new URL(req.url).searchParams.get("code") ?? "";
    const parsed = parseScan(raw.slice(0, 2048));
    if (!parsed) throw new AppError("invalid", "That is not a Hearth code or traveler address.", { code: ["not a unit, build, wash batch or furnace run code"] });
    const db = getDb();
    const hits = parsed.kind === "page" ? [await findById(db, parsed.scanKind, parsed.id)].filter((h) => h !== undefined) : await findByCode(db, parsed.code);
    if (!hits.length) throw new AppError("not_found", `Nothing in the shop has the code ${parsed.kind === "code" ? parsed.code : "on that traveler"}.`, { code: ["unknown code"] });
    return NextResponse.json({ hits }, { headers: { "cache-control": "no-store" } });
  } catch (err) {
    return toErrorResponse(err);
  }
}
