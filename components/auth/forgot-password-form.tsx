"use client";

import { useState } from "react";

export function ForgotPasswordForm() {
  const [answer, setAnswer] = useState<{ ok: boolean; message: string } | null>(null);
  const [busy, setBusy] = useState(false);

  async function onSubmit(e: React.FormEvent<HTMLFormElement>) {
    e.preventDefault();
    setBusy(true);
    const email = new FormData(e.currentTarget).get("email");
    try {
      const res = await fetch("/api/session/reset-requests", { method: "POST", headers: { "content-type": "application/json" }, body: JSON.stringify({ email }) });
      const body = await res.json().catch(() => null);
      setAnswer({ ok: res.ok, message: res.ok ? body.message : (body?.error?.message ?? "Could not send the link.") });
    } catch {
      setAnswer({ ok: false, message: "The server did not answer; try again." });
    }
    setBusy(false);
  }

  return (
    <form onSubmit={onSubmit} className="mt-5 space-y-4" noValidate>
      <label className="block text-sm font-medium text-soot-700">
        E-mail
        <input name="email" type="email" autoComplete="username" required className="mt-1 block w-full rounded-md border border-soot-200 px-3 py-2 text-base focus:border-clay-500 focus:outline-none" />
      </label>
      {answer ? (
        <p role={answer.ok ? "status" : "alert"} className={`rounded-md px-3 py-2 text-sm ${answer.ok ? "bg-verdigris-100 text-verdigris-700" : "bg-oxide-100 text-oxide-700"}`}>
          {answer.message}
        </p>
      ) : null}
      <button type="submit" disabled={busy} className="w-full rounded-md bg-clay-600 px-4 py-2.5 text-sm font-semibold text-white hover:bg-clay-700 disabled:opacity-60">
        {busy ? "Sending…" : "Send me a link"}
      </button>
    </form>
  );
}
