import Link from "next/link";
import { connection } from "next/server";
import { getDb } from "@/db/client";
import { SetPasswordForm } from "@/components/auth/set-password-form";
import { inspectToken } from "@/db/auth/accounts";
import { PASSWORD_MIN } from "@/lib/auth/schemas";
import { FormError } from "@/components/ui/form-error";

export const metadata = { title: "Choose a password" };

const PROBLEMS = {
  used: "This link has been used already.",
  expired: "This link has expired.",
  unknown: "This link is not valid. Check that you copied all of it.",
  inactive: "This account is deactivated. Ask an admin.",
} as const;

export default async function SetPasswordPage({ searchParams }: { searchParams: Promise<{ token?: string }> }) {
  await connection();
  const { token = "" } = await searchParams;
  const state = await inspectToken(getDb(), token);
  if (state.state !== "valid") {
    return (
      <>
        <h1 className="font-display text-xl font-semibold">Choose a password</h1>
        <FormError className="mt-4" testId="token-problem">
          {PROBLEMS[state.state]}
        </FormError>
        <p className="mt-4 text-sm text-soot-600">
          {state.state === "inactive" ? null : (
            <>
              <Link href="/forgot-password" className="font-semibold text-clay-700 hover:underline">Ask for a new link</Link>, or ask an admin to send one.
            </>
          )}
        </p>
      </>
    );
  }
  return (
    <>
      <h1 className="font-display text-xl font-semibold">{state.kind === "invite" ? `Welcome, ${state.name}` : "Choose a new password"}</h1>
      <p className="mt-1 text-sm text-soot-500">
        For <span className="font-mono">{state.email}</span>. Choosing it signs out any other session of this account.
      </p>
      <SetPasswordForm token={token} email={state.email} passwordMin={PASSWORD_MIN} />
    </>
  );
}
