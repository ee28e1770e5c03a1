-- User administration: the users list shows when someone last signed in, and a token records
-- which admin issued it (null when the user asked for a reset link themselves).
alter table users add column last_sign_in_at timestamptz;
alter table auth_tokens add column created_by uuid references users(id) on delete set null;
-- Issuing a new link revokes the open ones of the same kind; this finds them.
create index auth_tokens_open_idx on auth_tokens (user_id, kind) where used_at is null;
-- The users page lists a person's recent account events.
create index events_user_idx on events (entity_id, created_at) where entity = 'user';
