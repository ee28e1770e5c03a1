-- Outgoing webhooks. A change writes its rows in `events` (or `orders`) inside its own
-- transaction; the triggers below turn the ones other programs care about into a webhook_events
-- row and one webhook_deliveries row per subscribed endpoint in that same transaction, so a
-- rolled-back change sends nothing and a committed one is never lost. The worker delivers them
-- afterwards, outside any transaction (worker/webhooks.ts).

create table webhook_endpoints (
  id uuid primary key default gen_random_uuid(),
  url text not null check (url ~ '^https?://' and length(url) <= 2000),
  description text not null default '' check (length(description) <= 200),
  -- event types, or '*' for all of them
  events text[] not null check (cardinality(events) > 0),
  -- the HMAC key; it must be kept in plain text to sign with (shown to the admin once)
  secret text not null,
  active boolean not null default true,
  -- set when deliveries kept failing for a day; cleared by an admin
  paused_at timestamptz,
  failing_since timestamptz,
  pause_mailed_at timestamptz,
  created_by uuid references users(id),
  created_at timestamptz not null default now(),
  version integer not null default 1
);

create table webhook_events (
  id uuid primary key default gen_random_uuid(),
  type text not null,
  entity text not null,
  entity_id uuid,
  payload jsonb not null,
  created_at timestamptz not null default now()
);
create index webhook_events_created_idx on webhook_events (created_at desc);

create type webhook_delivery_state as enum ('pending', 'sending', 'delivered', 'failed');

create table webhook_deliveries (
  id uuid primary key default gen_random_uuid(),
  event_id uuid not null references webhook_events(id) on delete cascade,
  endpoint_id uuid not null references webhook_endpoints(id) on delete cascade,
  state webhook_delivery_state not null default 'pending',
  attempts integer not null default 0,
  next_attempt_at timestamptz not null default now(),
  lease_until timestamptz,
  last_status integer,
  last_error text,
  delivered_at timestamptz,
  created_at timestamptz not null default now(),
  unique (event_id, endpoint_id)
);
create index webhook_deliveries_due_idx on webhook_deliveries (next_attempt_at) where state in ('pending', 'sending');

create table webhook_attempts (
  id bigserial primary key,
  delivery_id uuid not null references webhook_deliveries(id) on delete cascade,
  attempted_at timestamptz not null default now(),
  status integer,
  error text,
  duration_ms integer not null
);
create index webhook_attempts_delivery_idx on webhook_attempts (delivery_id, attempted_at);

-- Records one webhook event and queues it for every active, unpaused endpoint that wants it.
create function queue_webhook_event(p_type text, p_entity text, p_entity_id uuid, p_data jsonb) returns void
language plpgsql as $$
declare
  ev uuid;
begin
  if not exists (select 1 from webhook_endpoints where active and paused_at is null and (p_type = any(events) or '*' = any(events))) then
    return;
  end if;
  insert into webhook_events (type, entity, entity_id, payload)
  values (p_type, p_entity, p_entity_id, jsonb_build_object('entity', p_entity, 'id', p_entity_id) || coalesce(p_data, '{}'::jsonb))
  returning id into ev;
  insert into webhook_deliveries (event_id, endpoint_id)
  select ev, e.id from webhook_endpoints e
  where e.active and e.paused_at is null and (p_type = any(e.events) or '*' = any(e.events));
end $$;

create function events_to_webhooks() returns trigger
language plpgsql as $$
declare
  t text;
begin
  t := case
    when new.entity = 'build' and new.to_state = 'scheduled' and new.from_state is distinct from 'scheduled' then 'build.scheduled'
    when new.entity = 'build' and new.to_state = 'running' and new.from_state is distinct from 'running' then 'build.started'
    when new.entity = 'build' and new.to_state = 'complete' and new.from_state is distinct from 'complete' then 'build.finished'
    -- out of the furnace (by the worker at the run's end, or unloaded straight from running)
    when new.entity = 'furnace_run' and new.to_state = 'complete' and new.from_state = 'running' then 'furnace_run.finished'
    -- the operator recorded each unit's outcome after the run had already finished
    when new.entity = 'furnace_run' and new.kind = 'unload' then 'furnace_run.unloaded'
    when new.entity = 'unit' and new.kind = 'state' and new.to_state = 'ready_for_finishing' then 'unit.ready_for_finishing'
    when new.entity = 'unit' and new.kind = 'state' and new.to_state = 'scrapped' then 'unit.scrapped'
    when new.entity = 'unit' and new.kind = 'inspection' then 'inspection.recorded'
    else null
  end;
  if t is not null then
    perform queue_webhook_event(t, new.entity, new.entity_id, jsonb_build_object(
      'from_state', new.from_state, 'to_state', new.to_state, 'reason', new.reason, 'data', new.data,
      'actor_id', new.actor_id, 'at', new.created_at));
  end if;
  return null;
end $$;

create trigger events_to_webhooks after insert on events for each row execute function events_to_webhooks();

create function orders_to_webhooks() returns trigger
language plpgsql as $$
begin
  perform queue_webhook_event('order.created', 'order', new.id, jsonb_build_object(
    'code', new.code, 'customer', new.customer, 'due_at', new.due_at, 'priority', new.priority, 'at', new.created_at));
  return null;
end $$;

create trigger orders_to_webhooks after insert on orders for each row execute function orders_to_webhooks();
