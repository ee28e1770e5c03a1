import { AppShell } from "@/components/shell/app-shell";
import { NAV } from "@/lib/auth/permissions";

export default async function SignedInLayout({ children }: { children: React.ReactNode }) {
  return (
    <AppShell nav={NAV} user={null}>
      {children}
    </AppShell>
  );
}
