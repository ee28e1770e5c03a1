-- Feedstock changes are announced on hearth_changes like the floor's own rows (migration
-- 202612040510): a lot received, released, drawn from or counted, and a material's allowances,
-- change which scheduled builds will find their feedstock on the shelf, so an open floor
-- refetches its feedstock marks when they happen instead of polling for them.
create trigger feedstock_lots_notify after insert or update or delete on feedstock_lots for each row execute function notify_hearth_row_change('feedstock_lot');
create trigger materials_notify after insert or update or delete on materials for each row execute function notify_hearth_row_change('material');
