-- Wash batches and furnace runs: the moments a wash really started and finished (the booking
-- keeps the planned slot), readable batch and run codes, a straight revision history for sinter
-- profiles, and batch proposals kept so that one is applied exactly as the person saw it, or
-- refused as stale.

alter table wash_batches add column started_at timestamptz;
alter table wash_batches add column finished_at timestamptz;

-- furnace_runs already has loaded_at (= the run's real start) and unloaded_at.
alter table furnace_runs add column started_by uuid references users(id);
alter table furnace_runs add column unloaded_by uuid references users(id);

create sequence wash_batch_code_seq start 1000;
create sequence furnace_run_code_seq start 1000;

-- A revision is superseded at most once, so a profile's history is a line, never a fork made
-- by two admins saving at the same moment.
create unique index sinter_profiles_supersedes_id_idx on sinter_profiles (supersedes_id) where supersedes_id is not null;

create type batch_proposal_status as enum ('open', 'applied', 'refused');

create table batch_proposals (
  id uuid primary key default gen_random_uuid(),
  created_by uuid references users(id),
  created_at timestamptz not null default now(),
  -- the planner's "now": nothing in the proposal starts before it
  planned_from timestamptz not null,
  -- [{wash_station_id, starts_at, ends_at, est_minutes, units: [{id, version}]}]
  wash jsonb not null default '[]',
  -- [{furnace_id, profile_id, starts_at, ends_at, cycle_minutes, tray_layout, units: [{id, version}]}]
  furnace jsonb not null default '[]',
  -- units the planner could not place, each with a reason
  unplaced jsonb not null default '[]',
  -- run count, lower bound, latest lateness, time taken
  metrics jsonb not null,
  status batch_proposal_status not null default 'open',
  decided_by uuid references users(id),
  decided_at timestamptz,
  refusal text
);
create index batch_proposals_created_at_idx on batch_proposals (created_at);

-- The lanes of the floor ask for one furnace's or one wash station's bookings in a window.
create index furnace_runs_furnace_window_idx on furnace_runs using gist (furnace_id, tstzrange(starts_at, ends_at));
create index wash_batches_station_window_idx on wash_batches using gist (wash_station_id, tstzrange(starts_at, ends_at));
create index furnace_runs_state_idx on furnace_runs (state);
create index wash_batches_state_idx on wash_batches (state);
