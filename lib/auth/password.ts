import { hash, verify } from "@node-rs/argon2";

// argon2id with the RFC 9106 "second recommended" memory-constrained parameters (64 MiB, t=3, p=4).
const OPTIONS = { algorithm: 2 /* Argon2id */, memoryCost: 65536, timeCost: 3, parallelism: 4 } as const;

export function hashPassword(password: string): Promise<string> {
  return hash(password, OPTIONS);
}

/** Constant-time comparison happens inside argon2's verify. A malformed hash is a mismatch. */
export async function verifyPassword(passwordHash: string, password: string): Promise<boolean> {
  try {
    return await verify(passwordHash, password);
  } catch {
    return false;
  }
}
