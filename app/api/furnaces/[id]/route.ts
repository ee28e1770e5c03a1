import { updateFurnace } from "@/db/equipment/commands";
import { versionedPatchHandler } from "@/app/_server/resource";
import { updateFurnaceSchema } from "@/lib/setup/schemas";

// PATCH /api/furnaces/[id] – change a furnace (admin)
export const PATCH = versionedPatchHandler({ one: "furnace", write: "setup:write", schema: updateFurnaceSchema, update: updateFurnace });
