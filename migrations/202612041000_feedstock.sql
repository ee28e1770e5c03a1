-- Feedstock on the shelf and the consumables behind each step: lots received from suppliers,
-- what each build drew from them, the reorder rule per material, the wash bath's binder load
-- and the furnace process gas on hand. Masses in g, gas in litres at standard conditions.

create type feedstock_lot_state as enum ('quarantine', 'released', 'consumed', 'rejected');

-- The shop's own list of forms and containers (spool, rod, cartridge, pellets, …).
create table feedstock_forms (
  id uuid primary key default gen_random_uuid(),
  name text not null unique check (length(trim(name)) > 0),
  created_at timestamptz not null default now()
);

create sequence feedstock_lot_code_seq;

create table feedstock_lots (
  id uuid primary key default gen_random_uuid(),
  code text not null unique, -- our label, printed on the container with its QR code
  material_id uuid not null references materials(id),
  supplier text not null check (length(trim(supplier)) > 0),
  supplier_lot text not null check (length(trim(supplier_lot)) > 0),
  form_id uuid references feedstock_forms(id),
  received_on date not null,
  expires_on date, -- null: no shelf life given by the supplier
  quantity_g numeric(12, 1) not null check (quantity_g > 0),
  remaining_g numeric(12, 1) not null check (remaining_g >= 0),
  storage_notes text not null default '',
  certificate_file_id uuid references files(id),
  state feedstock_lot_state not null default 'quarantine',
  state_reason text,
  recalled_at timestamptz,
  recall_reason text,
  created_by uuid references users(id),
  created_at timestamptz not null default now(),
  updated_at timestamptz not null default now(),
  version integer not null default 1,
  unique (material_id, supplier, supplier_lot),
  check (remaining_g <= quantity_g)
);
create index feedstock_lots_material_id_state_idx on feedstock_lots (material_id, state);

-- What a build took from a lot: the estimate at start, corrected when the build ends.
create table feedstock_draws (
  id uuid primary key default gen_random_uuid(),
  lot_id uuid not null references feedstock_lots(id),
  build_id uuid not null references builds(id),
  estimated_g numeric(12, 1) not null check (estimated_g >= 0),
  drawn_g numeric(12, 1) not null check (drawn_g >= 0), -- the current figure: the estimate until corrected
  corrected_at timestamptz,
  correction_note text,
  created_by uuid references users(id),
  created_at timestamptz not null default now(),
  unique (lot_id, build_id)
);
create index feedstock_draws_build_id_idx on feedstock_draws (build_id);

alter table builds add column feedstock_lot_id uuid references feedstock_lots(id);

-- Allowances on top of the parts' green mass, and the reorder rule.
alter table materials
  add column support_allowance numeric(5, 3) not null default 0.15 check (support_allowance >= 0 and support_allowance < 5),
  add column purge_g numeric(10, 1) not null default 25 check (purge_g >= 0),
  add column reorder_point_g numeric(12, 1) not null default 0 check (reorder_point_g >= 0),
  add column lead_time_days integer not null default 14 check (lead_time_days >= 0 and lead_time_days <= 365),
  -- set when the projection fell below the reorder point and managers were told; cleared when it recovers
  add column reorder_alerted_at timestamptz;

-- Solvent bath: binder the bath can hold before it washes slowly and badly.
alter table wash_stations
  add column bath_binder_limit_g numeric(12, 1) not null default 5000 check (bath_binder_limit_g > 0),
  add column bath_changed_at timestamptz not null default now(),
  add column bath_alerted_at timestamptz;

-- Process gas: which gas a profile burns and at what flow, and what the shop has on hand.
alter table sinter_profiles
  add column process_gas text not null default '', -- e.g. argon, hydrogen, nitrogen; matches gas_supplies.gas
  add column gas_flow_l_per_min numeric(8, 2) not null default 0 check (gas_flow_l_per_min >= 0);

create table gas_supplies (
  id uuid primary key default gen_random_uuid(),
  gas text not null unique check (length(trim(gas)) > 0), -- matches sinter_profiles.process_gas
  on_hand_l numeric(12, 1) not null check (on_hand_l >= 0),
  note text not null default '',
  counted_by uuid references users(id),
  counted_at timestamptz not null default now(),
  version integer not null default 1
);
