-- The worker: when an unsent outbox row may be tried again, and a record of each sweep (the
-- one-minute pass that catches bookings whose end went by without their job) for /api/health.

-- A failed send waits before the next try, longer each time (see lib/mail/backoff.ts); a row
-- stays pending through an SMTP outage however long it lasts.
alter table notification_outbox add column next_attempt_at timestamptz not null default now();
create index notification_outbox_due_idx on notification_outbox (next_attempt_at) where status = 'pending';

create table worker_sweeps (
  id bigserial primary key,
  worker_id text not null,
  started_at timestamptz not null default now(),
  finished_at timestamptz,
  -- bookings this sweep advanced itself (their job had not done it)
  advanced integer not null default 0,
  -- parts whose scale-up it recomputed, outbox rows it sent
  rescaled integer not null default 0,
  mail_sent integer not null default 0,
  error text
);
create index worker_sweeps_started_at_idx on worker_sweeps (started_at);

-- The sweep looks for bookings whose end has passed while they are still open.
create index builds_open_ends_at_idx on builds (ends_at) where state in ('scheduled', 'running');
create index wash_batches_ends_at_idx on wash_batches (ends_at) where state in ('scheduled', 'running', 'complete');
create index furnace_runs_ends_at_idx on furnace_runs (ends_at) where state in ('scheduled', 'running', 'complete');
