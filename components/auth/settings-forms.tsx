"use client";

import { useState } from "react";
import { useRouter } from "next/navigation";

export type OpenSession = { id: string; created_at: string; last_seen_at: string; ip: string | null; user_agent: string | null; current: boolean };

export type SettingsFormsProps = {
  user: { name: string; unit_pref: "mm" | "in"; muted_mail: string[] };
  sessions: OpenSession[];
  mailKinds: { kind: string; label: string }[];
  passwordMin: number;
};

type Answer = { ok: boolean; message: string; fieldErrors?: Record<string, string[]> } | null;

async function send(url: string, method: string, body?: unknown, onSignedOut?: () => void): Promise<NonNullable<Answer>> {
  try {
    const res = await fetch(url, { method, headers: body ? { "content-type": "application/json" } : undefined, body: body ? JSON.stringify(body) : undefined });
    const json = await res.json().catch(() => null);
    if (res.status === 401) {
      onSignedOut?.();
      return { ok: false, message: "Your session has ended; sign in again." };
    }
    if (!res.ok) return { ok: false, message: json?.error?.message ?? `The server answered ${res.status}.`, fieldErrors: json?.error?.fieldErrors };
    return { ok: true, message: json?.message ?? "Saved." };
  } catch {
    return { ok: false, message: "The server did not answer; nothing was saved." };
  }
}

const card = "rounded-card border border-soot-200 bg-white p-5 shadow-card";
const inputCls = "mt-1 block w-full rounded-md border border-soot-200 px-3 py-2 text-sm focus:border-clay-500 focus:outline-none";
const primary = "rounded-md bg-clay-600 px-3.5 py-2 text-sm font-semibold text-white hover:bg-clay-700 disabled:opacity-60";

function AnswerLine({ answer }: { answer: Answer }) {
  if (!answer) return null;
  return (
    <p role={answer.ok ? "status" : "alert"} className={`text-sm ${answer.ok ? "text-verdigris-700" : "text-oxide-700"}`}>
      {answer.message}
    </p>
  );
}

const FieldError = ({ errors, name }: { errors?: Record<string, string[]>; name: string }) =>
  errors?.[name]?.[0] ? <span className="mt-1 block text-xs text-oxide-700">{errors[name][0]}</span> : null;

export function SettingsForms({ user, sessions, mailKinds, passwordMin }: SettingsFormsProps) {
  const router = useRouter();
  const [profileAnswer, setProfileAnswer] = useState<Answer>(null);
  const [mailAnswer, setMailAnswer] = useState<Answer>(null);
  const [pwAnswer, setPwAnswer] = useState<Answer>(null);
  const [sessionsAnswer, setSessionsAnswer] = useState<Answer>(null);
  const [busy, setBusy] = useState<string | null>(null);
  const signedOut = () => router.push(`/sign-in?next=${encodeURIComponent("/settings")}`);

  async function saveProfile(e: React.FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const f = new FormData(e.currentTarget);
    setBusy("profile");
    const a = await send("/api/me", "PATCH", { name: f.get("name"), unit_pref: f.get("unit_pref") }, signedOut);
    setProfileAnswer(a.ok ? { ok: true, message: "Name and units saved." } : a);
    setBusy(null);
    if (a.ok) router.refresh();
  }

  async function saveMail(e: React.FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const f = new FormData(e.currentTarget);
    const wanted = new Set(f.getAll("receive").map(String));
    setBusy("mail");
    const a = await send("/api/me", "PATCH", { muted_mail: mailKinds.map((m) => m.kind).filter((k) => !wanted.has(k)) }, signedOut);
    setMailAnswer(a.ok ? { ok: true, message: "E-mail choices saved." } : a);
    setBusy(null);
    if (a.ok) router.refresh();
  }

  async function changePassword(e: React.FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const form = e.currentTarget;
    const f = new FormData(form);
    setBusy("password");
    const a = await send("/api/me/password", "POST", { current_password: f.get("current_password"), new_password: f.get("new_password"), confirm: f.get("confirm") }, signedOut);
    setPwAnswer(a);
    setBusy(null);
    if (a.ok) form.reset();
  }

  async function signOutElsewhere() {
    setBusy("sessions");
    setSessionsAnswer(await send("/api/me/sessions", "DELETE", undefined, signedOut));
    setBusy(null);
    router.refresh();
  }

  return (
    <div className="grid max-w-4xl items-start gap-5 lg:grid-cols-2">
      <form onSubmit={saveProfile} className={`${card} space-y-4`} aria-label="Name and units" noValidate>
        <h2 className="font-display text-lg font-semibold">Name and units</h2>
        <label className="block text-sm font-medium text-soot-700">
          Name
          <input name="name" defaultValue={user.name} required className={inputCls} autoComplete="name" />
          <FieldError errors={profileAnswer?.fieldErrors} name="name" />
        </label>
        <fieldset className="text-sm text-soot-700">
          <legend className="font-medium">Lengths are shown in</legend>
          <div className="mt-1.5 flex gap-5">
            <label className="flex items-center gap-2">
              <input type="radio" name="unit_pref" value="mm" defaultChecked={user.unit_pref === "mm"} /> millimetres (mm)
            </label>
            <label className="flex items-center gap-2">
              <input type="radio" name="unit_pref" value="in" defaultChecked={user.unit_pref === "in"} /> inches (in)
            </label>
          </div>
          <p className="mt-1 text-xs text-soot-500">Hearth stores every length in millimetres; this only changes what you see and type.</p>
        </fieldset>
        <div className="flex items-center gap-3">
          <button type="submit" className={primary} disabled={busy === "profile"}>
            {busy === "profile" ? "Saving…" : "Save"}
          </button>
          <AnswerLine answer={profileAnswer} />
        </div>
      </form>

      <form onSubmit={saveMail} className={`${card} space-y-3`} aria-label="E-mail" noValidate>
        <h2 className="font-display text-lg font-semibold">E-mail I receive</h2>
        <p className="text-xs text-soot-500">Sent to the roles the work concerns; untick what you do not want. Invitations and reset links always arrive.</p>
        <div className="space-y-1.5">
          {mailKinds.map((m) => (
            <label key={m.kind} className="flex items-center gap-2 text-sm text-soot-700">
              <input type="checkbox" name="receive" value={m.kind} defaultChecked={!user.muted_mail.includes(m.kind)} />
              {m.label}
            </label>
          ))}
        </div>
        <div className="flex items-center gap-3">
          <button type="submit" className={primary} disabled={busy === "mail"}>
            {busy === "mail" ? "Saving…" : "Save e-mail choices"}
          </button>
          <AnswerLine answer={mailAnswer} />
        </div>
      </form>

      <form onSubmit={changePassword} className={`${card} space-y-4`} aria-label="Password" noValidate>
        <h2 className="font-display text-lg font-semibold">Password</h2>
        <label className="block text-sm font-medium text-soot-700">
          Current password
          <input name="current_password" type="password" autoComplete="current-password" required className={inputCls} />
          <FieldError errors={pwAnswer?.fieldErrors} name="current_password" />
        </label>
        <label className="block text-sm font-medium text-soot-700">
          New password
          <input name="new_password" type="password" autoComplete="new-password" minLength={passwordMin} required className={inputCls} />
          <span className="mt-1 block text-xs text-soot-500">At least {passwordMin} characters; a few unrelated words work well.</span>
          <FieldError errors={pwAnswer?.fieldErrors} name="new_password" />
        </label>
        <label className="block text-sm font-medium text-soot-700">
          New password again
          <input name="confirm" type="password" autoComplete="new-password" required className={inputCls} />
          <FieldError errors={pwAnswer?.fieldErrors} name="confirm" />
        </label>
        <div className="flex items-center gap-3">
          <button type="submit" className={primary} disabled={busy === "password"}>
            {busy === "password" ? "Changing…" : "Change password"}
          </button>
          <AnswerLine answer={pwAnswer} />
        </div>
        <p className="text-xs text-soot-500">Changing it signs you out everywhere else.</p>
      </form>

      <section className={`${card} space-y-3`} aria-label="Sessions">
        <h2 className="font-display text-lg font-semibold">Sessions</h2>
        <p className="text-sm text-soot-600">Left Hearth open on a shared terminal? End every session except this one.</p>
        <ul className="divide-y divide-soot-100 text-sm" data-testid="open-sessions">
          {sessions.map((s) => (
            <li key={s.id} className="py-2">
              <div className="font-medium text-soot-800 [overflow-wrap:anywhere]">
                {s.user_agent ? s.user_agent.slice(0, 80) : "Unknown browser"}
                {s.current ? <span className="ml-2 rounded bg-verdigris-100 px-1.5 py-0.5 text-xs text-verdigris-700">this browser</span> : null}
              </div>
              <div className="text-xs text-soot-500">
                {s.ip ?? "address unknown"} · signed in {new Date(s.created_at).toLocaleString()} · last active {new Date(s.last_seen_at).toLocaleString()}
              </div>
            </li>
          ))}
        </ul>
        <div className="flex items-center gap-3">
          <button type="button" onClick={signOutElsewhere} disabled={busy === "sessions"} className="rounded-md border border-soot-200 px-3.5 py-2 text-sm font-semibold text-soot-700 hover:bg-soot-50 disabled:opacity-60">
            {busy === "sessions" ? "Signing out…" : "Sign out other sessions"}
          </button>
          <AnswerLine answer={sessionsAnswer} />
        </div>
      </section>
    </div>
  );
}
