import Papa from "papaparse";
import { NextResponse } from "next/server";
import { z } from "zod";
import { getDb } from "@/db/client";
import { importLots } from "@/db/inventory/commands";
import { requireUser } from "@/app/_server/session";
import { toErrorResponse } from "@/app/_server/errors";
import { AppError } from "@/lib/errors";
import { lotCsvRowSchema } from "@/lib/inventory/schemas";

const MAX_BYTES = 1_000_000;
const MAX_ROWS = 500;

// POST /api/inventory/lots/import – receive lots from a CSV (text/csv body; header row: material, supplier, supplier_lot, form, received_on, expires_on, quantity_kg, storage_notes); all rows or none (technician, manager, admin)
export async function POST(req: Request) {
  try {
    const user = await requireUser("inventory:write");
    const type = req.headers.get("content-type") ?? "";
    if (!/^text\/(csv|plain)\b/i.test(type)) throw new AppError("unsupported_media_type", "Send the CSV as text/csv.");
    if (Number(req.headers.get("content-length") ?? 0) > MAX_BYTES) throw new AppError("payload_too_large", "A CSV of at most 1 MB, please.");
    const text = await req.text();
    if (text.length > MAX_BYTES) throw new AppError("payload_too_large", "A CSV of at most 1 MB, please.");
    const parsed = Papa.parse<Record<string, string>>(text.replace(/^\uFEFF/, ""), { header: true, skipEmptyLines: "greedy", transformHeader: (h) => h.trim().toLowerCase() });
    if (parsed.errors.length) throw new AppError("invalid", `The CSV could not be read: ${parsed.errors[0].message} (row ${(parsed.errors[0].row ?? 0) + 2}).`);
    if (!parsed.data.length) throw new AppError("invalid", "The CSV has no rows.");
    if (parsed.data.length > MAX_ROWS) throw new AppError("payload_too_large", `At most ${MAX_ROWS} lots per import.`);
    const rows = [];
    const fieldErrors: Record<string, string[]> = {};
    for (const [i, raw] of parsed.data.entries()) {
      const r = lotCsvRowSchema.safeParse(raw);
      if (r.success) rows.push(r.data);
      else for (const [k, v] of Object.entries(z.flattenError(r.error).fieldErrors)) fieldErrors[`row ${i + 2}.${k}`] = v as string[];
    }
    if (Object.keys(fieldErrors).length) throw new AppError("invalid", "Some rows are not valid; nothing was received.", fieldErrors);
    return NextResponse.json({ lots: await importLots(getDb(), rows, user.id) }, { status: 201 });
  } catch (err) {
    return toErrorResponse(err);
  }
}
