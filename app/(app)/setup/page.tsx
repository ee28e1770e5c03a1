import Link from "next/link";
import { connection } from "next/server";
import { getDb } from "@/db/client";
import { listUsers } from "@/db/users/reads";
import { PageHeader } from "@/components/ui/page-header";
import { requirePageUser } from "@/app/_server/session";

export const metadata = { title: "Set-up" };

type Section = { title: string; href: string | null; lead: string };

// The set-up areas. A section whose page has not landed has href null and says so; whoever
// builds it sets its href here.
const SECTIONS: Section[] = [
  { title: "Users", href: "/setup/users", lead: "Accounts, roles, invitations, reset links, deactivation." },
  { title: "Equipment", href: "/setup/equipment", lead: "Printers, wash stations and furnaces: sizes, rates, limits and maintenance windows." },
  { title: "Materials", href: "/setup/materials", lead: "Feedstocks: shrinkage, densities, wash rate and default sinter profile." },
  { title: "Sinter profiles", href: "/setup/profiles", lead: "Ramp, hold and cool-down segments, atmosphere and compatible materials." },
  { title: "Shrinkage calibration", href: "/finishing/calibration", lead: "Realized shrinkage from inspections per material, and the suggested factors to apply." },
  { title: "Quoting rates", href: "/setup/quotes", lead: "Currency, machine and labour rates, furnace run and wash batch costs, overhead, margin and feedstock prices." },
  { title: "Shop settings", href: "/setup/settings", lead: "Shop name, time zone, staffed hours and planning margins." },
  { title: "API tokens", href: "/setup/tokens", lead: "Scoped tokens for other programs to call Hearth's API; shown once, revocable, rate-limited." },
  { title: "API reference", href: "/setup/api", lead: "The routes other programs call, their permissions, token scopes and fields; the OpenAPI 3.1 description behind it." },
  { title: "Webhooks", href: "/setup/webhooks", lead: "Signed notices to other programs when orders, builds, furnace runs, units and inspections change; delivery log." },
  { title: "Security log", href: "/setup/security", lead: "Sign-ins, failures, sign-outs, ended sessions, role changes, resets and exports." },
  { title: "Background jobs", href: "/setup/jobs", lead: "The worker's queues, failed jobs and its last sweep for bookings whose end went by." },
];

export default async function SetupPage() {
  await requirePageUser("setup:write");
  await connection();
  const users = await listUsers(getDb());
  const active = users.filter((u) => u.active && u.has_password).length;
  const invited = users.filter((u) => u.active && !u.has_password).length;
  const inactive = users.filter((u) => !u.active).length;
  const userSummary = `${active} active${invited ? ` · ${invited} invited` : ""}${inactive ? ` · ${inactive} deactivated` : ""}`;
  return (
    <>
      <PageHeader title="Set-up" lead="Users, equipment, materials, sinter profiles and shop settings: what the planner works from." />
      <div className="grid grid-cols-1 gap-4 px-4 md:px-8 py-6 sm:grid-cols-2 xl:grid-cols-3">
        {SECTIONS.map((s) =>
          s.href ? (
            <Link key={s.title} href={s.href} className="group rounded-card border border-soot-200 bg-white p-5 shadow-card hover:border-clay-300">
              <h2 className="font-display text-lg font-semibold text-soot-900 group-hover:text-clay-700">{s.title}</h2>
              <p className="mt-1 text-sm text-soot-600">{s.lead}</p>
              {s.title === "Users" ? <p className="tabular mt-3 text-xs font-semibold text-soot-500" data-testid="users-summary">{userSummary}</p> : null}
            </Link>
          ) : (
            <div key={s.title} className="rounded-card border border-dashed border-soot-200 bg-soot-50 p-5" aria-disabled="true">
              <h2 className="font-display text-lg font-semibold text-soot-500">{s.title}</h2>
              <p className="mt-1 text-sm text-soot-500">{s.lead}</p>
              <p className="mt-3 text-xs font-semibold text-brass-600">Not built yet in this version of Hearth.</p>
            </div>
          ),
        )}
      </div>
    </>
  );
}
