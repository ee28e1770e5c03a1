import { AppShell } from "@/components/shell/app-shell";
import { SignOutButton } from "@/components/shell/sign-out-button";
import { ROLE_LABELS, navFor } from "@/lib/auth/permissions";
import { requirePageUser } from "@/lib/auth/session";

export default async function SignedInLayout({ children }: { children: React.ReactNode }) {
  const user = await requirePageUser();
  return (
    <AppShell
      nav={navFor(user.role)}
      user={user}
      userSlot={
        <div className="flex items-end justify-between gap-2">
          <div className="min-w-0">
            <div className="truncate font-semibold text-soot-50" data-testid="user-name">{user.name}</div>
            <div className="text-xs text-clay-300" data-testid="user-role">{ROLE_LABELS[user.role]}</div>
          </div>
          <SignOutButton />
        </div>
      }
    >
      {children}
    </AppShell>
  );
}
