import { updatePrinter } from "@/db/equipment/commands";
import { versionedPatchHandler } from "@/app/_server/resource";
import { updatePrinterSchema } from "@/lib/setup/schemas";

// PATCH /api/printers/[id] – change a printer (admin)
export const PATCH = versionedPatchHandler({ one: "printer", write: "setup:write", schema: updatePrinterSchema, update: updatePrinter });
