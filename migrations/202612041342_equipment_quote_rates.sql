-- Quoting rates of one printer or one furnace. A larger or faster machine costs more an hour or
-- a run than the shop's default; where a row or a value is missing, the shop's rate in
-- quote_settings stands. Money in integer minor units of the shop's quoting currency.

create table printer_quote_rates (
  printer_id uuid primary key references printers(id) on delete cascade,
  rate_minor_per_h bigint not null check (rate_minor_per_h >= 0),
  updated_at timestamptz not null default now(),
  version integer not null default 1
);

create table furnace_quote_rates (
  furnace_id uuid primary key references furnaces(id) on delete cascade,
  -- each null = the shop's figure for that part of a run's cost
  run_cost_minor bigint check (run_cost_minor >= 0),
  gas_cost_minor bigint check (gas_cost_minor >= 0),
  energy_cost_minor bigint check (energy_cost_minor >= 0),
  updated_at timestamptz not null default now(),
  version integer not null default 1
);
