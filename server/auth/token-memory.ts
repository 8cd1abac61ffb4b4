/**
 * What an instance remembers of the API tokens it has checked, so that a script reading many
 * series does not cost a database round trip per request for its token. Reads may use a check
 * for `ms` milliseconds; writes always ask the database, and any write through this instance (a
 * revocation, a role change, a deactivation, a password change) makes it forget every check at
 * once. A change made through another instance reaches reads here within `ms`. 0 remembers nothing.
 */
import { sha256 } from '../lib/secrets.js';
import type { PublicUser } from '../schemas/people.js';

export type TokenOwner = { user: PublicUser; tokenId: number };

/** At most this many tokens are remembered; the oldest check is dropped first. */
const MAX_TOKENS = 10_000;

export class TokenMemory {
  // Keyed by the token's hash, as stored: the secret itself is not kept.
  private readonly checked = new Map<string, { owner: TokenOwner; at: number }>();
  // A check begun before the last forget() may have read what the change replaced: not kept.
  private forgotAt = -Infinity;

  constructor(private readonly ms: number) {}

  /** The owner checked less than `ms` ago, or undefined. */
  recall(token: string): TokenOwner | undefined {
    if (this.ms <= 0 || this.checked.size === 0) return undefined;
    const key = sha256(token);
    const hit = this.checked.get(key);
    if (!hit) return undefined;
    if (performance.now() - hit.at < this.ms) return hit.owner;
    this.checked.delete(key);
    return undefined;
  }

  /** Keeps a check made at `at` (performance.now() before the database was asked). */
  keep(token: string, owner: TokenOwner, at: number) {
    if (this.ms <= 0 || at < this.forgotAt) return;
    const key = sha256(token);
    this.checked.delete(key);
    this.checked.set(key, { owner, at });
    if (this.checked.size > MAX_TOKENS) this.checked.delete(this.checked.keys().next().value!);
  }

  forget() {
    this.checked.clear();
    this.forgotAt = performance.now();
  }
}
