import { updatePrinter } from "@/db/queries/equipment";
import { versionedPatchHandler } from "@/lib/http/resource";
import { updatePrinterSchema } from "@/lib/setup/schemas";

// PATCH /api/printers/[id] – change a printer (admin)
export const PATCH = versionedPatchHandler({ one: "printer", write: "setup:write", schema: updatePrinterSchema, update: updatePrinter });
