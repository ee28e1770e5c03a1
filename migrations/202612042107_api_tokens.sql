-- API tokens for other programs (ordering, accounting, shipping, quality). The token itself is
-- shown once; the table keeps its sha-256. A token carries 256 random bits, so a plain fast hash
-- is enough: nothing can be guessed or brute-forced from the hash, unlike a person's password.
create table api_tokens (
  id uuid primary key default gen_random_uuid(),
  name text not null check (length(name) between 1 and 80),
  token_hash text not null unique,
  -- the first characters of the token, shown so an admin can tell tokens apart
  token_hint text not null,
  scopes text[] not null check (cardinality(scopes) > 0),
  created_by uuid not null references users(id),
  created_at timestamptz not null default now(),
  expires_at timestamptz,
  revoked_at timestamptz,
  revoked_by uuid references users(id),
  last_used_at timestamptz,
  last_used_from text,
  -- fixed-window rate limit, counted on the token's own row (one UPDATE per request)
  rate_limit_per_minute integer not null default 600 check (rate_limit_per_minute between 1 and 100000),
  window_started_at timestamptz,
  window_count integer not null default 0
);
create index api_tokens_created_idx on api_tokens (created_at desc);
