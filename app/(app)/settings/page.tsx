import { PageHeader } from "@/components/ui/page-header";
import { SettingsForms } from "@/components/auth/settings-forms";
import { ROLE_LABELS } from "@/lib/auth/permissions";
import { MAIL_KINDS, MAIL_KIND_LABELS, PASSWORD_MIN } from "@/lib/auth/schemas";
import { requirePageUser } from "@/app/_server/session";
import { getDb } from "@/db/client";
import { listOpenSessions } from "@/db/auth/reads";

export const metadata = { title: "My settings" };

export default async function SettingsPage() {
  const user = await requirePageUser("self:write");
  const sessions = (await listOpenSessions(getDb(), user.id)).map((s) => ({
    id: s.id,
    created_at: new Date(s.created_at).toISOString(),
    last_seen_at: new Date(s.last_seen_at).toISOString(),
    ip: s.ip,
    user_agent: s.user_agent,
    current: s.id === user.session_id,
  }));
  return (
    <>
      <PageHeader title="My settings" lead={`${user.email} · ${ROLE_LABELS[user.role]}. Your role is set by an admin.`} />
      <div className="px-4 md:px-8 py-6">
        <SettingsForms
          user={{ name: user.name, unit_pref: user.unit_pref, muted_mail: user.muted_mail }}
          sessions={sessions}
          mailKinds={MAIL_KINDS.map((k) => ({ kind: k, label: MAIL_KIND_LABELS[k] }))}
          passwordMin={PASSWORD_MIN}
        />
      </div>
    </>
  );
}
