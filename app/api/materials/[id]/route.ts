import { updateMaterial } from "@/db/queries/materials";
import { versionedPatchHandler } from "@/lib/http/resource";
import { updateMaterialSchema } from "@/lib/setup/schemas";

// PATCH /api/materials/[id] – change a material; builds already printed keep their factors (admin)
export const PATCH = versionedPatchHandler({ one: "material", write: "setup:write", schema: updateMaterialSchema, update: updateMaterial });
