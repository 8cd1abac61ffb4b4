/** Password hashing with argon2id (@node-rs/argon2, OWASP's recommended parameters: 19 MiB, t = 2). */
import { randomBytes } from 'node:crypto';
import { hash, verify } from '@node-rs/argon2';

const ARGON2ID = 2; // Algorithm.Argon2id (a const enum, which isolated modules cannot import)
const OPTIONS = { algorithm: ARGON2ID, memoryCost: 19456, timeCost: 2, parallelism: 1 } as const;

export function hashPassword(password: string): Promise<string> {
  return hash(password, OPTIONS as never);
}

export async function verifyPassword(stored: string | null, password: string): Promise<boolean> {
  if (!stored) {
    // Spend the same time on an unknown account as on a wrong password.
    dummyHash ??= hashPassword(randomBytes(24).toString('base64'));
    await verify(await dummyHash, password).catch(() => false);
    return false;
  }
  try {
    return await verify(stored, password);
  } catch {
    return false;
  }
}

// An argon2id hash of a random string nobody knows; only used to even out timing.
let dummyHash: Promise<string> | undefined;
