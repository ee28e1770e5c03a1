"use client";

import { useState } from "react";
import { useRouter } from "next/navigation";
import { FormError } from "@/components/ui/form-error";

export type SetPasswordFormProps = { token: string; email: string; passwordMin: number };

export function SetPasswordForm({ token, email, passwordMin }: SetPasswordFormProps) {
  const [error, setError] = useState<string | null>(null);
  const [fieldErrors, setFieldErrors] = useState<Record<string, string[]>>({});
  const [busy, setBusy] = useState(false);
  const router = useRouter();

  async function onSubmit(e: React.FormEvent<HTMLFormElement>) {
    e.preventDefault();
    setBusy(true);
    setError(null);
    setFieldErrors({});
    const f = new FormData(e.currentTarget);
    try {
      const res = await fetch("/api/session/password", {
        method: "POST",
        headers: { "content-type": "application/json" },
        body: JSON.stringify({ token, password: f.get("password"), confirm: f.get("confirm") }),
      });
      const body = await res.json().catch(() => null);
      if (!res.ok) {
        setError(body?.error?.message ?? "Could not set the password.");
        setFieldErrors(body?.error?.fieldErrors ?? {});
        setBusy(false);
        return;
      }
      router.push(`/sign-in?password=set&email=${encodeURIComponent(email)}`);
    } catch {
      setError("The server did not answer; try again.");
      setBusy(false);
    }
  }

  const input = "mt-1 block w-full rounded-md border border-soot-200 px-3 py-2 text-base focus:border-clay-500 focus:outline-none";
  return (
    <form onSubmit={onSubmit} className="mt-5 space-y-4" noValidate>
      <input type="hidden" name="username" autoComplete="username" value={email} readOnly />
      <label className="block text-sm font-medium text-soot-700">
        New password
        <input name="password" type="password" autoComplete="new-password" minLength={passwordMin} required className={input} aria-invalid={!!fieldErrors.password} />
        <span className="mt-1 block text-xs text-soot-500">At least {passwordMin} characters; a few unrelated words work well.</span>
        {fieldErrors.password ? <span className="mt-1 block text-xs text-oxide-700">{fieldErrors.password[0]}</span> : null}
      </label>
      <label className="block text-sm font-medium text-soot-700">
        The same again
        <input name="confirm" type="password" autoComplete="new-password" required className={input} aria-invalid={!!fieldErrors.confirm} />
        {fieldErrors.confirm ? <span className="mt-1 block text-xs text-oxide-700">{fieldErrors.confirm[0]}</span> : null}
      </label>
      {error && !fieldErrors.password && !fieldErrors.confirm ? (
        <FormError>{error}</FormError>
      ) : null}
      <button type="submit" disabled={busy} className="w-full rounded-md bg-clay-600 px-4 py-2.5 text-sm font-semibold text-white hover:bg-clay-700 disabled:opacity-60">
        {busy ? "Saving…" : "Save password"}
      </button>
    </form>
  );
}
