import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { expireQuotes, insertQuote } from "@/db/quotes/commands";
import { listQuotes } from "@/db/quotes/reads";
import { requireUser } from "@/app/_server/session";
import { readJson, toErrorResponse } from "@/app/_server/errors";
import { createQuoteSchema } from "@/lib/quotes/schemas";

// GET /api/quotes – quotes, newest first; sent quotes past their validity are expired on the way (manager, admin, technician)
export async function GET() {
  try {
    await requireUser("quotes:read");
    const db = getDb();
    await expireQuotes(db);
    return NextResponse.json({ quotes: await listQuotes(db) });
  } catch (err) {
    return toErrorResponse(err);
  }
}

// POST /api/quotes – start a draft quote (manager, admin)
export async function POST(req: Request) {
  try {
    const user = await requireUser("quotes:write");
    const input = createQuoteSchema.parse(await readJson(req));
    return NextResponse.json({ quote: await insertQuote(getDb(), input, user.id) }, { status: 201 });
  } catch (err) {
    return toErrorResponse(err);
  }
}
