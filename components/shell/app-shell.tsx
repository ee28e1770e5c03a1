import Link from "next/link";
import { BrandMark } from "./brand-mark";
import { MenuDrawer } from "./menu-drawer";
import { NavLinks } from "./nav-links";
import type { NavItem, Role } from "@/lib/auth/permissions";
import { ROLE_LABELS } from "@/lib/auth/permissions";

export type ShellUser = { name: string; role: Role; email: string } | null;

export type AppShellProps = { nav: NavItem[]; user: ShellUser; userSlot?: React.ReactNode; children: React.ReactNode };

export function AppShell({ nav, user, userSlot, children }: AppShellProps) {
  return (
    <div className="min-h-screen md:flex">
      <aside className="no-print hidden w-56 shrink-0 flex-col bg-soot-900 text-soot-100 md:flex">
        <Link href="/" className="flex items-center gap-2.5 px-5 pb-6 pt-5 text-clay-300 hover:text-clay-200">
          <BrandMark />
          <span className="font-display text-xl font-semibold tracking-tight text-soot-50">Hearth</span>
        </Link>
        <NavLinks items={nav.map(({ href, label, hint }) => ({ href, label, hint }))} />
        <div className="mt-auto border-t border-soot-700 px-5 py-4 text-sm" data-testid="user-slot">
          {userSlot ?? <UserSummary user={user} />}
        </div>
      </aside>
      {/* After the sidebar, which it replaces below md: the desktop finds the sidebar first. */}
      <MenuDrawer items={nav.map(({ href, label, hint }) => ({ href, label, hint }))} userSlot={userSlot ?? <UserSummary user={user} />} />
      <main className="min-w-0 flex-1">{children}</main>
    </div>
  );
}

function UserSummary({ user }: { user: ShellUser }) {
  return user ? (
    <div>
      <div className="font-semibold text-soot-50">{user.name}</div>
      <div className="text-xs text-clay-300">{ROLE_LABELS[user.role]}</div>
    </div>
  ) : (
    <div className="text-soot-300">Not signed in</div>
  );
}
