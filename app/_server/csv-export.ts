import { getDb } from "@/db/client";
import { insertUserEvent } from "@/db/auth/commands";
import { requestAddress } from "@/app/_server/session";
import { toCsv, type CsvValue } from "@/lib/csv/safe-cell";

/**
 * A CSV download: every text cell through lib/csv/safe-cell.ts, attached under `name` with the
 * day, never cached, and noted in the security log (who exported what, with which filters, from where).
 */
export async function csvDownload(opts: {
  userId: string;
  name: string;
  fields: readonly string[];
  rows: ReadonlyArray<Record<string, CsvValue>>;
  filters: Record<string, unknown>;
  total: number;
}): Promise<Response> {
  const csv = toCsv(opts.fields, opts.rows);
  await insertUserEvent(getDb(), {
    user_id: opts.userId, kind: "export", actor_id: opts.userId, reason: opts.name,
    data: { ...opts.filters, rows: opts.rows.length, total: opts.total, ip: await requestAddress() },
  });
  const headers: Record<string, string> = {
    "content-type": "text/csv; charset=utf-8",
    "content-disposition": `attachment; filename="${opts.name}-${new Date().toISOString().slice(0, 10)}.csv"`,
    "cache-control": "no-store",
  };
  // More rows matched than one file holds: say so, so that a caller can narrow the filters.
  if (opts.total > opts.rows.length) headers["x-hearth-truncated"] = `${opts.rows.length} of ${opts.total}`;
  return new Response(csv, { headers });
}
