"use client";

import { useRouter } from "next/navigation";
import { useState } from "react";
import { Notice } from "@/components/ui/notice";
import type { ApiTokenRow } from "@/lib/auth/api-scopes";
import { AdminRecordRow, RowButton, when } from "./admin-record";


type Scope = { name: string; label: string; hint: string };

const STATUS_TONE: Record<ApiTokenRow["status"], string> = {
  active: "bg-verdigris-100 text-verdigris-700",
  expired: "bg-brass-100 text-brass-600",
  revoked: "bg-soot-100 text-soot-600",
};

export function ApiTokensAdmin({ tokens, scopes }: { tokens: ApiTokenRow[]; scopes: Scope[] }) {
  const router = useRouter();
  const [name, setName] = useState("");
  const [picked, setPicked] = useState<string[]>(["shop:read"]);
  const [days, setDays] = useState("90");
  const [limit, setLimit] = useState("600");
  const [errors, setErrors] = useState<Record<string, string[]>>({});
  const [message, setMessage] = useState<{ ok: boolean; text: string } | null>(null);
  const [shown, setShown] = useState<{ name: string; token: string } | null>(null);
  const [busy, setBusy] = useState(false);

  async function create(e: React.FormEvent) {
    e.preventDefault();
    setBusy(true);
    setErrors({});
    setMessage(null);
    setShown(null);
    const res = await fetch("/api/api-tokens", {
      method: "POST",
      headers: { "content-type": "application/json" },
      body: JSON.stringify({ name, scopes: picked, expires_in_days: days.trim() ? days : null, rate_limit_per_minute: limit }),
    });
    const body = await res.json().catch(() => ({}));
    setBusy(false);
    if (!res.ok) {
      setErrors(body.error?.fieldErrors ?? {});
      setMessage({ ok: false, text: body.error?.message ?? "Not created." });
      return;
    }
    setShown({ name: body.token.name, token: body.token.token });
    setName("");
    router.refresh();
  }

  async function revoke(t: ApiTokenRow) {
    if (!window.confirm(`Revoke "${t.name}"? Programs using it stop working at once.`)) return;
    const res = await fetch(`/api/api-tokens/${t.id}`, { method: "DELETE" });
    const body = await res.json().catch(() => ({}));
    setMessage(res.ok ? { ok: true, text: `"${t.name}" is revoked.` } : { ok: false, text: body.error?.message ?? "Not revoked." });
    router.refresh();
  }

  const input = "mt-1 block w-full rounded-md border border-soot-200 px-2.5 py-2 text-sm";
  const err = (k: string) => (errors[k] ? <span className="block text-xs text-oxide-700">{errors[k][0]}</span> : null);

  return (
    <div className="space-y-6">
      {shown ? (
        <Notice tone="success" title={`Token "${shown.name}" created`}>
          <p>Copy it now: Hearth keeps only a hash and cannot show it again. Send it as <code>Authorization: Bearer …</code>.</p>
          <code data-testid="new-token" className="mt-2 block break-all rounded bg-white px-2 py-1.5 font-mono text-xs text-soot-900 select-all">
            {shown.token}
          </code>
        </Notice>
      ) : null}
      {message ? <Notice tone={message.ok ? "success" : "danger"}>{message.text}</Notice> : null}

      <form onSubmit={create} noValidate className="space-y-4 rounded-card bg-white p-4 shadow-card sm:p-5" aria-label="New API token">
        <h2 className="font-display text-lg font-semibold text-soot-900">New token</h2>
        <div className="grid gap-4 sm:grid-cols-3">
          <label className="text-xs font-medium text-soot-600 sm:col-span-1">
            Name
            <input className={input} value={name} onChange={(e) => setName(e.target.value)} placeholder="Ordering system" maxLength={80} required />
            {err("name")}
          </label>
          <label className="text-xs font-medium text-soot-600">
            Expires after (days; empty = never)
            <input className={`${input} tabular`} inputMode="numeric" value={days} onChange={(e) => setDays(e.target.value)} />
            {err("expires_in_days")}
          </label>
          <label className="text-xs font-medium text-soot-600">
            Requests per minute
            <input className={`${input} tabular`} inputMode="numeric" value={limit} onChange={(e) => setLimit(e.target.value)} />
            {err("rate_limit_per_minute")}
          </label>
        </div>
        <fieldset>
          <legend className="text-xs font-medium text-soot-600">Scopes</legend>
          <div className="mt-1 grid gap-2 sm:grid-cols-2">
            {scopes.map((s) => (
              <label key={s.name} className="flex min-h-11 items-start gap-2 rounded-md border border-soot-200 p-2.5 text-sm">
                <input
                  type="checkbox"
                  className="mt-0.5 h-4 w-4 shrink-0"
                  checked={picked.includes(s.name)}
                  onChange={(e) => setPicked((p) => (e.target.checked ? [...p, s.name] : p.filter((x) => x !== s.name)))}
                />
                <span>
                  <span className="font-semibold text-soot-900">{s.label}</span> <code className="text-xs text-soot-500">{s.name}</code>
                  <span className="block text-xs text-soot-600">{s.hint}</span>
                </span>
              </label>
            ))}
          </div>
          {err("scopes")}
        </fieldset>
        <button type="submit" disabled={busy} className="min-h-11 rounded-md bg-clay-700 px-4 py-2 text-sm font-semibold text-white hover:bg-clay-800 disabled:opacity-60">
          Create token
        </button>
      </form>

      <section aria-label="Tokens">
        <h2 className="font-display text-lg font-semibold text-soot-900">Tokens</h2>
        {tokens.length === 0 ? <p className="mt-2 text-sm text-soot-600">No tokens yet.</p> : null}
        <ul className="mt-2 space-y-3">
          {tokens.map((t) => (
            <AdminRecordRow
              key={t.id}
              testId="api-token"
              title={
                <>
                  <span className="font-semibold text-soot-900">{t.name}</span> <code className="text-xs text-soot-500">{t.token_hint}</code>{" "}
                  <span className={`rounded px-1.5 py-0.5 text-xs font-semibold ${STATUS_TONE[t.status]}`}>{t.status}</span>
                </>
              }
              actions={t.status === "active" ? <RowButton tone="danger" onClick={() => revoke(t)}>Revoke</RowButton> : null}
            >
              <dl className="mt-2 grid grid-cols-1 gap-x-4 gap-y-1 text-xs text-soot-600 sm:grid-cols-2 lg:grid-cols-3">
                <div><dt className="inline font-medium">Scopes: </dt><dd className="inline">{t.scopes.join(", ")}</dd></div>
                <div><dt className="inline font-medium">Created: </dt><dd className="inline">{when(t.created_at)} by {t.created_by_name}</dd></div>
                <div><dt className="inline font-medium">Expires: </dt><dd className="inline">{t.expires_at ? when(t.expires_at) : "never"}</dd></div>
                <div><dt className="inline font-medium">Last used: </dt><dd className="inline">{when(t.last_used_at)}{t.last_used_from ? ` from ${t.last_used_from}` : ""}</dd></div>
                <div><dt className="inline font-medium">Limit: </dt><dd className="inline tabular">{t.rate_limit_per_minute} requests/min</dd></div>
                {t.revoked_at ? <div><dt className="inline font-medium">Revoked: </dt><dd className="inline">{when(t.revoked_at)}</dd></div> : null}
              </dl>
            </AdminRecordRow>
          ))}
        </ul>
      </section>
    </div>
  );
}
