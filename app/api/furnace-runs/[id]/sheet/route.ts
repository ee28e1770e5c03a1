import { getDb } from "@/db/client";
import { pathId } from "@/db/batches/reads";
import { loadRunSheet } from "@/db/furnace-runs/reads";
import { requireUser } from "@/app/_server/session";
import { toErrorResponse } from "@/app/_server/errors";
import { pdfFontBytes, pdfResponse, printedPageUrl } from "@/app/_server/pdf-documents";
import { paperQuerySchema } from "@/lib/pdf/paper";
import { readParams, searchParams } from "@/app/api/builds/_helpers";
import { runSheetPdf } from "@/lib/pdf/run-sheet";
import { pageFor } from "@/lib/scan/codes";

// GET /api/furnace-runs/[id]/sheet?paper=a4|letter – the furnace-run sheet PDF: profile, trays and units, load, cautions, sign-off (every role)
export async function GET(req: Request, ctx: { params: Promise<{ id: string }> }) {
  try {
    await requireUser("shop:read");
    const id = pathId((await readParams(ctx.params)).id, "furnace run").toLowerCase();
    const { paper } = paperQuerySchema.parse(searchParams(req));
    const { shop_name, detail, notes, operator, units } = await loadRunSheet(getDb(), id);
    const extra = new Map(units.map((u) => [u.id, u]));
    const { run, furnace, profile } = detail;
    const pdf = await runSheetPdf(
      {
        shop_name,
        url: printedPageUrl(req, pageFor("furnace_run", id)),
        time_zone: detail.time_zone,
        printed_at: new Date(),
        paper,
        run: { code: run.code, state: run.state, notes, starts_at: run.starts_at ? new Date(run.starts_at) : null, ends_at: run.ends_at ? new Date(run.ends_at) : null, operator },
        furnace: { name: furnace.name, max_load_g: furnace.max_load_g, tray_count: furnace.tray_count, tray_x_mm: furnace.tray_x_mm, tray_y_mm: furnace.tray_y_mm },
        profile: {
          label: profile.label, name: profile.name, atmosphere: profile.atmosphere,
          peak_c: Math.max(profile.start_temp_c, ...profile.segments.map((s) => s.setpoint_c)),
          cycle_minutes: run.cycle_minutes ?? detail.cycle.total_minutes,
        },
        layout: run.tray_layout,
        units: run.units.map((u) => {
          const e = extra.get(u.id);
          return {
            id: u.id, serial: u.serial, part_number: u.part_number, revision: e?.revision ?? "", part_name: u.part_name, order_code: u.order_code,
            customer: e?.customer ?? "", material_code: u.material_code, material_name: e?.material_name ?? "", green_mass_g: e?.green_mass_g ?? null, mass_g: u.mass_g,
          };
        }),
      },
      await pdfFontBytes(),
    );
    return pdfResponse(pdf, "furnace-run", run.code, paper);
  } catch (err) {
    return toErrorResponse(err);
  }
}
