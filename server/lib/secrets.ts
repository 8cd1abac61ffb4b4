import { createHash, randomBytes } from 'node:crypto';

/** A URL-safe random secret of `bytes` bytes of entropy. */
export function randomToken(bytes = 32): string {
  return randomBytes(bytes).toString('base64url');
}

export function sha256(text: string | Buffer): string {
  return createHash('sha256').update(text).digest('hex');
}
