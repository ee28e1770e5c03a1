import Link from "next/link";
import { AppShell } from "@/components/shell/app-shell";
import { SignOutButton } from "@/components/shell/sign-out-button";
import { ROLE_LABELS, navFor } from "@/lib/auth/permissions";
import { requirePageUser } from "@/app/_server/session";

export default async function SignedInLayout({ children }: { children: React.ReactNode }) {
  const user = await requirePageUser();
  return (
    <AppShell
      nav={navFor(user.role)}
      user={user}
      userSlot={
        <div className="flex items-end justify-between gap-2">
          <Link href="/settings" className="tap-target group flex min-w-0 flex-col justify-center" title="My settings: name, password, units, e-mail">
            <div className="truncate font-semibold text-soot-50 group-hover:underline" data-testid="user-name">{user.name}</div>
            <div className="text-xs text-clay-300">
              <span data-testid="user-role">{ROLE_LABELS[user.role]}</span> · <span className="text-soot-300 group-hover:text-soot-100">My settings</span>
            </div>
          </Link>
          <div className="shrink-0">
            <SignOutButton />
          </div>
        </div>
      }
    >
      {children}
    </AppShell>
  );
}
