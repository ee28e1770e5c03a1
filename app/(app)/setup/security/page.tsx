import Link from "next/link";
import { connection } from "next/server";
import { getDb } from "@/db/client";
import { listSecurityEvents } from "@/db/auth/reads";
import { PageHeader } from "@/components/ui/page-header";
import { EventLogList, EventLogRow, FilterSelect, LogFilterForm, PersonAndDaysFields, activeFilters } from "@/components/ui/event-log";
import { SECURITY_EVENT_LABELS, securityEventFilterSchema } from "@/lib/auth/security-events";
import { requirePageUser } from "@/app/_server/session";

export const metadata = { title: "Security log" };

const LIMIT = 200;

function detail(data: unknown): string {
  if (!data || typeof data !== "object") return "";
  return Object.entries(data as Record<string, unknown>)
    .filter(([, v]) => v !== null && v !== undefined && typeof v !== "object")
    .map(([k, v]) => `${k.replace(/_/g, " ")}: ${String(v)}`)
    .join(" · ");
}

export default async function SecurityLogPage({ searchParams }: { searchParams: Promise<Record<string, string | string[] | undefined>> }) {
  await requirePageUser("users:admin");
  await connection();
  const raw = await searchParams;
  const f = securityEventFilterSchema.parse(Object.fromEntries(Object.entries(raw).map(([k, v]) => [k, Array.isArray(v) ? v[0] : v])));
  const events = await listSecurityEvents(getDb(), {
    kind: f.kind,
    user: f.user || undefined,
    from: f.from ? new Date(`${f.from}T00:00:00Z`) : undefined,
    to: f.to ? new Date(Date.parse(`${f.to}T00:00:00Z`) + 86_400_000) : undefined,
    limit: LIMIT,
  });
  return (
    <>
      <PageHeader
        title="Security log"
        lead="Sign-ins and their failures, sign-outs, ended sessions, role changes, password resets and exports, newest first. Times in UTC."
        actions={
          <Link href="/setup" className="inline-flex min-h-11 items-center text-sm font-semibold text-clay-700 hover:underline">
            ← Set-up
          </Link>
        }
      />
      <div className="space-y-4 px-4 py-6 sm:px-8">
        <LogFilterForm
          label="Filter the log"
          clearHref="/setup/security"
          className="sm:grid-cols-2 lg:grid-cols-5"
          active={activeFilters([["Event", f.kind ? (SECURITY_EVENT_LABELS[f.kind] ?? f.kind) : null], ["Person", f.user], ["From", f.from], ["To", f.to]])}
        >
          <FilterSelect name="kind" label="Event" value={f.kind} options={SECURITY_EVENT_LABELS} />
          <PersonAndDaysFields user={f.user} from={f.from} to={f.to} />
        </LogFilterForm>
        <p className="text-sm text-soot-500" role="status">
          {events.length === LIMIT ? `The newest ${LIMIT} events; narrow the filter to see older ones.` : `${events.length} event${events.length === 1 ? "" : "s"}.`}
        </p>
        <EventLogList testId="security-events">
          {events.map((e) => (
            <EventLogRow key={e.id} at={e.created_at} heading={SECURITY_EVENT_LABELS[e.kind] ?? e.kind} headingWidth="12rem" data={{ "data-kind": e.kind }}>
              {e.subject_name ? (
                <span>
                  {e.subject_name} <span className="font-mono text-xs text-soot-500">{e.subject_email}</span>
                </span>
              ) : (
                <span className="text-soot-500">no account</span>
              )}
              {e.actor_name && e.actor_name !== e.subject_name ? <span className="text-soot-500"> · by {e.actor_name}</span> : null}
              {e.reason ? <span className="text-soot-500"> · {e.reason.replace(/_/g, " ")}</span> : null}
              {detail(e.data) ? <div className="text-xs text-soot-500">{detail(e.data)}</div> : null}
            </EventLogRow>
          ))}
        </EventLogList>
      </div>
    </>
  );
}
