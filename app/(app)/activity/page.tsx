import Link from "next/link";
import { connection } from "next/server";
import { getDb } from "@/db/client";
import { countActivity, listActivity } from "@/db/activity/reads";
import { PageHeader } from "@/components/ui/page-header";
import { requirePageUser } from "@/app/_server/session";
import { ACTIVITY_ENTITIES, activityAddress, activityFilterInput, activityFilterSchema, type ActivityFilter } from "@/lib/activity/schemas";

export const metadata = { title: "Activity" };

const LIMIT = 200;
const inputCls = "mt-1 block w-full rounded-md border border-soot-200 bg-white px-2.5 py-2 text-sm";

const words = (s: string) => s.replace(/_/g, " ");

function change(e: { kind: string; from_state: string | null; to_state: string | null }): string {
  if (e.from_state || e.to_state) return `${words(e.kind)}: ${e.from_state ? words(e.from_state) : "—"} → ${e.to_state ? words(e.to_state) : "—"}`;
  return words(e.kind);
}

export default async function ActivityPage({ searchParams }: { searchParams: Promise<Record<string, string | string[] | undefined>> }) {
  await requirePageUser("activity:read");
  await connection();
  const input = activityFilterInput(await searchParams);
  const parsed = activityFilterSchema.safeParse(input);
  // A filter that does not parse (a hand-edited address) shows what is wrong and filters nothing.
  const f: ActivityFilter = parsed.success ? parsed.data : {};
  const problem = parsed.success ? null : parsed.error.issues.map((i) => `${i.path.join(".") || "filter"}: ${i.message}`).join("; ");
  const db = getDb();
  const [events, total] = await Promise.all([listActivity(db, f, LIMIT), countActivity(db, f)]);
  const exportHref = `/api/activity/export?${new URLSearchParams(Object.entries(f).filter(([, v]) => v) as [string, string][]).toString()}`;
  return (
    <>
      <PageHeader
        title="Activity"
        lead="Every change the shop recorded: who, what, when and on which record, newest first. Times in UTC. Sign-ins and accounts are in the security log."
        actions={
          <a href={exportHref} className="rounded-md border border-soot-200 bg-white px-3.5 py-2 text-sm font-semibold text-soot-800 hover:bg-soot-50" download>
            Download CSV
          </a>
        }
      />
      <div className="space-y-4 px-4 py-6 sm:px-8">
        <form method="get" className="grid gap-3 rounded-card border border-soot-200 bg-white p-4 sm:grid-cols-2 lg:grid-cols-3 xl:grid-cols-6" aria-label="Filter the activity">
          <label className="text-sm font-medium text-soot-700">
            Record type
            <select name="entity" defaultValue={f.entity ?? ""} className={inputCls}>
              <option value="">Any</option>
              {Object.entries(ACTIVITY_ENTITIES).map(([k, label]) => (
                <option key={k} value={k}>
                  {label}
                </option>
              ))}
            </select>
          </label>
          <label className="text-sm font-medium text-soot-700">
            Change (e.g. state, schedule)
            <input name="kind" defaultValue={f.kind ?? ""} className={inputCls} maxLength={40} />
          </label>
          <label className="text-sm font-medium text-soot-700">
            Person (name or e-mail)
            <input name="user" defaultValue={f.user ?? ""} className={inputCls} maxLength={120} />
          </label>
          <label className="text-sm font-medium text-soot-700">
            From
            <input type="date" name="from" defaultValue={f.from ?? ""} className={inputCls} />
          </label>
          <label className="text-sm font-medium text-soot-700">
            To
            <input type="date" name="to" defaultValue={f.to ?? ""} className={inputCls} />
          </label>
          {f.record ? <input type="hidden" name="record" value={f.record} /> : null}
          <div className="flex items-end gap-2">
            <button type="submit" className="rounded-md bg-clay-600 px-3.5 py-2 text-sm font-semibold text-white hover:bg-clay-700">
              Filter
            </button>
            <Link href="/activity" className="rounded-md border border-soot-200 px-3.5 py-2 text-sm font-semibold text-soot-700 hover:bg-soot-50">
              Clear
            </Link>
          </div>
        </form>
        {problem ? (
          <p className="rounded-md border border-clay-300 bg-clay-50 px-3 py-2 text-sm text-clay-800" role="alert">
            The filter was not used: {problem}
          </p>
        ) : null}
        <p className="text-sm text-soot-600" role="status">
          {total > events.length ? `The newest ${events.length} of ${total} changes; narrow the filter or download the CSV for the rest.` : `${total} change${total === 1 ? "" : "s"}.`}
        </p>
        <ol className="divide-y divide-soot-100 rounded-card border border-soot-200 bg-white" data-testid="activity-events">
          {events.map((e) => {
            const from = activityAddress(e.data);
            return (
              <li key={e.id} className="grid gap-1 px-4 py-3 text-sm md:grid-cols-[11rem_10rem_1fr]" data-entity={e.entity}>
                <time className="tabular text-xs text-soot-600" dateTime={new Date(e.created_at).toISOString()}>
                  {new Date(e.created_at).toISOString().replace("T", " ").slice(0, 19)}
                </time>
                <div className="font-semibold text-soot-900">{e.actor_name ?? "the system"}</div>
                <div className="min-w-0 text-soot-700 [overflow-wrap:anywhere]">
                  <span>{change(e)}</span>
                  <span className="text-soot-600">
                    {" "}
                    · {ACTIVITY_ENTITIES[e.entity as keyof typeof ACTIVITY_ENTITIES] ?? words(e.entity)}{" "}
                    {e.entity_id ? (
                      <Link href={`/activity?record=${e.entity_id}`} className="font-mono text-xs text-clay-700 hover:underline">
                        {e.entity_id.slice(0, 8)}
                      </Link>
                    ) : null}
                  </span>
                  {e.reason ? <span className="text-soot-600"> · {e.reason}</span> : null}
                  {from ? <span className="text-soot-600"> · from {from}</span> : null}
                </div>
              </li>
            );
          })}
        </ol>
      </div>
    </>
  );
}
