/** argon2id password hashing (@node-rs/argon2) with the OWASP Password Storage Cheat Sheet minimum (m = 19 MiB, t = 2, p = 1). */
import { hash, verify } from '@node-rs/argon2';

// Algorithm.Argon2id === 2 (a const enum that isolated modules cannot import).
const OPTIONS = { algorithm: 2, memoryCost: 19456, timeCost: 2, parallelism: 1 } as const;

export function hashPassword(password: string): Promise<string> {
  return hash(password, OPTIONS);
}

export async function verifyPassword(hashed: string, password: string): Promise<boolean> {
  try {
    return await verify(hashed, password);
  } catch {
    return false;
  }
}

/** A hash to verify against when the user does not exist, so timing does not tell. */
let dummy: Promise<string> | null = null;
export function dummyHash(): Promise<string> {
  dummy ??= hashPassword('not-a-real-password-' + Math.random());
  return dummy;
}
