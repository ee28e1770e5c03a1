"use client";

import { useActionState, useEffect, useState } from "react";
import { QueryClient, QueryClientProvider, useQuery, useQueryClient } from "@tanstack/react-query";
import { ROLES, ROLE_LABELS, type Role } from "@/lib/auth/permissions";
import { initialActionState, type ActionState } from "@/lib/auth/action-state";

export type UserAction = (prev: ActionState, form: FormData) => Promise<ActionState>;

export type UsersAdminProps = {
  currentUserId: string;
  actions: { createUser: UserAction; changeRole: UserAction; setActive: UserAction; sendLink: UserAction; signOutEverywhere: UserAction };
};

export type UserRow = {
  id: string;
  email: string;
  name: string;
  role: Role;
  unit_pref: "mm" | "in";
  active: boolean;
  has_password: boolean;
  open_invite_expires_at: string | null;
  last_sign_in_at: string | null;
  created_at: string;
  version: number;
};

type UserEvent = { id: number; kind: string; from_state: string | null; to_state: string | null; reason: string | null; created_at: string; actor_name: string | null };

const button = "rounded-md px-2.5 py-1 text-xs font-semibold disabled:opacity-50";
const secondary = `${button} border border-soot-200 bg-white text-soot-700 hover:bg-soot-50`;
const danger = `${button} border border-oxide-500/40 bg-white text-oxide-700 hover:bg-oxide-100`;
const inputCls = "mt-1 block w-full rounded-md border border-soot-200 bg-white px-2.5 py-1.5 text-sm focus:border-clay-500 focus:outline-none";

async function fetchJson<T>(url: string): Promise<T> {
  const res = await fetch(url, { headers: { accept: "application/json" } });
  const body = await res.json().catch(() => null);
  if (!res.ok) throw new Error(body?.error?.message ?? `The server answered ${res.status}.`);
  return body as T;
}

const when = (iso: string | null) => (iso ? new Date(iso).toLocaleString(undefined, { dateStyle: "medium", timeStyle: "short" }) : "—");

export function UsersAdmin(props: UsersAdminProps) {
  const [client] = useState(() => new QueryClient({ defaultOptions: { queries: { staleTime: 5_000, refetchOnWindowFocus: true } } }));
  return (
    <QueryClientProvider client={client}>
      <UsersAdminInner {...props} />
    </QueryClientProvider>
  );
}

function UsersAdminInner({ currentUserId, actions }: UsersAdminProps) {
  const queryClient = useQueryClient();
  const users = useQuery({ queryKey: ["users"], queryFn: () => fetchJson<{ users: UserRow[] }>("/api/users") });
  const [flash, setFlash] = useState<ActionState | null>(null);
  const [showNew, setShowNew] = useState(false);
  const [open, setOpen] = useState<string | null>(null);

  const done = (state: ActionState) => {
    setFlash(state);
    if (state.ok) void queryClient.invalidateQueries({ queryKey: ["users"] });
  };

  const rows = users.data?.users ?? [];
  const activeAdmins = rows.filter((u) => u.active && u.role === "admin").length;
  const invited = rows.filter((u) => u.active && !u.has_password).length;
  const deactivated = rows.filter((u) => !u.active).length;
  const summary = [
    `${rows.length} accounts`,
    `${rows.length - invited - deactivated} active`,
    invited ? `${invited} invited` : null,
    deactivated ? `${deactivated} deactivated` : null,
    `${activeAdmins} active admin${activeAdmins === 1 ? "" : "s"}`,
  ].filter(Boolean).join(" · ");

  return (
    <div className="space-y-5">
      <div className="flex flex-wrap items-center justify-between gap-3">
        <p className="text-sm text-soot-600">
          {users.isSuccess ? summary : " "}
        </p>
        <button type="button" onClick={() => setShowNew((v) => !v)} className="rounded-md bg-clay-600 px-3.5 py-2 text-sm font-semibold text-white hover:bg-clay-700" aria-expanded={showNew}>
          {showNew ? "Close" : "New user"}
        </button>
      </div>

      {flash?.message ? (
        <div role={flash.ok ? "status" : "alert"} data-testid="users-flash" className={`rounded-card border px-4 py-2.5 text-sm ${flash.ok ? "border-verdigris-400/40 bg-verdigris-100 text-verdigris-700" : "border-oxide-500/40 bg-oxide-100 text-oxide-700"}`}>
          {flash.message}
        </div>
      ) : null}

      {showNew ? <NewUserForm action={actions.createUser} onDone={(s) => { done(s); if (s.ok) setShowNew(false); }} /> : null}

      <div className="overflow-x-auto rounded-card border border-soot-200 bg-white shadow-card" role="region" aria-label="Users" tabIndex={0}>
        <table className="min-w-full text-sm">
          <thead className="border-b border-soot-200 bg-soot-50 text-left text-xs uppercase tracking-wide text-soot-500">
            <tr>
              <th className="px-4 py-2.5 font-semibold">Person</th>
              <th className="px-4 py-2.5 font-semibold">Role</th>
              <th className="px-4 py-2.5 font-semibold">State</th>
              <th className="px-4 py-2.5 font-semibold">Last sign-in</th>
              <th className="px-4 py-2.5 font-semibold">
                <span className="sr-only">Actions</span>
              </th>
            </tr>
          </thead>
          <tbody className="divide-y divide-soot-100">
            {users.isPending ? (
              <tr>
                <td colSpan={5} className="px-4 py-6 text-center text-soot-500">Loading accounts…</td>
              </tr>
            ) : users.isError ? (
              <tr>
                <td colSpan={5} className="px-4 py-6 text-center text-oxide-700" role="alert">
                  Could not load the accounts: {users.error.message}
                </td>
              </tr>
            ) : (
              rows.map((u) => (
                <UserRowView key={`${u.id}:${u.version}`} user={u} self={u.id === currentUserId} actions={actions} onDone={done} open={open === u.id} onToggle={() => setOpen(open === u.id ? null : u.id)} />
              ))
            )}
          </tbody>
        </table>
      </div>
      <p className="text-xs text-soot-500">
        Invitations and reset links work once; an invitation for 48 hours, a reset link for 1 hour. A role change or a deactivation takes effect on the person&apos;s next click.
      </p>
    </div>
  );
}

function useActionDone(action: UserAction, onDone: (s: ActionState) => void) {
  const [state, formAction, pending] = useActionState(action, initialActionState);
  useEffect(() => {
    if (state.at) onDone(state);
    // onDone changes identity every render; the answer's timestamp is what matters
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [state.at]);
  return [state, formAction, pending] as const;
}

function NewUserForm({ action, onDone }: { action: UserAction; onDone: (s: ActionState) => void }) {
  const [state, formAction, pending] = useActionDone(action, onDone);
  const err = (k: string) => (state.ok ? undefined : state.fieldErrors?.[k]?.[0]);
  return (
    <form action={formAction} className="grid grid-cols-1 gap-4 rounded-card border border-soot-200 bg-white p-5 shadow-card sm:grid-cols-2 lg:grid-cols-5" aria-label="New user" noValidate>
      <label className="text-sm font-medium text-soot-700 lg:col-span-2">
        Name
        <input name="name" required className={inputCls} aria-invalid={!!err("name")} autoComplete="off" />
        {err("name") ? <span className="mt-1 block text-xs text-oxide-700">{err("name")}</span> : null}
      </label>
      <label className="text-sm font-medium text-soot-700 lg:col-span-2">
        E-mail
        <input name="email" type="email" required className={inputCls} aria-invalid={!!err("email")} autoComplete="off" />
        {err("email") ? <span className="mt-1 block text-xs text-oxide-700">{err("email")}</span> : null}
      </label>
      <label className="text-sm font-medium text-soot-700">
        Role
        <select name="role" defaultValue="technician" className={inputCls}>
          {ROLES.map((r) => (
            <option key={r} value={r}>
              {ROLE_LABELS[r]}
            </option>
          ))}
        </select>
      </label>
      <label className="text-sm font-medium text-soot-700">
        Units
        <select name="unit_pref" defaultValue="mm" className={inputCls}>
          <option value="mm">Millimetres (mm)</option>
          <option value="in">Inches (in)</option>
        </select>
      </label>
      <div className="flex items-end gap-3 sm:col-span-2 lg:col-span-4">
        <button type="submit" disabled={pending} className="rounded-md bg-clay-600 px-3.5 py-2 text-sm font-semibold text-white hover:bg-clay-700 disabled:opacity-60">
          {pending ? "Creating…" : "Create and send invitation"}
        </button>
        <span className="text-xs text-soot-500">The person gets an e-mail with a link to choose their password.</span>
      </div>
    </form>
  );
}

function stateLabel(u: UserRow): { text: string; cls: string; detail?: string } {
  if (!u.active) return { text: "Deactivated", cls: "bg-soot-100 text-soot-600" };
  if (!u.has_password) {
    return u.open_invite_expires_at
      ? { text: "Invited", cls: "bg-brass-100 text-brass-600", detail: `link valid until ${when(u.open_invite_expires_at)}` }
      : { text: "Invited", cls: "bg-oxide-100 text-oxide-700", detail: "the link has expired: resend it" };
  }
  return { text: "Active", cls: "bg-verdigris-100 text-verdigris-700" };
}

type RowProps = { user: UserRow; self: boolean; actions: UsersAdminProps["actions"]; onDone: (s: ActionState) => void; open: boolean; onToggle: () => void };

function UserRowView({ user, self, actions, onDone, open, onToggle }: RowProps) {
  const [, roleAction, rolePending] = useActionDone(actions.changeRole, onDone);
  const [, activeAction, activePending] = useActionDone(actions.setActive, onDone);
  const [, linkAction, linkPending] = useActionDone(actions.sendLink, onDone);
  const [, sessionsAction, sessionsPending] = useActionDone(actions.signOutEverywhere, onDone);
  const [confirming, setConfirming] = useState(false);
  // The row is keyed by id and version, so a saved change remounts it with the new role.
  const [role, setRole] = useState<Role>(user.role);
  const label = stateLabel(user);
  return (
    <>
      <tr className={user.active ? "" : "bg-soot-50/60 text-soot-500"} data-testid={`user-row-${user.email}`}>
        <td className="px-4 py-3 align-top">
          <div className="font-semibold text-soot-900">
            {user.name} {self ? <span className="text-xs font-normal text-soot-500">(you)</span> : null}
          </div>
          <div className="font-mono text-xs text-soot-500">{user.email}</div>
        </td>
        <td className="px-4 py-3 align-top">
          <form action={roleAction} className="flex items-center gap-2">
            <input type="hidden" name="id" value={user.id} />
            <input type="hidden" name="version" value={user.version} />
            <select name="role" value={role} onChange={(e) => setRole(e.target.value as Role)} aria-label={`Role of ${user.name}`} disabled={!user.active} className="rounded-md border border-soot-200 bg-white px-2 py-1 text-sm">
              {ROLES.map((r) => (
                <option key={r} value={r}>
                  {ROLE_LABELS[r]}
                </option>
              ))}
            </select>
            {role !== user.role ? (
              <button type="submit" disabled={rolePending} className={secondary}>
                {rolePending ? "Saving…" : "Save role"}
              </button>
            ) : null}
          </form>
        </td>
        <td className="px-4 py-3 align-top">
          <span className={`inline-block rounded px-2 py-0.5 text-xs font-semibold ${label.cls}`}>{label.text}</span>
          {label.detail ? <div className="mt-1 text-2xs text-soot-500">{label.detail}</div> : null}
        </td>
        <td className="tabular whitespace-nowrap px-4 py-3 align-top text-xs text-soot-600">{when(user.last_sign_in_at)}</td>
        <td className="whitespace-nowrap px-4 py-3 align-top">
          <div className="flex justify-end gap-2">
            {user.active ? (
              <form action={linkAction}>
                <input type="hidden" name="id" value={user.id} />
                <button type="submit" disabled={linkPending} className={secondary}>
                  {linkPending ? "Sending…" : user.has_password ? "Send reset link" : "Resend invitation"}
                </button>
              </form>
            ) : null}
            <form action={sessionsAction}>
              <input type="hidden" name="id" value={user.id} />
              <button type="submit" disabled={sessionsPending} className={secondary} title={self ? "Ends every session of yours, this one included" : undefined}>
                {sessionsPending ? "Signing out…" : "Sign out everywhere"}
              </button>
            </form>
            {self ? null : user.active && !confirming ? (
              <button type="button" className={danger} onClick={() => setConfirming(true)}>
                Deactivate
              </button>
            ) : (
              <form action={activeAction} className="flex gap-2">
                <input type="hidden" name="id" value={user.id} />
                <input type="hidden" name="version" value={user.version} />
                <input type="hidden" name="active" value={user.active ? "false" : "true"} />
                {user.active ? (
                  <>
                    <button type="submit" disabled={activePending} className={danger}>
                      {activePending ? "Deactivating…" : "Confirm: deactivate"}
                    </button>
                    <button type="button" className={secondary} onClick={() => setConfirming(false)}>
                      Keep
                    </button>
                  </>
                ) : (
                  <button type="submit" disabled={activePending} className={secondary}>
                    {activePending ? "Reactivating…" : "Reactivate"}
                  </button>
                )}
              </form>
            )}
            <button type="button" className={secondary} onClick={onToggle} aria-expanded={open}>
              History
            </button>
          </div>
        </td>
      </tr>
      {open ? (
        <tr>
          <td colSpan={5} className="bg-soot-50 px-4 py-3">
            <UserHistory id={user.id} version={user.version} />
          </td>
        </tr>
      ) : null}
    </>
  );
}

const EVENT_LABELS: Record<string, string> = {
  sign_in: "Signed in",
  sign_in_failed: "Failed sign-in",
  sign_out: "Signed out",
  role_change: "Role changed",
  deactivated: "Deactivated",
  reactivated: "Reactivated",
  invited: "Invitation sent",
  password_set: "Password chosen (invitation used)",
  password_reset_requested: "Reset link sent",
  password_reset: "Password reset",
  password_changed: "Password changed",
  profile_change: "Profile changed",
  sessions_revoked: "Signed out everywhere",
};

const stateName = (s: string | null) => (s ? (ROLE_LABELS[s as Role] ?? s) : "");

function UserHistory({ id, version }: { id: string; version: number }) {
  const q = useQuery({ queryKey: ["user", id, version], queryFn: () => fetchJson<{ events: UserEvent[] }>(`/api/users/${id}`) });
  if (q.isPending) return <p className="text-xs text-soot-500">Loading history…</p>;
  if (q.isError) return <p className="text-xs text-oxide-700">{q.error.message}</p>;
  if (q.data.events.length === 0) return <p className="text-xs text-soot-500">No account events yet.</p>;
  return (
    <ol className="space-y-1 text-xs text-soot-700">
      {q.data.events.map((e) => (
        <li key={e.id} className="flex gap-3">
          <span className="tabular w-40 shrink-0 text-soot-500">{when(e.created_at)}</span>
          <span className="font-semibold">{EVENT_LABELS[e.kind] ?? e.kind}</span>
          <span className="text-soot-500">
            {e.reason ? e.reason.replace(/_/g, " ") : e.from_state || e.to_state ? `${stateName(e.from_state)} → ${stateName(e.to_state)}`.trim() : ""}
            {e.actor_name ? ` · by ${e.actor_name}` : ""}
          </span>
        </li>
      ))}
    </ol>
  );
}
