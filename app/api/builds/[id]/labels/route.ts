import { getDb } from "@/db/client";
import { findBuildById } from "@/db/builds/reads";
import { listUnitLabels } from "@/db/units/reads";
import { requireUser } from "@/app/_server/session";
import { toErrorResponse } from "@/app/_server/errors";
import { pdfFontBytes, pdfResponse, printedPageUrl } from "@/app/_server/pdf-documents";
import { paperQuerySchema } from "@/lib/pdf/paper";
import { AppError } from "@/lib/errors";
import { unitLabelsPdf } from "@/lib/pdf/unit-labels";
import { pageFor } from "@/lib/scan/codes";
import { readId, searchParams, type IdContext } from "../../_helpers";

// GET /api/builds/[id]/labels?paper=a4|letter – a sheet of unit labels with QR codes, one per unit of the build (every role)
export async function GET(req: Request, ctx: IdContext) {
  try {
    await requireUser("shop:read");
    const id = await readId(ctx, "Build");
    const { paper } = paperQuerySchema.parse(searchParams(req));
    const db = getDb();
    const build = await findBuildById(db, id);
    if (!build) throw new AppError("not_found", "That build does not exist.");
    const units = await listUnitLabels(db, { build_id: id });
    const pdf = await unitLabelsPdf(
      { title: `Unit labels, build ${build.code}`, paper, printed_at: new Date(), labels: units.map((u) => ({ ...u, url: printedPageUrl(req, pageFor("unit", u.id)) })) },
      await pdfFontBytes(),
    );
    return pdfResponse(pdf, "unit-labels", build.code, paper);
  } catch (err) {
    return toErrorResponse(err);
  }
}
