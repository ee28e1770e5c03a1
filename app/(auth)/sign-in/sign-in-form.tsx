"use client";

import { useState } from "react";
import { safeNextPath } from "@/lib/http/safe-next";

export type SignInFormProps = { next: string; email?: string };

export function SignInForm({ next, email = "" }: SignInFormProps) {
  const [error, setError] = useState<string | null>(null);
  const [fieldErrors, setFieldErrors] = useState<Record<string, string[]>>({});
  const [busy, setBusy] = useState(false);

  async function onSubmit(e: React.FormEvent<HTMLFormElement>) {
    e.preventDefault();
    setBusy(true);
    setError(null);
    setFieldErrors({});
    const form = new FormData(e.currentTarget);
    try {
      const res = await fetch("/api/session", {
        method: "POST",
        headers: { "content-type": "application/json" },
        body: JSON.stringify({ email: form.get("email"), password: form.get("password") }),
      });
      const body = await res.json();
      if (!res.ok) {
        setError(body.error?.message ?? "Could not sign in.");
        setFieldErrors(body.error?.fieldErrors ?? {});
        setBusy(false);
        return;
      }
      // The page sent a checked path already; checked again here, where it is followed.
      window.location.assign(safeNextPath(next) || safeNextPath(body.home) || "/");
    } catch {
      setError("The server did not answer; check the connection and try again.");
      setBusy(false);
    }
  }

  const input = "mt-1 block w-full rounded-md border border-soot-200 px-3 py-2 text-base focus:border-clay-500 focus:outline-none";
  return (
    <form onSubmit={onSubmit} className="mt-5 space-y-4" noValidate>
      <label className="block text-sm font-medium text-soot-700">
        E-mail
        <input name="email" type="email" autoComplete="username" defaultValue={email} required className={input} aria-invalid={!!fieldErrors.email} />
        {fieldErrors.email ? <span className="mt-1 block text-xs text-oxide-700">{fieldErrors.email[0]}</span> : null}
      </label>
      <label className="block text-sm font-medium text-soot-700">
        Password
        <input name="password" type="password" autoComplete="current-password" required className={input} aria-invalid={!!fieldErrors.password} />
        {fieldErrors.password ? <span className="mt-1 block text-xs text-oxide-700">{fieldErrors.password[0]}</span> : null}
      </label>
      {error ? (
        <p role="alert" className="rounded-md bg-oxide-100 px-3 py-2 text-sm text-oxide-700">
          {error}
        </p>
      ) : null}
      <button type="submit" disabled={busy} className="w-full rounded-md bg-clay-600 px-4 py-2.5 text-sm font-semibold text-white hover:bg-clay-700 disabled:opacity-60">
        {busy ? "Signing in…" : "Sign in"}
      </button>
    </form>
  );
}
