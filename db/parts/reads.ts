import { sql } from "kysely";
import type { Database } from "@/db/client";
import { AppError } from "@/lib/errors";
import { type ListParts } from "@/lib/parts/schemas";
import { scaleUp, fitsBuildVolume } from "@/lib/process/scale-up";
import { greenMasses } from "@/lib/geometry/mesh";
import { getShopPlanning, listPrinterSpecs } from "@/db/floor/reads";

const n = (v: unknown) => (v === null || v === undefined ? null : Number(v));
const escapeLike = (s: string) => `%${s.replace(/[\\%_]/g, (c) => `\\${c}`)}%`;

export async function listMaterialOptions(db: Database) {
  const rows = await db
    .selectFrom("materials")
    .select(["id", "code", "name", "shrink_xy", "shrink_z", "green_density_g_cm3", "sintered_density_g_cm3", "min_mass_loss", "active"])
    .orderBy("code")
    .execute();
  return rows.map((r) => ({
    id: r.id, code: r.code, name: r.name, active: r.active,
    shrink_xy: Number(r.shrink_xy), shrink_z: Number(r.shrink_z),
    green_density_g_cm3: Number(r.green_density_g_cm3), sintered_density_g_cm3: Number(r.sintered_density_g_cm3), min_mass_loss: Number(r.min_mass_loss),
  }));
}
export type MaterialOption = Awaited<ReturnType<typeof listMaterialOptions>>[number];

type Stock = { stock_x_neg_mm: number; stock_x_pos_mm: number; stock_y_neg_mm: number; stock_y_pos_mm: number; stock_z_neg_mm: number; stock_z_pos_mm: number };

/** Green size and factors stored on the part, from the material's shrinkage. */
export function scaleFields(p: Stock & { nominal_x_mm: number; nominal_y_mm: number; nominal_z_mm: number }, m: { shrink_xy: number; shrink_z: number }) {
  const s = scaleUp({
    nominal: { x: p.nominal_x_mm, y: p.nominal_y_mm, z: p.nominal_z_mm },
    stock: { x_neg: p.stock_x_neg_mm, x_pos: p.stock_x_pos_mm, y_neg: p.stock_y_neg_mm, y_pos: p.stock_y_pos_mm, z_neg: p.stock_z_neg_mm, z_pos: p.stock_z_pos_mm },
    shrink: { xy: m.shrink_xy, z: m.shrink_z },
  });
  const round = (x: number) => Math.round(x * 1000) / 1000;
  return {
    green_x_mm: round(s.x.green),
    green_y_mm: round(s.y.green),
    green_z_mm: round(s.z.green),
    scale_factors: JSON.stringify({ xy: s.x.factor, z: s.z.factor, shrink_xy: m.shrink_xy, shrink_z: m.shrink_z }),
    scaled_at: new Date(),
  };
}

const SORTS = {
  part_number: "p.part_number",
  name: "p.name",
  order_code: "o.code",
  material_code: "m.code",
  quantity: "p.quantity",
  due_at: "o.due_at",
  created_at: "p.created_at",
} as const;

export async function listParts(db: Database, q: ListParts) {
  let query = db
    .selectFrom("parts as p")
    .innerJoin("orders as o", "o.id", "p.order_id")
    .innerJoin("materials as m", "m.id", "p.material_id")
    .leftJoin("files as f", "f.id", "p.geometry_file_id")
    .select([
      "p.id", "p.part_number", "p.revision", "p.name", "p.quantity", "p.version", "p.material_id", "m.code as material_code",
      "p.order_id", "o.code as order_code", "o.due_at", "o.priority",
      "p.nominal_x_mm", "p.nominal_y_mm", "p.nominal_z_mm", "p.green_x_mm", "p.green_y_mm", "p.green_z_mm", "p.thickest_wall_mm", "p.volume_mm3",
      "p.target_ra_um", "p.tolerance_um", "p.tolerance_grade", "f.status as geometry_status", "f.filename as geometry_filename",
      sql<number>`(select count(*) from units u where u.part_id = p.id and u.state <> 'scrapped')`.as("unit_count"),
      sql<number>`count(*) over ()`.as("total_count"),
    ]);
  if (q.order_id) query = query.where("p.order_id", "=", q.order_id);
  if (q.material_id) query = query.where("p.material_id", "=", q.material_id);
  if (q.search) {
    const like = escapeLike(q.search);
    query = query.where((eb) => eb.or([eb("p.part_number", "ilike", like), eb("p.name", "ilike", like), eb("o.code", "ilike", like), eb("o.customer", "ilike", like)]));
  }
  const rows = await query.orderBy(sql.ref(SORTS[q.sort]), q.dir).orderBy("p.part_number").limit(q.page_size).offset((q.page - 1) * q.page_size).execute();
  let total = rows.length ? Number(rows[0].total_count) : 0;
  if (!rows.length && q.page > 1) total = (await listParts(db, { ...q, page: 1 })).total;
  return {
    total,
    rows: rows.map(({ total_count: _t, ...r }) => ({
      ...r,
      due_at: new Date(r.due_at).toISOString(),
      nominal_x_mm: Number(r.nominal_x_mm), nominal_y_mm: Number(r.nominal_y_mm), nominal_z_mm: Number(r.nominal_z_mm),
      green_x_mm: n(r.green_x_mm), green_y_mm: n(r.green_y_mm), green_z_mm: n(r.green_z_mm),
      thickest_wall_mm: Number(r.thickest_wall_mm), volume_mm3: n(r.volume_mm3),
      target_ra_um: n(r.target_ra_um), tolerance_um: n(r.tolerance_um), unit_count: Number(r.unit_count),
    })),
  };
}

export async function getPartOrThrow(db: Database, id: string) {
  const row = await db.selectFrom("parts").selectAll().where("id", "=", id).executeTakeFirst();
  if (!row) throw new AppError("not_found", "That part does not exist.");
  return row;
}

/** Everything the part's panel shows: the part, its material's factors, the scale-up, masses and each printer's fit. */
export async function getPartDetail(db: Database, id: string) {
  const part = await db
    .selectFrom("parts as p")
    .innerJoin("orders as o", "o.id", "p.order_id")
    .innerJoin("materials as m", "m.id", "p.material_id")
    .leftJoin("files as f", "f.id", "p.geometry_file_id")
    .selectAll("p")
    .select([
      "o.code as order_code", "o.customer", "o.due_at", "m.code as material_code", "m.name as material_name", "m.shrink_xy", "m.shrink_z",
      "m.green_density_g_cm3", "m.sintered_density_g_cm3", "m.min_mass_loss",
      "f.id as file_id", "f.filename as file_name", "f.status as file_status", "f.analysis as file_analysis", "f.error as file_error", "f.size_bytes as file_size", "f.updated_at as file_updated_at",
    ])
    .where("p.id", "=", id)
    .executeTakeFirst();
  if (!part) throw new AppError("not_found", "That part does not exist.");
  const num = (k: keyof typeof part) => Number(part[k]);
  const stock = {
    x_neg: num("stock_x_neg_mm"), x_pos: num("stock_x_pos_mm"), y_neg: num("stock_y_neg_mm"),
    y_pos: num("stock_y_pos_mm"), z_neg: num("stock_z_neg_mm"), z_pos: num("stock_z_pos_mm"),
  };
  const nominal = { x: num("nominal_x_mm"), y: num("nominal_y_mm"), z: num("nominal_z_mm") };
  const shrink = { xy: num("shrink_xy"), z: num("shrink_z") };
  const scale = scaleUp({ nominal, stock, shrink });
  const green = { x: scale.x.green, y: scale.y.green, z: scale.z.green };
  const [printers, shop, units] = await Promise.all([
    listPrinterSpecs(db, { activeOnly: true }),
    getShopPlanning(db),
    db.selectFrom("units").select(["id", "serial", "state", "build_id"]).where("part_id", "=", id).orderBy("serial").execute(),
  ]);
  const finishedVolume = n(part.volume_mm3);
  const grow = (scale.x.factor * scale.y.factor * scale.z.factor) * ((scale.x.withStock * scale.y.withStock * scale.z.withStock) / (nominal.x * nominal.y * nominal.z));
  const greenVolume = finishedVolume ? finishedVolume * grow : null;
  let masses = null;
  let massError: string | null = null;
  if (greenVolume) {
    try {
      masses = greenMasses(greenVolume, {
        greenDensity: num("green_density_g_cm3"),
        sinteredDensity: num("sintered_density_g_cm3"),
        washLossFraction: num("min_mass_loss"),
        shrinkXY: shrink.xy,
        shrinkZ: shrink.z,
      });
    } catch (err) {
      massError = err instanceof Error ? err.message : String(err);
    }
  }
  const fits = printers.map((p) => {
    const compatible = p.material_ids.includes(part.material_id);
    const fit = fitsBuildVolume(green, { x: p.build_x_mm, y: p.build_y_mm, z: p.build_z_mm }, shop.plate_clearance_mm);
    return {
      printer_id: p.id, printer_name: p.name, compatible,
      build_volume: { x: p.build_x_mm, y: p.build_y_mm, z: p.build_z_mm },
      fits: fit.fits, rotated: fit.rotated,
      failing: fit.failing.map((a) => ({ axis: a.axis, over_mm: a.overMm })),
    };
  });
  return {
    part: {
      id: part.id, order_id: part.order_id, order_code: part.order_code, customer: part.customer, due_at: new Date(part.due_at).toISOString(),
      part_number: part.part_number, revision: part.revision, name: part.name, material_id: part.material_id, material_code: part.material_code,
      material_name: part.material_name, quantity: part.quantity, version: part.version,
      nominal_x_mm: nominal.x, nominal_y_mm: nominal.y, nominal_z_mm: nominal.z, thickest_wall_mm: num("thickest_wall_mm"),
      stock_x_neg_mm: stock.x_neg, stock_x_pos_mm: stock.x_pos, stock_y_neg_mm: stock.y_neg, stock_y_pos_mm: stock.y_pos, stock_z_neg_mm: stock.z_neg, stock_z_pos_mm: stock.z_pos,
      finishing_notes: part.finishing_notes, target_ra_um: n(part.target_ra_um), tolerance_um: n(part.tolerance_um), tolerance_grade: part.tolerance_grade,
      volume_mm3: finishedVolume,
    },
    scale: {
      shrink_xy: shrink.xy, shrink_z: shrink.z,
      axes: (["x", "y", "z"] as const).map((axis) => ({ axis, nominal_mm: scale[axis].nominal, with_stock_mm: scale[axis].withStock, factor: scale[axis].factor, green_mm: scale[axis].green })),
      green_volume_mm3: greenVolume,
      masses: masses && { green_g: masses.greenG, brown_g: masses.brownG, sintered_g: masses.sinteredG, removed_binder_g: masses.removedBinderG },
      mass_error: massError,
      wash_loss_fraction: num("min_mass_loss"),
    },
    fits,
    clearance_mm: shop.plate_clearance_mm,
    geometry: part.file_id
      ? { id: part.file_id, filename: part.file_name, status: part.file_status, analysis: part.file_analysis, error: part.file_error, size_bytes: Number(part.file_size), updated_at: part.file_updated_at }
      : null,
    units,
  };
}
export type PartDetail = Awaited<ReturnType<typeof getPartDetail>>;
