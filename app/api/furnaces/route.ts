import { insertFurnace, listFurnaces } from "@/db/queries/equipment";
import { collectionHandlers } from "@/lib/http/resource";
import { furnaceSchema } from "@/lib/setup/schemas";

// GET /api/furnaces – furnaces with the sinter profiles each runs (every role)
// POST /api/furnaces – add a furnace (admin)
export const { GET, POST } = collectionHandlers({ many: "furnaces", one: "furnace", read: "shop:read", write: "setup:write", schema: furnaceSchema, list: listFurnaces, create: insertFurnace });
