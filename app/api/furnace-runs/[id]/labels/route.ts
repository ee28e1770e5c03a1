import { getDb } from "@/db/client";
import { pathId } from "@/db/batches/reads";
import { findRunCode } from "@/db/furnace-runs/reads";
import { listUnitLabels } from "@/db/units/reads";
import { requireUser } from "@/app/_server/session";
import { toErrorResponse } from "@/app/_server/errors";
import { pdfFontBytes, pdfResponse, printedPageUrl } from "@/app/_server/pdf-documents";
import { paperQuerySchema } from "@/lib/pdf/paper";
import { readParams, searchParams } from "@/app/api/builds/_helpers";
import { AppError } from "@/lib/errors";
import { unitLabelsPdf } from "@/lib/pdf/unit-labels";
import { pageFor } from "@/lib/scan/codes";

// GET /api/furnace-runs/[id]/labels?paper=a4|letter – a sheet of unit labels with QR codes, one per unit on the run (every role)
export async function GET(req: Request, ctx: { params: Promise<{ id: string }> }) {
  try {
    await requireUser("shop:read");
    const id = pathId((await readParams(ctx.params)).id, "furnace run").toLowerCase();
    const { paper } = paperQuerySchema.parse(searchParams(req));
    const db = getDb();
    const code = await findRunCode(db, id);
    if (!code) throw new AppError("not_found", "That furnace run does not exist.");
    const units = await listUnitLabels(db, { furnace_run_id: id });
    const pdf = await unitLabelsPdf(
      { title: `Unit labels, furnace run ${code}`, paper, printed_at: new Date(), labels: units.map((u) => ({ ...u, url: printedPageUrl(req, pageFor("unit", u.id)) })) },
      await pdfFontBytes(),
    );
    return pdfResponse(pdf, "unit-labels", code, paper);
  } catch (err) {
    return toErrorResponse(err);
  }
}
