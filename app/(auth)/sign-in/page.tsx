import Link from "next/link";
import { connection } from "next/server";
import { DEMO_USERS, DEMO_PASSWORD } from "@/db/seed-users";
import { showDemoSignIns } from "@/lib/auth/demo";
import { ROLE_LABELS } from "@/lib/auth/permissions";
import { safeNextPath } from "@/lib/http/safe-next";
import { SignInForm } from "./sign-in-form";

export const metadata = { title: "Sign in" };

export default async function SignInPage({ searchParams }: { searchParams: Promise<{ next?: string; password?: string; email?: string }> }) {
  await connection();
  const { next, password, email } = await searchParams;
  const showDemo = showDemoSignIns();
  return (
    <>
      <h1 className="font-display text-xl font-semibold">Sign in</h1>
      <p className="mt-1 text-sm text-soot-500">Plan the print floor, the wash and the furnaces.</p>
      {password === "set" ? (
        <p role="status" className="mt-4 rounded-md bg-verdigris-100 px-3 py-2 text-sm text-verdigris-700">
          Your password is set. Sign in with it now.
        </p>
      ) : null}
      <SignInForm next={safeNextPath(next)} email={typeof email === "string" ? email.slice(0, 254) : ""} />
      <Link href="/forgot-password" className="tap-target mt-4 inline-flex items-center text-sm font-semibold text-clay-700 hover:underline">
        Forgot your password?
      </Link>
      {showDemo ? (
        <div className="mt-6 border-t border-soot-100 pt-4 text-xs text-soot-500" data-testid="demo-sign-ins">
          <div className="mb-1.5 font-semibold text-soot-700">Demo shop sign-ins (password “{DEMO_PASSWORD}”)</div>
          <ul className="space-y-0.5 font-mono">
            {DEMO_USERS.map((u) => (
              <li key={u.email}>
                {u.email} <span className="font-sans text-soot-500">· {ROLE_LABELS[u.role]}</span>
              </li>
            ))}
          </ul>
        </div>
      ) : null}
    </>
  );
}
