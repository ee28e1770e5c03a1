import { updateWashStation } from "@/db/queries/equipment";
import { versionedPatchHandler } from "@/lib/http/resource";
import { updateWashStationSchema } from "@/lib/setup/schemas";

// PATCH /api/wash-stations/[id] – change a wash station (admin)
export const PATCH = versionedPatchHandler({ one: "wash_station", write: "setup:write", schema: updateWashStationSchema, update: updateWashStation });
