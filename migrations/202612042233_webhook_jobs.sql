-- Outgoing webhooks move onto a pg-boss queue ("deliver-webhook"). The triggers of
-- 202612042108_webhooks.sql still write the webhook_events row and one webhook_deliveries row per
-- subscribed endpoint inside the changing transaction; now they also write each delivery's
-- pg-boss job in that same transaction, so a rolled-back change leaves neither a delivery nor a
-- job, and a committed one always has its job. pg-boss retries a failed attempt with its own
-- exponential back-off (retryLimit, retryDelay, retryBackoff, set on the queue by the worker).
--
-- pg-boss's send() (and its `db` option, which the TypeScript paths use) cannot be called from a
-- PL/pgSQL trigger, and the triggers fire for every writer of `events` and `orders`, not only the
-- app's code. So send_webhook_job() runs the INSERT that pg-boss 10.4.2's send() runs
-- (node_modules/pg-boss/src/plans.js, insertJob) with no per-job options, taking retries, expiry,
-- retention and policy from the queue row exactly as that INSERT does. It is tied to pg-boss 10's
-- schema (pgboss.job, pgboss.queue); package.json pins pg-boss, and
-- tests/integrations/webhook-jobs.db.test.ts compares its row with one made by send().
--
-- Before any worker has created the queue (a fresh database whose worker never started), there is
-- no partition of pgboss.job to write to: the delivery is then kept without a job (job_id null),
-- with a warning, and the worker sends its job when it starts and at each sweep (db/jobs/webhooks.ts).

-- The delivery claim pump and its lease are gone: one active pg-boss job per delivery replaces them.
drop index if exists webhook_deliveries_due_idx;
alter table webhook_deliveries drop column lease_until;
-- The pg-boss job that was last sent for this delivery, or that is sending it now.
alter table webhook_deliveries add column job_id uuid;
create index webhook_deliveries_unqueued_idx on webhook_deliveries (created_at) where job_id is null and state = 'pending';
comment on column webhook_deliveries.next_attempt_at is
  'After a failed attempt: the earliest time pg-boss retries it (its back-off adds up to as much again at random).';

create function send_webhook_job(p_delivery uuid) returns uuid
language plpgsql as $$
declare
  job uuid;
begin
  if to_regclass('pgboss.queue') is null or not exists (select 1 from pgboss.queue where name = 'deliver-webhook') then
    raise warning 'pg-boss queue deliver-webhook does not exist yet; webhook delivery % waits for the worker to start', p_delivery;
    return null;
  end if;
  insert into pgboss.job (id, name, data, priority, start_after, singleton_key, singleton_on, dead_letter, expire_in, keep_until, retry_limit, retry_delay, retry_backoff, policy)
  select
    gen_random_uuid(),
    q.name,
    jsonb_build_object('delivery_id', p_delivery),
    0,
    now(),
    null,
    null,
    q.dead_letter,
    case when q.expire_seconds is not null then q.expire_seconds * interval '1s' else interval '15 minutes' end,
    now() + cast(coalesce((q.retention_minutes * 60)::text, '14 days') as interval),
    coalesce(q.retry_limit, 2),
    case when coalesce(q.retry_backoff, false) then greatest(q.retry_delay, 1) else coalesce(q.retry_delay, 0) end,
    coalesce(q.retry_backoff, false),
    q.policy
  from pgboss.queue q
  where q.name = 'deliver-webhook'
  returning id into job;
  update webhook_deliveries set job_id = job where id = p_delivery;
  return job;
end $$;

-- As in 202612042108_webhooks.sql, and each new delivery gets its job in the same transaction.
create or replace function queue_webhook_event(p_type text, p_entity text, p_entity_id uuid, p_data jsonb) returns void
language plpgsql as $$
declare
  ev uuid;
  d record;
begin
  if not exists (select 1 from webhook_endpoints where active and paused_at is null and (p_type = any(events) or '*' = any(events))) then
    return;
  end if;
  insert into webhook_events (type, entity, entity_id, payload)
  values (p_type, p_entity, p_entity_id, jsonb_build_object('entity', p_entity, 'id', p_entity_id) || coalesce(p_data, '{}'::jsonb))
  returning id into ev;
  for d in
    insert into webhook_deliveries (event_id, endpoint_id)
    select ev, e.id from webhook_endpoints e
    where e.active and e.paused_at is null and (p_type = any(e.events) or '*' = any(e.events))
    returning id
  loop
    perform send_webhook_job(d.id);
  end loop;
end $$;
