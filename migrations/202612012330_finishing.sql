-- Finishing and inspection: the machinist records the finished size beside the as-sintered
-- size, says where the green size came from, and the runout-against-stock check is kept with
-- the record. Calibration reads inspections; an admin may leave a bad measurement out of it.

create type green_size_source as enum ('measured', 'planned');
create type length_axis as enum ('x', 'y', 'z');

alter table inspections
  -- finished size after grinding or machining, mm
  add column finished_x_mm numeric check (finished_x_mm > 0),
  add column finished_y_mm numeric check (finished_y_mm > 0),
  add column finished_z_mm numeric check (finished_z_mm > 0),
  -- 'planned' = the scaled-up size the part was printed to, not a measurement of the green part
  add column green_source green_size_source not null default 'measured',
  -- runout (TIR) was measured on a diameter across this axis
  add column runout_axis length_axis,
  -- the runout-against-stock check as shown to the inspector when the record was saved
  add column stock_check jsonb,
  -- the unit system the values were typed in (they are stored in mm and µm)
  add column entered_units unit_system not null default 'mm',
  add column excluded_from_calibration boolean not null default false,
  add column exclusion_reason text,
  add column excluded_by uuid references users(id),
  add constraint inspections_exclusion_reason_check check (not excluded_from_calibration or exclusion_reason is not null);

-- Calibration reads a material's inspections in time order.
create index inspections_calibration_idx on inspections (created_at) where not excluded_from_calibration;

-- users.calendar_token holds a sha-256 of the feed secret; the secret itself is shown once.
alter table users add column calendar_token_created_at timestamptz;

-- The unit page gathers every event of a unit and of the bookings it passed through.
create index events_kind_created_at_idx on events (kind, created_at);
