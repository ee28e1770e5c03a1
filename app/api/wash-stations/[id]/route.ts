import { updateWashStation } from "@/db/equipment/commands";
import { versionedPatchHandler } from "@/app/_server/resource";
import { updateWashStationSchema } from "@/lib/setup/schemas";

// PATCH /api/wash-stations/[id] – change a wash station (admin)
export const PATCH = versionedPatchHandler({ one: "wash_station", write: "setup:write", schema: updateWashStationSchema, update: updateWashStation });
