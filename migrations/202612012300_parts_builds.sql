-- Builds get the moments they really started and finished (the booking keeps the planned
-- slot), and printer-plan proposals are kept so that one can be applied, or refused as stale,
-- exactly as the person saw it.

alter table builds add column started_at timestamptz;
alter table builds add column finished_at timestamptz;

create type plan_proposal_status as enum ('open', 'applied', 'refused');

create table plan_proposals (
  id uuid primary key default gen_random_uuid(),
  created_by uuid references users(id),
  created_at timestamptz not null default now(),
  -- the planner's "now": nothing in the proposal starts before it
  planned_from timestamptz not null,
  -- [{build_id, build_version, code, printer_id, starts_at, ends_at, due_at, lateness_min}]
  items jsonb not null,
  -- builds the planner could not place, each with a reason
  unplaced jsonb not null default '[]',
  -- makespan, maximum and total lateness, late count, lower bound
  metrics jsonb not null,
  status plan_proposal_status not null default 'open',
  decided_by uuid references users(id),
  decided_at timestamptz,
  refusal text
);
create index plan_proposals_created_at_idx on plan_proposals (created_at);

-- The floor asks for one printer's bookings in a window; the partial exclusion index serves
-- only queries that repeat its state filter, this one serves the rest.
create index builds_printer_window_idx on builds using gist (printer_id, tstzrange(starts_at, ends_at));
create index parts_geometry_file_id_idx on parts (geometry_file_id);
create index orders_code_lower_idx on orders (lower(code));
