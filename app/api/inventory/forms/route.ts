import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { addForm } from "@/db/inventory/commands";
import { listForms } from "@/db/inventory/reads";
import { requireUser } from "@/app/_server/session";
import { readJson, toErrorResponse } from "@/app/_server/errors";
import { formSchema } from "@/lib/inventory/schemas";

// GET /api/inventory/forms – the shop's list of feedstock forms and containers (every role)
export async function GET() {
  try {
    await requireUser("shop:read");
    return NextResponse.json({ forms: await listForms(getDb()) });
  } catch (err) {
    return toErrorResponse(err);
  }
}

// POST /api/inventory/forms – add a form or container to the list (technician, manager, admin)
export async function POST(req: Request) {
  try {
    await requireUser("inventory:write");
    const { name } = formSchema.parse(await readJson(req));
    return NextResponse.json({ form: await addForm(getDb(), name) }, { status: 201 });
  } catch (err) {
    return toErrorResponse(err);
  }
}
