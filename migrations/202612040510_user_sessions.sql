-- One row per signed-in browser. The sealed cookie names its row; a request is signed in only
-- while the row is open, so signing out, a password change or an admin's "sign out everywhere"
-- ends every copy of the cookie at once (not at the cookie's idle or absolute limit).
create table user_sessions (
  id uuid primary key default gen_random_uuid(),
  user_id uuid not null references users(id) on delete cascade,
  created_at timestamptz not null default now(),
  last_seen_at timestamptz not null default now(), -- moved when the cookie's idle lifetime slides
  ip text, -- the client address at sign-in (lib/http/client-address.ts)
  user_agent text, -- as sent at sign-in, cut to 300 characters
  revoked_at timestamptz, -- null while the session is open
  revoked_reason text -- 'sign_out', 'password_changed', 'password_reset', 'role_change', 'deactivated', 'sign_out_everywhere', 'other_sessions'
);
create index user_sessions_user_id_idx on user_sessions (user_id) where revoked_at is null;
