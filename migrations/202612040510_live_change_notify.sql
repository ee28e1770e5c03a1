-- Live updates: every change to a row the shop's screens show is announced on the channel
-- hearth_changes, so that every web process (each holds one LISTEN connection) can tell its open
-- pages what to refetch. NOTIFY is transactional: listeners hear it only after the commit, and
-- not at all after a rollback (https://www.postgresql.org/docs/16/sql-notify.html). Because the
-- database sends it, the worker's own transitions and every app instance are covered alike.
-- The payload carries ids and versions only (NOTIFY allows under 8000 bytes); identical payloads
-- within one transaction are folded into one by PostgreSQL itself.

-- One row: {"e": entity, "id": row id, "v": version}; an inspection names its unit instead of a
-- version (inspections are written once).
create function notify_hearth_row_change() returns trigger language plpgsql as $$
declare
  r record;
begin
  if tg_op = 'DELETE' then
    r := old;
  else
    r := new;
  end if;
  if tg_argv[0] = 'inspection' then
    perform pg_notify('hearth_changes', json_build_object('e', 'inspection', 'id', r.id, 'unit', r.unit_id)::text);
  else
    perform pg_notify('hearth_changes', json_build_object('e', tg_argv[0], 'id', r.id, 'v', r.version)::text);
  end if;
  return null;
end
$$;

-- Equipment and its set-up change the floor's lanes: one {"e": "equipment"} per statement.
create function notify_hearth_table_change() returns trigger language plpgsql as $$
begin
  perform pg_notify('hearth_changes', json_build_object('e', tg_argv[0])::text);
  return null;
end
$$;

create trigger builds_notify after insert or update or delete on builds for each row execute function notify_hearth_row_change('build');
create trigger wash_batches_notify after insert or update or delete on wash_batches for each row execute function notify_hearth_row_change('wash_batch');
create trigger furnace_runs_notify after insert or update or delete on furnace_runs for each row execute function notify_hearth_row_change('furnace_run');
create trigger units_notify after insert or update or delete on units for each row execute function notify_hearth_row_change('unit');
create trigger inspections_notify after insert or update or delete on inspections for each row execute function notify_hearth_row_change('inspection');
create trigger maintenance_windows_notify after insert or update or delete on maintenance_windows for each row execute function notify_hearth_row_change('maintenance');

create trigger printers_notify after insert or update or delete on printers for each statement execute function notify_hearth_table_change('equipment');
create trigger printer_materials_notify after insert or update or delete on printer_materials for each statement execute function notify_hearth_table_change('equipment');
create trigger wash_stations_notify after insert or update or delete on wash_stations for each statement execute function notify_hearth_table_change('equipment');
create trigger furnaces_notify after insert or update or delete on furnaces for each statement execute function notify_hearth_table_change('equipment');
create trigger furnace_profiles_notify after insert or update or delete on furnace_profiles for each statement execute function notify_hearth_table_change('equipment');

-- The batching board's counterpart of floor_change_seq (migration 202612012302): it moves on
-- every change to what the board shows, so one load of the board serves every open board until
-- then. Builds are left out: a booked or moved build changes nothing on the board (its units
-- reach the board when they turn green, a change to units).
create sequence board_change_seq;

create function bump_board_change() returns trigger language plpgsql as $$
begin
  perform nextval('board_change_seq');
  return null;
end
$$;

create trigger units_board_change after insert or update or delete on units for each statement execute function bump_board_change();
create trigger wash_batches_board_change after insert or update or delete on wash_batches for each statement execute function bump_board_change();
create trigger furnace_runs_board_change after insert or update or delete on furnace_runs for each statement execute function bump_board_change();
create trigger orders_board_change after insert or update or delete on orders for each statement execute function bump_board_change();
create trigger parts_board_change after insert or update or delete on parts for each statement execute function bump_board_change();
create trigger wash_stations_board_change after insert or update or delete on wash_stations for each statement execute function bump_board_change();
create trigger furnaces_board_change after insert or update or delete on furnaces for each statement execute function bump_board_change();
create trigger furnace_profiles_board_change after insert or update or delete on furnace_profiles for each statement execute function bump_board_change();
create trigger sinter_profiles_board_change after insert or update or delete on sinter_profiles for each statement execute function bump_board_change();
create trigger materials_board_change after insert or update or delete on materials for each statement execute function bump_board_change();
create trigger shop_settings_board_change after insert or update or delete on shop_settings for each statement execute function bump_board_change();
create trigger maintenance_windows_board_change after insert or update or delete on maintenance_windows for each statement execute function bump_board_change();
