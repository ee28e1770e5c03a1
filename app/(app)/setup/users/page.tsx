import Link from "next/link";
import { PageHeader } from "@/components/ui/page-header";
import { UsersAdmin } from "@/components/users/users-admin";
import { requirePageUser } from "@/app/_server/session";
import { changeRole, createUser, sendLink, setActive, signOutEverywhere } from "./actions";

export const metadata = { title: "Users" };

export default async function UsersPage() {
  const user = await requirePageUser("users:admin");
  return (
    <>
      <PageHeader
        title="Users"
        lead="Who may sign in, and with which role. New people get an e-mailed invitation to choose their password."
        actions={
          <Link href="/setup" className="inline-flex min-h-11 items-center text-sm font-semibold text-clay-700 hover:underline">
            ← Set-up
          </Link>
        }
      />
      <div className="px-4 md:px-8 py-6">
        <UsersAdmin currentUserId={user.id} actions={{ createUser, changeRole, setActive, sendLink, signOutEverywhere }} />
      </div>
    </>
  );
}
