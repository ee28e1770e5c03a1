import { insertMaterial } from "@/db/materials/commands";
import { listMaterials } from "@/db/materials/reads";
import { collectionHandlers } from "@/app/_server/resource";
import { materialSchema } from "@/lib/setup/schemas";

// GET /api/materials – materials with their shrinkage, densities and wash constants (every role)
// POST /api/materials – add a material (admin)
export const { GET, POST } = collectionHandlers({ many: "materials", one: "material", read: "shop:read", write: "setup:write", schema: materialSchema, list: listMaterials, create: insertMaterial });
