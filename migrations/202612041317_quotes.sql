-- Quotes: what a customer's part will cost and when it can be had. Money is stored in integer
-- minor units of the shop's quoting currency (cents for EUR/USD), never as floating point.

create type quote_status as enum ('draft', 'sent', 'accepted', 'declined', 'expired');

-- One row: the shop's quoting rates and currency (admins edit them in /setup/quotes).
create table quote_settings (
  id integer primary key default 1 check (id = 1),
  currency text not null default 'EUR' check (currency ~ '^[A-Z]{3}$'),
  -- digits after the decimal point of the currency (2 for EUR and USD, 0 for JPY)
  minor_digits integer not null default 2 check (minor_digits between 0 and 3),
  printer_rate_minor_per_h bigint not null default 0 check (printer_rate_minor_per_h >= 0),
  -- a typical wash batch: its cost and the green volume it carries, cm³
  wash_batch_cost_minor bigint not null default 0 check (wash_batch_cost_minor >= 0),
  wash_batch_volume_cm3 numeric not null default 1000 check (wash_batch_volume_cm3 > 0),
  -- one furnace run: fixed cost plus process gas and energy
  furnace_run_cost_minor bigint not null default 0 check (furnace_run_cost_minor >= 0),
  furnace_gas_cost_minor bigint not null default 0 check (furnace_gas_cost_minor >= 0),
  furnace_energy_cost_minor bigint not null default 0 check (furnace_energy_cost_minor >= 0),
  finishing_rate_minor_per_h bigint not null default 0 check (finishing_rate_minor_per_h >= 0),
  -- machining/grinding time per cm² of stocked face before the Ra and tolerance factors
  finishing_min_per_cm2 numeric not null default 0.5 check (finishing_min_per_cm2 >= 0),
  inspection_rate_minor_per_h bigint not null default 0 check (inspection_rate_minor_per_h >= 0),
  inspection_min_per_unit numeric not null default 10 check (inspection_min_per_unit >= 0),
  setup_minor_per_order bigint not null default 0 check (setup_minor_per_order >= 0),
  -- basis points: 1500 = 15 %
  overhead_bp integer not null default 0 check (overhead_bp between 0 and 100000),
  margin_bp integer not null default 0 check (margin_bp between 0 and 100000),
  -- yield used while a material has no recorded outcomes
  fallback_yield numeric not null default 0.9 check (fallback_yield > 0 and fallback_yield <= 1),
  validity_days integer not null default 30 check (validity_days between 1 and 365),
  updated_at timestamptz not null default now(),
  version integer not null default 1
);
insert into quote_settings (id) values (1);

-- Per material: feedstock price and how much feedstock a part takes beyond its solid volume.
create table material_quote_rates (
  material_id uuid primary key references materials(id) on delete cascade,
  feedstock_minor_per_kg bigint not null default 0 check (feedstock_minor_per_kg >= 0),
  -- printed fraction of the part's green volume (shells + infill); 1 = solid
  infill_fraction numeric not null default 1 check (infill_fraction > 0 and infill_fraction <= 1),
  -- supports and raft as a fraction of the part's green volume
  support_fraction numeric not null default 0.1 check (support_fraction >= 0 and support_fraction <= 2),
  updated_at timestamptz not null default now(),
  version integer not null default 1
);

create sequence quote_code_seq;

create table quotes (
  id uuid primary key default gen_random_uuid(),
  code text not null unique,
  customer text not null check (length(customer) between 1 and 200),
  contact_email text not null,
  status quote_status not null default 'draft',
  valid_until timestamptz not null,
  currency text not null,
  minor_digits integer not null,
  notes text not null default '',
  -- figures as last computed (minor units); the explained breakdown is in cost
  total_minor bigint,
  cost jsonb,
  promise_at timestamptz,
  promise_p90_at timestamptz,
  promise jsonb,
  sent_at timestamptz,
  decided_at timestamptz,
  decided_by uuid references users(id),
  order_id uuid references orders(id),
  plan_proposal_id uuid references plan_proposals(id),
  created_by uuid references users(id),
  created_at timestamptz not null default now(),
  updated_at timestamptz not null default now(),
  version integer not null default 1
);
create index quotes_status_valid_until_idx on quotes (status, valid_until);

create table quote_lines (
  id uuid primary key default gen_random_uuid(),
  quote_id uuid not null references quotes(id) on delete cascade,
  position integer not null,
  name text not null check (length(name) between 1 and 200),
  material_id uuid not null references materials(id),
  -- an existing part, or an uploaded STL (files row, analysed by the worker)
  part_id uuid references parts(id),
  file_id uuid references files(id),
  quantity integer not null check (quantity between 1 and 10000),
  nominal_x_mm numeric not null check (nominal_x_mm > 0),
  nominal_y_mm numeric not null check (nominal_y_mm > 0),
  nominal_z_mm numeric not null check (nominal_z_mm > 0),
  volume_mm3 numeric check (volume_mm3 > 0),
  thickest_wall_mm numeric not null check (thickest_wall_mm > 0),
  stock_x_neg_mm numeric not null default 0, stock_x_pos_mm numeric not null default 0,
  stock_y_neg_mm numeric not null default 0, stock_y_pos_mm numeric not null default 0,
  stock_z_neg_mm numeric not null default 0, stock_z_pos_mm numeric not null default 0,
  target_ra_um numeric check (target_ra_um > 0),
  tolerance_um numeric check (tolerance_um > 0),
  requested_at timestamptz,
  cost_minor bigint,
  created_at timestamptz not null default now(),
  unique (quote_id, position)
);
create index quote_lines_quote_id_idx on quote_lines (quote_id);

-- Files that go with an outbox message (a quote PDF). Kept in the database beside the message so
-- the worker's send needs no call to the object store.
create table outbox_attachments (
  id uuid primary key default gen_random_uuid(),
  outbox_id uuid not null references notification_outbox(id) on delete cascade,
  filename text not null,
  content_type text not null,
  content bytea not null check (octet_length(content) <= 5242880)
);
create index outbox_attachments_outbox_id_idx on outbox_attachments (outbox_id);
