import type { Database } from "@/db/client";
import { AppError } from "@/lib/errors";
import { judgePrinters, type PrinterVerdict } from "@/lib/builds/estimate";
import { getShopPlanning, listPrinterSpecs, unitSpecsForBuilds } from "@/db/floor/reads";

const n = (v: unknown) => (v === null || v === undefined ? null : Number(v));

export async function findBuildById(db: Database, id: string) {
  return db.selectFrom("builds").selectAll().where("id", "=", id).executeTakeFirst();
}

export type BuildDetail = Awaited<ReturnType<typeof getBuildDetail>>;

/** The build page: the build, its units, every printer's verdict and the history. */
export async function getBuildDetail(db: Database, id: string) {
  const build = await db
    .selectFrom("builds as b")
    .innerJoin("materials as m", "m.id", "b.material_id")
    .leftJoin("printers as p", "p.id", "b.printer_id")
    .select([
      "b.id", "b.code", "b.state", "b.version", "b.printer_id", "p.name as printer_name", "b.material_id", "m.code as material_code", "m.name as material_name",
      "b.material_lot", "b.starts_at", "b.ends_at", "b.started_at", "b.finished_at", "b.est_minutes", "b.plate_layout", "b.failed", "b.failure_reason", "b.notes",
      "b.created_at", "b.updated_at",
    ])
    .where("b.id", "=", id)
    .executeTakeFirst();
  if (!build) throw new AppError("not_found", "That build does not exist.");
  const [units, printers, shop, history] = await Promise.all([
    db
      .selectFrom("units as u")
      .innerJoin("parts as p", "p.id", "u.part_id")
      .innerJoin("orders as o", "o.id", "p.order_id")
      .select(["u.id", "u.serial", "u.state", "u.version", "p.id as part_id", "p.part_number", "p.revision", "p.name as part_name", "o.code as order_code", "o.due_at", "p.green_x_mm", "p.green_y_mm", "p.green_z_mm"])
      .where("u.build_id", "=", id)
      .orderBy("u.serial")
      .execute(),
    listPrinterSpecs(db, { activeOnly: true }),
    getShopPlanning(db),
    db
      .selectFrom("events as e")
      .leftJoin("users as us", "us.id", "e.actor_id")
      .select(["e.id", "e.kind", "e.from_state", "e.to_state", "e.reason", "e.created_at", "us.name as actor_name"])
      .where("e.entity", "=", "build")
      .where("e.entity_id", "=", id)
      .orderBy("e.created_at", "desc")
      .limit(50)
      .execute(),
  ]);
  const specs = (await unitSpecsForBuilds(db, [id])).get(id) ?? [];
  const verdicts = judgePrinters(specs, build.material_id, printers, shop.plate_clearance_mm);
  const current = build.printer_id ? verdicts.find((v) => v.printer_id === build.printer_id) : undefined;
  const layout = build.plate_layout ?? current?.layout ?? verdicts.find((v) => v.ok)?.layout ?? null;
  return {
    build: { ...build, est_minutes: n(build.est_minutes) },
    units: units.map((u) => ({ ...u, green_x_mm: n(u.green_x_mm), green_y_mm: n(u.green_y_mm), green_z_mm: n(u.green_z_mm) })),
    verdicts: verdicts.map((v) => ({ printer_id: v.printer_id, printer_name: v.printer_name, ok: v.ok, reason: v.reason, est_minutes: v.est_minutes })),
    layout,
    layout_printer: build.plate_layout || current ? build.printer_name : (verdicts.find((v) => v.ok)?.printer_name ?? null),
    history: history.map((h) => ({ ...h, id: Number(h.id) })),
    shop_name: shop.shop_name,
    time_zone: shop.time_zone,
  };
}

/** The per-printer verdicts of many draft builds at once (the floor's unscheduled list). */
export async function verdictsForBuilds(db: Database, builds: { id: string; material_id: string }[]) {
  const [specs, printers, shop] = await Promise.all([
    unitSpecsForBuilds(db, builds.map((b) => b.id)),
    listPrinterSpecs(db, { activeOnly: true }),
    getShopPlanning(db),
  ]);
  const out = new Map<string, { unit_count: number; verdicts: PrinterVerdict[] }>();
  for (const b of builds) {
    const units = specs.get(b.id) ?? [];
    out.set(b.id, { unit_count: units.length, verdicts: judgePrinters(units, b.material_id, printers, shop.plate_clearance_mm) });
  }
  return { verdicts: out, printers, shop };
}

export async function getPlanProposal(db: Database, id: string) {
  const row = await db.selectFrom("plan_proposals").selectAll().where("id", "=", id).executeTakeFirst();
  if (!row) throw new AppError("not_found", "That plan proposal does not exist.");
  return row;
}
