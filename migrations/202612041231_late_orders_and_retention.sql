-- Two integration settings.
--
-- 1. "order.late" webhooks. The worker looks for orders whose due date has passed while units of
--    them are unfinished (db/orders/late.ts) and records one row here per order and due date: the
--    primary key makes the event fire once however many workers look, and a due date moved later
--    is a new row, so an order that becomes late again fires again.
create table order_late_notices (
  order_id uuid not null references orders(id) on delete cascade,
  -- the due date the order missed
  due_at timestamptz not null,
  noticed_at timestamptz not null default now(),
  primary key (order_id, due_at)
);

-- 2. How long the activity log keeps its events: days, or null to keep them for ever. The worker
--    prunes older ones daily (db/activity/commands.ts), except those other records still read.
alter table shop_settings
  add column activity_retention_days integer check (activity_retention_days between 30 and 3650);
