import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { recallLot } from "@/db/inventory/commands";
import { requireUser } from "@/app/_server/session";
import { readJson, toErrorResponse } from "@/app/_server/errors";
import { recallSchema } from "@/lib/inventory/schemas";
import { recallCsv } from "@/lib/inventory/csv";
import { readId, type IdContext } from "@/app/api/builds/_helpers";

// POST /api/inventory/lots/[id]/recall – hold every unit printed from the lot that is still in the shop; lists the rest (?format=csv for a file) (manager, admin)
export async function POST(req: Request, ctx: IdContext) {
  try {
    const user = await requireUser("inventory:recall");
    const id = await readId(ctx, "Feedstock lot");
    const input = recallSchema.parse(await readJson(req));
    const result = await recallLot(getDb(), id, input, user.id);
    if (new URL(req.url).searchParams.get("format") === "csv") {
      return new Response(recallCsv(result), { headers: { "content-type": "text/csv; charset=utf-8", "content-disposition": `attachment; filename="recall-${id.slice(0, 8)}.csv"` } });
    }
    return NextResponse.json(result);
  } catch (err) {
    return toErrorResponse(err);
  }
}
