import { insertFurnace } from "@/db/equipment/commands";
import { listFurnaces } from "@/db/equipment/reads";
import { collectionHandlers } from "@/app/_server/resource";
import { furnaceSchema } from "@/lib/setup/schemas";

// GET /api/furnaces – furnaces with the sinter profiles each runs (every role)
// POST /api/furnaces – add a furnace (admin)
export const { GET, POST } = collectionHandlers({ many: "furnaces", one: "furnace", read: "shop:read", write: "setup:write", schema: furnaceSchema, list: listFurnaces, create: insertFurnace });
