-- Hearth's first schema: people, shop set-up, the order book, the bookings of printers,
-- wash stations and furnaces, and the records kept along the way.
-- Lengths mm, temperatures °C, masses g, times timestamptz (UTC).

create extension if not exists btree_gist;
create extension if not exists pgcrypto;

create type user_role as enum ('admin', 'manager', 'technician', 'furnace_operator', 'machinist');
create type unit_system as enum ('mm', 'in');
create type unit_state as enum (
  'planned', 'printing', 'green', 'washing', 'brown', 'sintering', 'sintered',
  'ready_for_finishing', 'finishing', 'done', 'on_hold', 'scrapped'
);
create type scrap_reason as enum ('print_failure', 'crack', 'slump', 'warp', 'out_of_tolerance', 'other');
create type booking_state as enum ('draft', 'scheduled', 'running', 'complete', 'cancelled');
create type resource_kind as enum ('printer', 'wash_station', 'furnace');
create type file_status as enum ('queued', 'analysing', 'done', 'failed');
create type file_kind as enum ('geometry', 'attachment');
create type outbox_status as enum ('pending', 'sent', 'failed');
create type token_kind as enum ('invite', 'reset');

-- People ---------------------------------------------------------------------------------

create table users (
  id uuid primary key default gen_random_uuid(),
  email text not null,
  name text not null check (length(trim(name)) > 0),
  password_hash text, -- null until an invited user sets a password
  role user_role not null,
  unit_pref unit_system not null default 'mm',
  active boolean not null default true,
  -- kinds of e-mail this user has turned off, e.g. {"wash_done"}
  muted_mail text[] not null default '{}',
  calendar_token text unique, -- secret for the iCalendar feed; null = no feed
  created_at timestamptz not null default now(),
  updated_at timestamptz not null default now(),
  version integer not null default 1
);
create unique index users_email_lower_idx on users (lower(email));

create table auth_tokens (
  id uuid primary key default gen_random_uuid(),
  user_id uuid not null references users(id) on delete cascade,
  kind token_kind not null,
  token_hash text not null unique, -- sha-256 of the token; the token itself is only e-mailed
  expires_at timestamptz not null,
  used_at timestamptz,
  created_at timestamptz not null default now()
);
create index auth_tokens_user_id_idx on auth_tokens (user_id);

create table sign_in_attempts (
  id bigserial primary key,
  email text not null,
  ip text not null,
  succeeded boolean not null,
  created_at timestamptz not null default now()
);
create index sign_in_attempts_email_created_at_idx on sign_in_attempts (lower(email), created_at);
create index sign_in_attempts_ip_created_at_idx on sign_in_attempts (ip, created_at);

-- Shop set-up ------------------------------------------------------------------------------

create table shop_settings (
  id integer primary key default 1 check (id = 1),
  shop_name text not null,
  time_zone text not null default 'UTC',
  -- weekly staffed hours: [{"day":1,"start":"06:00","end":"22:00"}, ...], day 0 = Sunday
  staffed_hours jsonb not null default '[]',
  drying_minutes integer not null default 120 check (drying_minutes >= 0),
  finishing_lead_minutes integer not null default 1440 check (finishing_lead_minutes >= 0),
  at_risk_margin_minutes integer not null default 1440 check (at_risk_margin_minutes >= 0),
  plate_clearance_mm numeric not null default 5 check (plate_clearance_mm >= 0),
  tray_clearance_mm numeric not null default 5 check (tray_clearance_mm >= 0),
  updated_at timestamptz not null default now(),
  version integer not null default 1
);

create table sinter_profiles (
  id uuid primary key default gen_random_uuid(),
  code text not null,
  name text not null,
  revision integer not null default 1 check (revision >= 1),
  supersedes_id uuid references sinter_profiles(id),
  atmosphere text not null,
  start_temp_c numeric not null default 20,
  cool_rate_c_per_min numeric not null check (cool_rate_c_per_min > 0),
  cool_to_c numeric not null default 100,
  notes text not null default '',
  retired boolean not null default false,
  created_at timestamptz not null default now(),
  version integer not null default 1,
  unique (code, revision)
);

create table sinter_profile_segments (
  id uuid primary key default gen_random_uuid(),
  profile_id uuid not null references sinter_profiles(id) on delete cascade,
  position integer not null check (position >= 0),
  rate_c_per_min numeric not null check (rate_c_per_min > 0),
  setpoint_c numeric not null check (setpoint_c > -50 and setpoint_c < 2000),
  hold_min numeric not null default 0 check (hold_min >= 0),
  unique (profile_id, position)
);

create table materials (
  id uuid primary key default gen_random_uuid(),
  code text not null unique,
  name text not null,
  alloy_family text not null,
  shrink_xy numeric not null check (shrink_xy > 0 and shrink_xy < 0.5),
  shrink_z numeric not null check (shrink_z > 0 and shrink_z < 0.5),
  -- density of the printed green part with its binder, g/cm³
  green_density_g_cm3 numeric not null check (green_density_g_cm3 > 0),
  sintered_density_g_cm3 numeric not null check (sintered_density_g_cm3 > 0),
  theoretical_density_g_cm3 numeric not null check (theoretical_density_g_cm3 > 0),
  solids_loading numeric not null check (solids_loading > 0 and solids_loading < 1), -- powder volume fraction
  binder_density_g_cm3 numeric not null default 0.95 check (binder_density_g_cm3 > 0),
  wash_k_min_per_mm2 numeric not null check (wash_k_min_per_mm2 > 0), -- t = k·h² + t_min
  wash_min_minutes numeric not null default 0 check (wash_min_minutes >= 0),
  min_mass_loss numeric not null check (min_mass_loss > 0 and min_mass_loss < 1),
  default_profile_id uuid references sinter_profiles(id),
  active boolean not null default true,
  created_at timestamptz not null default now(),
  updated_at timestamptz not null default now(),
  version integer not null default 1
);

create table sinter_profile_materials (
  profile_id uuid not null references sinter_profiles(id) on delete cascade,
  material_id uuid not null references materials(id) on delete cascade,
  primary key (profile_id, material_id)
);

create table printers (
  id uuid primary key default gen_random_uuid(),
  name text not null unique,
  model_note text not null default '',
  build_x_mm numeric not null check (build_x_mm > 0),
  build_y_mm numeric not null check (build_y_mm > 0),
  build_z_mm numeric not null check (build_z_mm > 0),
  deposition_cm3_per_h numeric not null check (deposition_cm3_per_h > 0),
  layer_height_mm numeric not null default 0.15 check (layer_height_mm > 0),
  layer_overhead_s numeric not null default 8 check (layer_overhead_s >= 0),
  active boolean not null default true,
  created_at timestamptz not null default now(),
  version integer not null default 1
);

create table printer_materials (
  printer_id uuid not null references printers(id) on delete cascade,
  material_id uuid not null references materials(id) on delete cascade,
  primary key (printer_id, material_id)
);

create table wash_stations (
  id uuid primary key default gen_random_uuid(),
  name text not null unique,
  solvent text not null,
  basket_x_mm numeric not null check (basket_x_mm > 0),
  basket_y_mm numeric not null check (basket_y_mm > 0),
  basket_z_mm numeric not null check (basket_z_mm > 0),
  capacity_units integer not null check (capacity_units > 0),
  max_load_g numeric not null check (max_load_g > 0),
  active boolean not null default true,
  created_at timestamptz not null default now(),
  version integer not null default 1
);

create table furnaces (
  id uuid primary key default gen_random_uuid(),
  name text not null unique,
  tray_x_mm numeric not null check (tray_x_mm > 0),
  tray_y_mm numeric not null check (tray_y_mm > 0),
  tray_count integer not null check (tray_count > 0),
  usable_height_mm numeric not null check (usable_height_mm > 0),
  max_load_g numeric not null check (max_load_g > 0),
  max_cool_rate_c_per_min numeric not null check (max_cool_rate_c_per_min > 0),
  active boolean not null default true,
  created_at timestamptz not null default now(),
  version integer not null default 1
);

create table furnace_profiles (
  furnace_id uuid not null references furnaces(id) on delete cascade,
  profile_id uuid not null references sinter_profiles(id) on delete cascade,
  primary key (furnace_id, profile_id)
);

create table maintenance_windows (
  id uuid primary key default gen_random_uuid(),
  resource resource_kind not null,
  printer_id uuid references printers(id) on delete cascade,
  wash_station_id uuid references wash_stations(id) on delete cascade,
  furnace_id uuid references furnaces(id) on delete cascade,
  starts_at timestamptz not null,
  ends_at timestamptz not null,
  reason text not null default '',
  created_at timestamptz not null default now(),
  version integer not null default 1,
  check (starts_at < ends_at),
  check (
    (resource = 'printer' and printer_id is not null and wash_station_id is null and furnace_id is null) or
    (resource = 'wash_station' and wash_station_id is not null and printer_id is null and furnace_id is null) or
    (resource = 'furnace' and furnace_id is not null and printer_id is null and wash_station_id is null)
  )
);
create index maintenance_windows_window_idx on maintenance_windows using gist (tstzrange(starts_at, ends_at));

-- Order book ---------------------------------------------------------------------------------

create table orders (
  id uuid primary key default gen_random_uuid(),
  code text not null unique, -- work order number shown on travelers
  customer text not null,
  project text not null default '',
  due_at timestamptz not null,
  priority integer not null default 3 check (priority between 1 and 5), -- 1 = most urgent
  notes text not null default '',
  created_at timestamptz not null default now(),
  updated_at timestamptz not null default now(),
  version integer not null default 1
);
create index orders_due_at_idx on orders (due_at);

create table files (
  id uuid primary key default gen_random_uuid(),
  kind file_kind not null,
  bucket text not null,
  object_key text not null unique,
  filename text not null,
  content_type text not null,
  size_bytes bigint not null check (size_bytes > 0),
  sha256 text not null,
  status file_status not null default 'queued',
  analysis jsonb, -- geometry results: triangles, bbox, area, volume, closed
  error text,
  uploaded_by uuid references users(id),
  created_at timestamptz not null default now(),
  updated_at timestamptz not null default now()
);

create table parts (
  id uuid primary key default gen_random_uuid(),
  order_id uuid not null references orders(id) on delete cascade,
  part_number text not null,
  revision text not null default 'A',
  name text not null,
  material_id uuid not null references materials(id),
  quantity integer not null check (quantity > 0),
  nominal_x_mm numeric not null check (nominal_x_mm > 0),
  nominal_y_mm numeric not null check (nominal_y_mm > 0),
  nominal_z_mm numeric not null check (nominal_z_mm > 0),
  volume_mm3 numeric check (volume_mm3 > 0), -- finished volume; from geometry when uploaded
  thickest_wall_mm numeric not null check (thickest_wall_mm > 0),
  -- finishing stock left on each face before scale-up, mm
  stock_x_neg_mm numeric not null default 0 check (stock_x_neg_mm >= 0),
  stock_x_pos_mm numeric not null default 0 check (stock_x_pos_mm >= 0),
  stock_y_neg_mm numeric not null default 0 check (stock_y_neg_mm >= 0),
  stock_y_pos_mm numeric not null default 0 check (stock_y_pos_mm >= 0),
  stock_z_neg_mm numeric not null default 0 check (stock_z_neg_mm >= 0),
  stock_z_pos_mm numeric not null default 0 check (stock_z_pos_mm >= 0),
  finishing_notes text not null default '',
  target_ra_um numeric check (target_ra_um > 0),
  tolerance_um numeric check (tolerance_um > 0), -- ± value, or
  tolerance_grade text check (tolerance_grade ~ '^IT([0-9]|1[0-8])$'), -- ISO 286-1 grade
  geometry_file_id uuid references files(id) on delete set null,
  -- scale-up result kept current by the worker: green size per axis and the factors used
  green_x_mm numeric check (green_x_mm > 0),
  green_y_mm numeric check (green_y_mm > 0),
  green_z_mm numeric check (green_z_mm > 0),
  scale_factors jsonb,
  scaled_at timestamptz,
  created_at timestamptz not null default now(),
  updated_at timestamptz not null default now(),
  version integer not null default 1,
  unique (order_id, part_number, revision)
);
create index parts_order_id_idx on parts (order_id);
create index parts_material_id_idx on parts (material_id);

-- Bookings -------------------------------------------------------------------------------------

create table builds (
  id uuid primary key default gen_random_uuid(),
  code text not null unique,
  material_id uuid not null references materials(id),
  printer_id uuid references printers(id),
  material_lot text not null default '',
  state booking_state not null default 'draft',
  failed boolean not null default false,
  failure_reason text,
  starts_at timestamptz,
  ends_at timestamptz,
  est_minutes numeric check (est_minutes > 0),
  plate_layout jsonb, -- packer output: placements on the build plate
  scale_snapshot jsonb, -- factors the build was printed with
  notes text not null default '',
  created_by uuid references users(id),
  created_at timestamptz not null default now(),
  updated_at timestamptz not null default now(),
  version integer not null default 1,
  check (starts_at is null or ends_at is null or starts_at < ends_at),
  check (state in ('draft', 'cancelled') or (printer_id is not null and starts_at is not null and ends_at is not null)),
  constraint builds_no_overlap exclude using gist (printer_id with =, tstzrange(starts_at, ends_at) with &&)
    where (state in ('scheduled', 'running', 'complete'))
);
create index builds_window_idx on builds using gist (tstzrange(starts_at, ends_at));
create index builds_state_idx on builds (state);

create table wash_batches (
  id uuid primary key default gen_random_uuid(),
  code text not null unique,
  wash_station_id uuid references wash_stations(id),
  state booking_state not null default 'draft',
  starts_at timestamptz,
  ends_at timestamptz,
  est_minutes numeric check (est_minutes > 0),
  notes text not null default '',
  created_by uuid references users(id),
  created_at timestamptz not null default now(),
  updated_at timestamptz not null default now(),
  version integer not null default 1,
  check (starts_at is null or ends_at is null or starts_at < ends_at),
  check (state in ('draft', 'cancelled') or (wash_station_id is not null and starts_at is not null and ends_at is not null)),
  constraint wash_batches_no_overlap exclude using gist (wash_station_id with =, tstzrange(starts_at, ends_at) with &&)
    where (state in ('scheduled', 'running', 'complete'))
);
create index wash_batches_window_idx on wash_batches using gist (tstzrange(starts_at, ends_at));

create table furnace_runs (
  id uuid primary key default gen_random_uuid(),
  code text not null unique,
  furnace_id uuid references furnaces(id),
  profile_id uuid not null references sinter_profiles(id),
  state booking_state not null default 'draft',
  starts_at timestamptz,
  ends_at timestamptz,
  cycle_minutes numeric check (cycle_minutes > 0),
  tray_layout jsonb, -- packer output: trays and placements
  checklist jsonb, -- loading checklist answers, recorded at start
  loaded_at timestamptz,
  unloaded_at timestamptz,
  notes text not null default '',
  created_by uuid references users(id),
  created_at timestamptz not null default now(),
  updated_at timestamptz not null default now(),
  version integer not null default 1,
  check (starts_at is null or ends_at is null or starts_at < ends_at),
  check (state in ('draft', 'cancelled') or (furnace_id is not null and starts_at is not null and ends_at is not null)),
  constraint furnace_runs_no_overlap exclude using gist (furnace_id with =, tstzrange(starts_at, ends_at) with &&)
    where (state in ('scheduled', 'running', 'complete'))
);
create index furnace_runs_window_idx on furnace_runs using gist (tstzrange(starts_at, ends_at));

create table units (
  id uuid primary key default gen_random_uuid(),
  part_id uuid not null references parts(id) on delete cascade,
  serial text not null unique,
  state unit_state not null default 'planned',
  held_from unit_state, -- state to return to when released from on_hold
  hold_reason text,
  scrap_reason scrap_reason,
  scrap_note text,
  build_id uuid references builds(id) on delete set null,
  wash_batch_id uuid references wash_batches(id) on delete set null,
  furnace_run_id uuid references furnace_runs(id) on delete set null,
  green_mass_g numeric check (green_mass_g > 0),
  brown_mass_g numeric check (brown_mass_g > 0),
  sintered_mass_g numeric check (sintered_mass_g > 0),
  wash_passed boolean,
  state_changed_at timestamptz not null default now(),
  created_at timestamptz not null default now(),
  updated_at timestamptz not null default now(),
  version integer not null default 1,
  check (state <> 'scrapped' or scrap_reason is not null),
  check (state <> 'on_hold' or hold_reason is not null),
  check (brown_mass_g is null or green_mass_g is null or brown_mass_g <= green_mass_g)
);
create index units_part_id_idx on units (part_id);
create index units_state_idx on units (state);
create index units_build_id_idx on units (build_id);
create index units_wash_batch_id_idx on units (wash_batch_id);
create index units_furnace_run_id_idx on units (furnace_run_id);

create table inspections (
  id uuid primary key default gen_random_uuid(),
  unit_id uuid not null references units(id) on delete cascade,
  inspector_id uuid references users(id),
  -- as-printed green size and as-sintered size per axis, mm (either may be absent)
  green_x_mm numeric check (green_x_mm > 0),
  green_y_mm numeric check (green_y_mm > 0),
  green_z_mm numeric check (green_z_mm > 0),
  sintered_x_mm numeric check (sintered_x_mm > 0),
  sintered_y_mm numeric check (sintered_y_mm > 0),
  sintered_z_mm numeric check (sintered_z_mm > 0),
  ra_um numeric check (ra_um > 0),
  runout_mm numeric check (runout_mm >= 0),
  passed boolean not null,
  reason text,
  notes text not null default '',
  created_at timestamptz not null default now(),
  check (passed or reason is not null)
);
create index inspections_unit_id_idx on inspections (unit_id);
create index inspections_created_at_idx on inspections (created_at);

create table inspection_files (
  inspection_id uuid not null references inspections(id) on delete cascade,
  file_id uuid not null references files(id) on delete cascade,
  primary key (inspection_id, file_id)
);

-- Records ------------------------------------------------------------------------------------------

create table events (
  id bigserial primary key,
  entity text not null, -- 'unit', 'build', 'wash_batch', 'furnace_run', 'user', 'material', ...
  entity_id uuid,
  kind text not null, -- 'state', 'sign_in', 'role_change', 'schedule', ...
  from_state text,
  to_state text,
  actor_id uuid references users(id), -- null = the worker
  reason text,
  data jsonb,
  created_at timestamptz not null default now()
);
create index events_entity_idx on events (entity, entity_id, created_at);
create index events_created_at_idx on events (created_at);

create table notification_outbox (
  id uuid primary key default gen_random_uuid(),
  kind text not null, -- 'furnace_run_finished', 'ready_for_finishing', 'wash_done', 'build_finished', 'build_failed', 'invite', 'password_reset'
  subject_key text not null, -- what the message is about, e.g. 'furnace_run:<id>'
  recipient_id uuid references users(id) on delete cascade,
  recipient_email text not null,
  subject text not null,
  text_body text not null,
  html_body text not null,
  status outbox_status not null default 'pending',
  attempts integer not null default 0,
  last_error text,
  created_at timestamptz not null default now(),
  sent_at timestamptz,
  -- one message per kind, subject and recipient, however often a job repeats
  unique (kind, subject_key, recipient_email)
);
create index notification_outbox_pending_idx on notification_outbox (created_at) where status = 'pending';

-- Worker processes write here; /api/health reads the age of the newest beat.
create table worker_heartbeats (
  worker_id text primary key,
  host text not null,
  pid integer not null,
  started_at timestamptz not null default now(),
  beat_at timestamptz not null default now(),
  last_job_at timestamptz -- when the queue-driven heartbeat job last ran
);
