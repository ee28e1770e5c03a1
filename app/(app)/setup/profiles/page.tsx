import Link from "next/link";
import { PageHeader } from "@/components/ui/page-header";
import { ProfileEditor } from "@/components/furnace/profile-editor";
import { Cautions } from "@/components/safety/cautions";
import { can } from "@/lib/auth/permissions";
import { requirePageUser } from "@/app/_server/session";

export const metadata = { title: "Sinter profiles" };

export default async function ProfilesPage() {
  const user = await requirePageUser("shop:read");
  return (
    <>
      <PageHeader
        title="Sinter profiles"
        lead="Ramp and hold segments, the cool-down, the atmosphere, and which materials and furnaces use each profile. A revision held by a booked run never changes under it: saving makes the next revision."
        actions={
          <Link href="/setup" className="inline-flex min-h-11 items-center rounded-md border border-soot-200 bg-white px-3 py-1.5 text-sm text-soot-700 hover:bg-soot-50">
            Set-up
          </Link>
        }
      />
      <div className="space-y-4 px-4 md:px-8 py-6">
        <Cautions topic="furnace" folded />
        <ProfileEditor canEdit={can(user.role, "setup:write")} />
      </div>
    </>
  );
}
