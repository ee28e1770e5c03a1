-- A counter that moves whenever anything the floor shows changes, so the floor's window can be
-- served from a short-lived cache and still never outlive a change. Sequences never block and
-- are not rolled back, so a bump costs no lock and at worst a needless reload.
create sequence floor_change_seq;

create function bump_floor_change() returns trigger language plpgsql as $$
begin
  perform nextval('floor_change_seq');
  return null;
end
$$;

create trigger builds_floor_change after insert or update or delete on builds for each statement execute function bump_floor_change();
create trigger wash_batches_floor_change after insert or update or delete on wash_batches for each statement execute function bump_floor_change();
create trigger furnace_runs_floor_change after insert or update or delete on furnace_runs for each statement execute function bump_floor_change();
create trigger maintenance_windows_floor_change after insert or update or delete on maintenance_windows for each statement execute function bump_floor_change();
create trigger printers_floor_change after insert or update or delete on printers for each statement execute function bump_floor_change();
create trigger printer_materials_floor_change after insert or update or delete on printer_materials for each statement execute function bump_floor_change();
create trigger wash_stations_floor_change after insert or update or delete on wash_stations for each statement execute function bump_floor_change();
create trigger furnaces_floor_change after insert or update or delete on furnaces for each statement execute function bump_floor_change();
create trigger furnace_profiles_floor_change after insert or update or delete on furnace_profiles for each statement execute function bump_floor_change();
create trigger materials_floor_change after insert or update or delete on materials for each statement execute function bump_floor_change();
create trigger sinter_profiles_floor_change after insert or update or delete on sinter_profiles for each statement execute function bump_floor_change();
