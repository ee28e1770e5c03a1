-- A stamp for the shared reads that every open page asks for again after each change it hears of
-- (the unscheduled builds, a unit's trace): live_change_seq moves with every announcement on
-- hearth_changes (migration 202612040510), so a web process may serve one load of such a read to
-- every page until the next announcement, and another instance that has not yet heard of a change
-- still sees the stamp move and loads afresh. Like floor_change_seq, a sequence never blocks and
-- is not rolled back: a bump costs no lock and at worst a needless reload.
--
-- A build's announcement also names its state ("s"): a page listing draft builds then refetches
-- only when a build becomes, stays or stops being a draft (its id is on the list, or "s" is
-- "draft"), not on every move of a booked build.
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
  elsif tg_argv[0] = 'build' then
    perform pg_notify('hearth_changes', json_build_object('e', 'build', 'id', r.id, 'v', r.version, 's', r.state)::text);
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
