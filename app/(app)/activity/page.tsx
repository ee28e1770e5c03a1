import Link from "next/link";
import { connection } from "next/server";
import { getDb } from "@/db/client";
import { countActivity, getActivityRetention, listActivity } from "@/db/activity/reads";
import { PageHeader } from "@/components/ui/page-header";
import { EventLogList, EventLogRow, FilterSelect, LogFilterForm, PersonAndDaysFields, activeFilters, filterInputCls } from "@/components/ui/event-log";
import { RetentionForm } from "@/components/activity/retention-form";
import { can } from "@/lib/auth/permissions";
import { requirePageUser } from "@/app/_server/session";
import { ACTIVITY_ENTITIES, RETAINED_ENTITIES, activityAddress, activityFilterInput, activityFilterSchema, retentionLabel, type ActivityFilter } from "@/lib/activity/schemas";

export const metadata = { title: "Activity" };

const LIMIT = 200;

const words = (s: string) => s.replace(/_/g, " ");

function change(e: { kind: string; from_state: string | null; to_state: string | null }): string {
  if (e.from_state || e.to_state) return `${words(e.kind)}: ${e.from_state ? words(e.from_state) : "—"} → ${e.to_state ? words(e.to_state) : "—"}`;
  return words(e.kind);
}

export default async function ActivityPage({ searchParams }: { searchParams: Promise<Record<string, string | string[] | undefined>> }) {
  const user = await requirePageUser("activity:read");
  await connection();
  const input = activityFilterInput(await searchParams);
  const parsed = activityFilterSchema.safeParse(input);
  // A filter that does not parse (a hand-edited address) shows what is wrong and filters nothing.
  const f: ActivityFilter = parsed.success ? parsed.data : {};
  const problem = parsed.success ? null : parsed.error.issues.map((i) => `${i.path.join(".") || "filter"}: ${i.message}`).join("; ");
  const db = getDb();
  const [events, total, retention] = await Promise.all([listActivity(db, f, LIMIT), countActivity(db, f), getActivityRetention(db)]);
  const kept = RETAINED_ENTITIES.filter((e) => e !== "user").map((e) => (ACTIVITY_ENTITIES[e as keyof typeof ACTIVITY_ENTITIES] ?? e).toLowerCase());
  const exportHref = `/api/activity/export?${new URLSearchParams(Object.entries(f).filter(([, v]) => v) as [string, string][]).toString()}`;
  return (
    <>
      <PageHeader
        title="Activity"
        lead="Every change the shop recorded: who, what, when and on which record, newest first. Times in UTC. Sign-ins and accounts are in the security log."
        actions={
          <a href={exportHref} className="inline-flex min-h-11 items-center rounded-md border border-soot-200 bg-white px-3.5 py-2 text-sm font-semibold text-soot-800 hover:bg-soot-50" download>
            Download CSV
          </a>
        }
      />
      <div className="space-y-4 px-4 py-6 sm:px-8">
        <section className="flex flex-wrap items-center justify-between gap-3 rounded-card border border-soot-200 bg-white p-4" aria-label="Retention" data-testid="activity-retention">
          <p className="max-w-2xl text-sm text-soot-700">
            <span className="font-semibold text-soot-900">Retention: events are {retentionLabel(retention)}.</span>{" "}
            {retention === null
              ? "Nothing is pruned."
              : `Each day older ones are deleted, except the ${kept.join(", ")} events, which unit traces, calibration history and lot recalls still read; they are kept for ever.`}
          </p>
          {can(user.role, "setup:write") ? <RetentionForm retentionDays={retention} /> : null}
        </section>
        <LogFilterForm
          label="Filter the activity"
          clearHref="/activity"
          className="sm:grid-cols-2 lg:grid-cols-3 xl:grid-cols-6"
          active={activeFilters([
            ["Record type", f.entity ? (ACTIVITY_ENTITIES[f.entity as keyof typeof ACTIVITY_ENTITIES] ?? f.entity) : null],
            ["Change", f.kind],
            ["Person", f.user],
            ["From", f.from],
            ["To", f.to],
            ["Record", f.record ? f.record.slice(0, 8) : null],
          ])}
        >
          <FilterSelect name="entity" label="Record type" value={f.entity} options={ACTIVITY_ENTITIES} />
          <label className="text-sm font-medium text-soot-700">
            Change (e.g. state, schedule)
            <input name="kind" defaultValue={f.kind ?? ""} className={filterInputCls} maxLength={40} />
          </label>
          <PersonAndDaysFields user={f.user} from={f.from} to={f.to} />
          {f.record ? <input type="hidden" name="record" value={f.record} /> : null}
        </LogFilterForm>
        {problem ? (
          <p className="rounded-md border border-clay-300 bg-clay-50 px-3 py-2 text-sm text-clay-800" role="alert">
            The filter was not used: {problem}
          </p>
        ) : null}
        <p className="text-sm text-soot-600" role="status">
          {total > events.length ? `The newest ${events.length} of ${total} changes; narrow the filter or download the CSV for the rest.` : `${total} change${total === 1 ? "" : "s"}.`}
        </p>
        <EventLogList testId="activity-events">
          {events.map((e) => {
            const from = activityAddress(e.data);
            return (
              <EventLogRow key={e.id} at={e.created_at} heading={e.actor_name ?? "the system"} headingWidth="10rem" data={{ "data-entity": e.entity }}>
                <span>{change(e)}</span>
                <span className="text-soot-600">
                  {" "}
                  · {ACTIVITY_ENTITIES[e.entity as keyof typeof ACTIVITY_ENTITIES] ?? words(e.entity)}{" "}
                  {e.entity_id ? (
                    <Link
                      href={`/activity?record=${e.entity_id}`}
                      title="Every change to this record"
                      className="relative font-mono text-xs text-clay-700 hover:underline after:absolute after:-inset-x-1 after:-inset-y-3.5 after:content-['']"
                    >
                      {e.entity_id.slice(0, 8)}
                    </Link>
                  ) : null}
                </span>
                {e.reason ? <span className="text-soot-600"> · {e.reason}</span> : null}
                {from ? <span className="text-soot-600"> · from {from}</span> : null}
              </EventLogRow>
            );
          })}
        </EventLogList>
      </div>
    </>
  );
}
