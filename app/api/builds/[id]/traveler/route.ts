import { getDb } from "@/db/client";
import { getBuildDetail } from "@/db/builds/reads";
import { requireUser } from "@/app/_server/session";
import { toErrorResponse } from "@/app/_server/errors";
import { printedPageUrl } from "@/app/_server/pdf-documents";
import { pageFor } from "@/lib/scan/codes";
import { travelerPdf } from "@/lib/builds/traveler";
import type { PlateLayout } from "@/lib/builds/plate";
import { readId, type IdContext } from "../../_helpers";

// GET /api/builds/[id]/traveler – the printable traveler PDF with a QR code to the build page (every role)
export async function GET(req: Request, ctx: IdContext) {
  try {
    await requireUser("shop:read");
    const id = await readId(ctx, "Build");
    const d = await getBuildDetail(getDb(), id);
    const pdf = await travelerPdf({
      shop_name: d.shop_name,
      url: printedPageUrl(req, pageFor("build", id)),
      build: {
        code: d.build.code,
        state: d.build.state,
        material_code: d.build.material_code,
        material_name: d.build.material_name,
        material_lot: d.build.material_lot,
        printer_name: d.build.printer_name,
        starts_at: d.build.starts_at,
        ends_at: d.build.ends_at,
        est_minutes: d.build.est_minutes,
        notes: d.build.notes,
      },
      units: d.units.map((u) => ({
        serial: u.serial, part_number: u.part_number, revision: u.revision, part_name: u.part_name, order_code: u.order_code, due_at: new Date(u.due_at),
        green: u.green_x_mm && u.green_y_mm && u.green_z_mm ? [u.green_x_mm, u.green_y_mm, u.green_z_mm] : null,
      })),
      layout: d.layout as PlateLayout | null,
      time_zone: d.time_zone,
      printed_at: new Date(),
    });
    return new Response(Buffer.from(pdf), {
      headers: { "content-type": "application/pdf", "content-disposition": `inline; filename="traveler-${d.build.code}.pdf"`, "cache-control": "no-store" },
    });
  } catch (err) {
    return toErrorResponse(err);
  }
}
