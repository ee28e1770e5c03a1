import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { importPartRows } from "@/db/parts/commands";
import { actorCan } from "@/lib/auth/api-scopes";
import { requireUser } from "@/app/_server/session";
import { AppError } from "@/lib/errors";
import { readJson, toErrorResponse } from "@/app/_server/errors";
import { importSchema } from "@/lib/parts/schemas";

// POST /api/parts/import – check (dry_run) or import CSV rows of orders and parts: all or nothing, or the valid rows only (technician, admin)
export async function POST(req: Request) {
  try {
    const user = await requireUser("parts:write");
    if (!actorCan(user, "orders:write")) throw new AppError("forbidden", "Importing creates orders, which your role may not do.");
    const input = importSchema.parse(await readJson(req));
    const outcome = await getDb().transaction().execute((trx) => importPartRows(trx, input, user));
    if (!input.dry_run && input.mode === "all" && outcome.invalid > 0) {
      return NextResponse.json(
        { error: { code: "invalid", message: `${outcome.invalid} of ${input.rows.length} rows have errors; nothing was imported.`, details: outcome } },
        { status: 422 },
      );
    }
    return NextResponse.json(outcome, { status: input.dry_run ? 200 : 201 });
  } catch (err) {
    return toErrorResponse(err);
  }
}
