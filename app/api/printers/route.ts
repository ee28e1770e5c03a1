import { insertPrinter } from "@/db/equipment/commands";
import { listPrinters } from "@/db/equipment/reads";
import { collectionHandlers } from "@/app/_server/resource";
import { printerSchema } from "@/lib/setup/schemas";

// GET /api/printers – printers with the materials each takes (every role)
// POST /api/printers – add a printer (admin)
export const { GET, POST } = collectionHandlers({ many: "printers", one: "printer", read: "shop:read", write: "setup:write", schema: printerSchema, list: listPrinters, create: insertPrinter });
