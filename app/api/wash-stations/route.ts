import { insertWashStation } from "@/db/equipment/commands";
import { listWashStations } from "@/db/equipment/reads";
import { collectionHandlers } from "@/app/_server/resource";
import { washStationSchema } from "@/lib/setup/schemas";

// GET /api/wash-stations – wash stations (every role)
// POST /api/wash-stations – add a wash station (admin)
export const { GET, POST } = collectionHandlers({ many: "wash_stations", one: "wash_station", read: "shop:read", write: "setup:write", schema: washStationSchema, list: listWashStations, create: insertWashStation });
