// Reading a session cookie means unsealing it: two PBKDF2 key derivations, an HMAC check and an
// AES decryption. A page and its polling present the same cookie many times a minute, and what
// one exact sealed string holds never changes, so the answer is kept for a short while.
// Shared by proxy.ts and app/_server/session.ts (no next/* imports here).
import { unsealData } from "iron-session";
import { SESSION_IDLE_SECONDS, type SessionData } from "./session-config";

const KEEP_MS = 60_000;
const MAX_ENTRIES = 5_000;

type Entry = { password: string; data: SessionData; until: number };
const entries = new Map<string, Entry>();

/**
 * The session a sealed cookie holds; {} for an expired, tampered or foreign seal. Only a seal
 * that held a user is kept, so made-up cookies cannot crowd out real ones for long.
 */
export async function unsealSession(seal: string, password: string, now = Date.now()): Promise<SessionData> {
  const hit = entries.get(seal);
  if (hit && hit.password === password && hit.until > now) return { ...hit.data };
  const data = await unsealData<SessionData>(seal, { password, ttl: SESSION_IDLE_SECONDS });
  if (!data.userId) return data;
  // Map order is insertion order: the first key is the oldest entry.
  if (entries.size >= MAX_ENTRIES) entries.delete(entries.keys().next().value!);
  entries.set(seal, { password, data, until: now + KEEP_MS });
  return { ...data };
}
