import { PageHeader } from "@/components/ui/page-header";
import { SettingsForms } from "@/components/auth/settings-forms";
import { ROLE_LABELS } from "@/lib/auth/permissions";
import { MAIL_KINDS, MAIL_KIND_LABELS, PASSWORD_MIN } from "@/lib/auth/schemas";
import { requirePageUser } from "@/app/_server/session";

export const metadata = { title: "My settings" };

export default async function SettingsPage() {
  const user = await requirePageUser("self:write");
  return (
    <>
      <PageHeader title="My settings" lead={`${user.email} · ${ROLE_LABELS[user.role]}. Your role is set by an admin.`} />
      <div className="px-4 md:px-8 py-6">
        <SettingsForms
          user={{ name: user.name, unit_pref: user.unit_pref, muted_mail: user.muted_mail }}
          mailKinds={MAIL_KINDS.map((k) => ({ kind: k, label: MAIL_KIND_LABELS[k] }))}
          passwordMin={PASSWORD_MIN}
        />
      </div>
    </>
  );
}
