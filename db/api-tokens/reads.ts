import type { Executor } from "@/db/users/reads";
import type { ApiTokenRow } from "@/lib/auth/api-scopes";


const iso = (d: Date | null) => (d ? d.toISOString() : null);

/** Every token, newest first, never the hash. */
export async function listApiTokens(db: Executor, now = new Date()): Promise<ApiTokenRow[]> {
  const rows = await db
    .selectFrom("api_tokens as t")
    .innerJoin("users as u", "u.id", "t.created_by")
    .select(["t.id", "t.name", "t.token_hint", "t.scopes", "t.created_at", "u.name as created_by_name", "t.expires_at", "t.revoked_at", "t.last_used_at", "t.last_used_from", "t.rate_limit_per_minute"])
    .orderBy("t.created_at", "desc")
    .execute();
  return rows.map((r) => ({
    ...r,
    created_at: r.created_at.toISOString(),
    expires_at: iso(r.expires_at),
    revoked_at: iso(r.revoked_at),
    last_used_at: iso(r.last_used_at),
    status: r.revoked_at ? "revoked" : r.expires_at && r.expires_at <= now ? "expired" : "active",
  }));
}
