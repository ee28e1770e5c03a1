import Link from "next/link";
import { connection } from "next/server";
import { getDb } from "@/db/client";
import { listSecurityEvents } from "@/db/auth/reads";
import { PageHeader } from "@/components/ui/page-header";
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

const inputCls = "mt-1 block w-full rounded-md border border-soot-200 bg-white px-2.5 py-2 text-sm";

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
          <Link href="/setup" className="text-sm font-semibold text-clay-700 hover:underline">
            ← Set-up
          </Link>
        }
      />
      <div className="space-y-4 px-4 py-6 sm:px-8">
        <form method="get" className="grid gap-3 rounded-card border border-soot-200 bg-white p-4 sm:grid-cols-2 lg:grid-cols-5" aria-label="Filter the log">
          <label className="text-sm font-medium text-soot-700">
            Event
            <select name="kind" defaultValue={f.kind ?? ""} className={inputCls}>
              <option value="">Any</option>
              {Object.entries(SECURITY_EVENT_LABELS).map(([k, label]) => (
                <option key={k} value={k}>
                  {label}
                </option>
              ))}
            </select>
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
          <div className="flex items-end gap-2">
            <button type="submit" className="rounded-md bg-clay-600 px-3.5 py-2 text-sm font-semibold text-white hover:bg-clay-700">
              Filter
            </button>
            <Link href="/setup/security" className="rounded-md border border-soot-200 px-3.5 py-2 text-sm font-semibold text-soot-700 hover:bg-soot-50">
              Clear
            </Link>
          </div>
        </form>
        <p className="text-sm text-soot-500" role="status">
          {events.length === LIMIT ? `The newest ${LIMIT} events; narrow the filter to see older ones.` : `${events.length} event${events.length === 1 ? "" : "s"}.`}
        </p>
        <ol className="divide-y divide-soot-100 rounded-card border border-soot-200 bg-white" data-testid="security-events">
          {events.map((e) => (
            <li key={e.id} className="grid gap-1 px-4 py-3 text-sm md:grid-cols-[11rem_12rem_1fr]" data-kind={e.kind}>
              <time className="tabular text-xs text-soot-500" dateTime={new Date(e.created_at).toISOString()}>
                {new Date(e.created_at).toISOString().replace("T", " ").slice(0, 19)}
              </time>
              <div className="font-semibold text-soot-900">{SECURITY_EVENT_LABELS[e.kind] ?? e.kind}</div>
              <div className="min-w-0 text-soot-700 [overflow-wrap:anywhere]">
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
              </div>
            </li>
          ))}
        </ol>
      </div>
    </>
  );
}
