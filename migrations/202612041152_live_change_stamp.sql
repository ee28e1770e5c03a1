-- A stamp for the shared reads that every open page asks for again after each change it hears of
-- (the unscheduled builds, a unit's trace): live_change_seq moves with every announcement on
-- hearth_changes (migration 202612040510), so a web process may serve one load of such a read to
-- every page until the next announcement, and another instance that has not yet heard of a change
-- still sees the stamp move and loads afresh. Like floor_change_seq, a sequence never blocks and
-- is not rolled back: a bump costs no lock and at worst a needless reload.
--
-- The announcement of a booking (build, wash batch, furnace run) or a unit also names its state
-- ("s"): a page listing draft builds then refetches only when a build becomes, stays or stops
-- being a draft (its id is on the list, or "s" is "draft"), not on every move of a booked build;
-- and a web process keeps its list of units waiting for a wash while a wash batch only moves in
-- time and while only units not yet printed change (a build booked or moved with its units).
create sequence live_change_seq;

create or replace function notify_hearth_row_change() returns trigger language plpgsql as $$
declare
  r record;
begin
  if tg_op = 'DELETE' then
    r := old;
  else
    r := new;
  end if;
  perform nextval('live_change_seq');
  if tg_argv[0] = 'inspection' then
    perform pg_notify('hearth_changes', json_build_object('e', 'inspection', 'id', r.id, 'unit', r.unit_id)::text);
  elsif tg_argv[0] in ('build', 'wash_batch', 'furnace_run', 'unit') then
    perform pg_notify('hearth_changes', json_build_object('e', tg_argv[0], 'id', r.id, 'v', r.version, 's', r.state)::text);
  else
    perform pg_notify('hearth_changes', json_build_object('e', tg_argv[0], 'id', r.id, 'v', r.version)::text);
  end if;
  return null;
end
$$;

create or replace function notify_hearth_table_change() returns trigger language plpgsql as $$
begin
  perform nextval('live_change_seq');
  perform pg_notify('hearth_changes', json_build_object('e', tg_argv[0])::text);
  return null;
end
$$;

-- The batching board's costliest part, the units waiting for a wash with every one's projection
-- (db/batches/reads.ts), is kept per its own stamp: waiting_wash_seq moves with everything that
-- list shows (green units, their parts, orders and materials, the sinter profiles and furnaces that
-- give the furnace step's length, a furnace run that holds a unit, the shop's settings) and with
-- a wash batch's state (a batch that completes or is cancelled gives its units back to the list),
-- but not when a booked wash batch only moves to another slot.
create sequence waiting_wash_seq;

create function bump_waiting_wash() returns trigger language plpgsql as $$
begin
  perform nextval('waiting_wash_seq');
  return null;
end
$$;

-- Only a unit that is or was green can be on the list (a build booked or moved changes its
-- planned units, and that must not reload the list).
create trigger units_waiting_wash_insert after insert on units for each row when (new.state = 'green') execute function bump_waiting_wash();
create trigger units_waiting_wash_update after update on units for each row when (old.state = 'green' or new.state = 'green') execute function bump_waiting_wash();
create trigger units_waiting_wash_delete after delete on units for each row when (old.state = 'green') execute function bump_waiting_wash();
create trigger parts_waiting_wash after insert or update or delete on parts for each statement execute function bump_waiting_wash();
create trigger orders_waiting_wash after insert or update or delete on orders for each statement execute function bump_waiting_wash();
create trigger materials_waiting_wash after insert or update or delete on materials for each statement execute function bump_waiting_wash();
create trigger sinter_profiles_waiting_wash after insert or update or delete on sinter_profiles for each statement execute function bump_waiting_wash();
create trigger sinter_profile_segments_waiting_wash after insert or update or delete on sinter_profile_segments for each statement execute function bump_waiting_wash();
create trigger furnaces_waiting_wash after insert or update or delete on furnaces for each statement execute function bump_waiting_wash();
create trigger furnace_profiles_waiting_wash after insert or update or delete on furnace_profiles for each statement execute function bump_waiting_wash();
create trigger furnace_runs_waiting_wash after insert or update or delete on furnace_runs for each statement execute function bump_waiting_wash();
create trigger shop_settings_waiting_wash after insert or update or delete on shop_settings for each statement execute function bump_waiting_wash();
create trigger wash_batches_waiting_wash_rows after insert or delete on wash_batches for each statement execute function bump_waiting_wash();
create trigger wash_batches_waiting_wash_state after update on wash_batches for each row when (old.state is distinct from new.state) execute function bump_waiting_wash();
