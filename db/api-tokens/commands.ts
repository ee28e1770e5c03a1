import { sql } from "kysely";
import type { Executor } from "@/db/users/reads";
import { AppError } from "@/lib/errors";
import { RATE_WINDOW_SECONDS, hashApiToken, newApiToken, tokenHint, type CreateApiTokenInput } from "@/lib/auth/api-scopes";

/** Creates a token; the plain token is returned once and never stored. */
export async function insertApiToken(db: Executor, actorId: string, input: CreateApiTokenInput) {
  const token = newApiToken();
  return db.transaction().execute(async (trx) => {
    const row = await trx
      .insertInto("api_tokens")
      .values({
        name: input.name,
        token_hash: hashApiToken(token),
        token_hint: tokenHint(token),
        scopes: input.scopes,
        created_by: actorId,
        expires_at: input.expires_in_days ? sql<Date>`now() + make_interval(days => ${input.expires_in_days}::int)` : null,
        rate_limit_per_minute: input.rate_limit_per_minute,
      })
      .returning(["id", "name", "scopes", "expires_at", "created_at"])
      .executeTakeFirstOrThrow();
    await trx
      .insertInto("events")
      .values({ entity: "api_token", entity_id: row.id, kind: "api_token_created", actor_id: actorId, data: JSON.stringify({ name: row.name, scopes: row.scopes }) })
      .execute();
    return { token, id: row.id, name: row.name, scopes: row.scopes, expires_at: row.expires_at?.toISOString() ?? null, created_at: row.created_at.toISOString() };
  });
}

/** Revokes a token; revoking one already revoked is a no-op, an unknown id a 404. */
export async function revokeApiToken(db: Executor, actorId: string, id: string) {
  return db.transaction().execute(async (trx) => {
    const row = await trx
      .updateTable("api_tokens")
      .set({ revoked_at: sql`coalesce(revoked_at, now())`, revoked_by: sql`coalesce(revoked_by, ${actorId}::uuid)` })
      .where("id", "=", id)
      .returning(["id", "revoked_at"])
      .executeTakeFirst();
    if (!row) throw new AppError("not_found", "No such API token.");
    await trx.insertInto("events").values({ entity: "api_token", entity_id: id, kind: "api_token_revoked", actor_id: actorId }).execute();
    return { id: row.id, revoked_at: row.revoked_at!.toISOString() };
  });
}

export type TokenUse = { id: string; created_by: string; scopes: string[]; over_limit: boolean; window_started_at: Date };

/**
 * One statement per request: finds a live token by its hash, stamps when and from where it was
 * used, and counts the request in the token's fixed one-minute window (the row lock serializes
 * concurrent requests of one token, so the count is exact). Undefined for an unknown, revoked or
 * expired token.
 */
export async function useApiToken(db: Executor, token: string, address: string): Promise<TokenUse | undefined> {
  const fresh = sql`window_started_at > now() - make_interval(secs => ${RATE_WINDOW_SECONDS})`;
  const row = await db
    .updateTable("api_tokens")
    .set({
      window_count: sql`case when ${fresh} then window_count + 1 else 1 end`,
      window_started_at: sql`case when ${fresh} then window_started_at else now() end`,
      last_used_at: sql`now()`,
      last_used_from: address,
    })
    .where("token_hash", "=", hashApiToken(token))
    .where("revoked_at", "is", null)
    .where((eb) => eb.or([eb("expires_at", "is", null), eb("expires_at", ">", sql<Date>`now()`)]))
    .returning(["id", "created_by", "scopes", "window_count", "window_started_at", "rate_limit_per_minute"])
    .executeTakeFirst();
  if (!row) return undefined;
  return { id: row.id, created_by: row.created_by, scopes: row.scopes, over_limit: row.window_count > row.rate_limit_per_minute, window_started_at: row.window_started_at! };
}
