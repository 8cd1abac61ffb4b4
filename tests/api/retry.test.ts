/**
 * Whole-transaction retries (server/lib/retry.ts) against real InnoDB deadlocks on the test
 * MariaDB: a deadlock is the same error (1213) that a Galera certification conflict raises, so
 * the same path is exercised here on one server and, across nodes, in tests/cluster/.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { HttpError } from '../../server/lib/errors.js';
import { transaction } from '../../server/lib/retry.js';
import { createTestDb, type TestDb } from '../helpers/db.js';

let t: TestDb;

beforeAll(async () => {
  t = await createTestDb();
  await t.db('settings').insert([
    { key: 'left', value: '0' },
    { key: 'right', value: '0' },
  ]);
});

afterAll(async () => {
  await t.drop();
});

/**
 * Two transactions lock the rows `left` and `right` in opposite orders, each waiting for the
 * other to hold its first row: InnoDB must pick a victim (ER_LOCK_DEADLOCK).
 */
function crossedWriters(attempts: number) {
  const tries = { a: 0, b: 0 };
  let firstLocks = 0;
  let bothLocked!: () => void;
  const barrier = new Promise<void>((resolve) => (bothLocked = resolve));
  const writer = (name: 'a' | 'b', first: string, second: string) =>
    transaction(
      t.db,
      async (trx) => {
        tries[name]++;
        await trx('settings').where('key', first).update({ value: trx.raw('value + 1') });
        if (tries[name] === 1) {
          if (++firstLocks === 2) bothLocked();
          await barrier;
        }
        await trx('settings').where('key', second).update({ value: trx.raw('value + 1') });
        return name;
      },
      { attempts, baseDelayMs: 5 },
    );
  return { tries, run: Promise.allSettled([writer('a', 'left', 'right'), writer('b', 'right', 'left')]) };
}

const values = async () => Object.fromEntries((await t.db('settings').whereIn('key', ['left', 'right']).select('key', 'value')).map((r) => [r.key, Number(r.value)]));

describe('transaction() with retries', () => {
  it('runs the deadlock victim again as a whole, so both writers land exactly once', async () => {
    const before = await values();
    const { tries, run } = crossedWriters(5);
    const results = await run;
    expect(results.map((r) => r.status)).toEqual(['fulfilled', 'fulfilled']);
    // Exactly one of them lost the deadlock and ran a second time.
    expect(tries.a + tries.b).toBe(3);
    // The victim's first attempt left nothing: each writer added 1 to each row once.
    const after = await values();
    expect(after.left - before.left).toBe(2);
    expect(after.right - before.right).toBe(2);
  });

  it('answers 503 write_conflict with Retry-After when the attempts run out, and stores nothing of the loser', async () => {
    const before = await values();
    const { tries, run } = crossedWriters(1);
    const results = await run;
    const failed = results.filter((r): r is PromiseRejectedResult => r.status === 'rejected');
    expect(failed).toHaveLength(1);
    const error = failed[0].reason as HttpError;
    expect(error).toBeInstanceOf(HttpError);
    expect(error.status).toBe(503);
    expect(error.code).toBe('write_conflict');
    expect(error.headers?.['Retry-After']).toBe('1');
    expect(tries.a + tries.b).toBe(2);
    const after = await values();
    expect(after.left - before.left).toBe(1);
    expect(after.right - before.right).toBe(1);
  });

  it('does not retry other errors', async () => {
    let tries = 0;
    const attempt = transaction(t.db, async (trx) => {
      tries++;
      await trx('settings').insert({ key: 'left', value: '1' });
    });
    await expect(attempt).rejects.toMatchObject({ code: 'ER_DUP_ENTRY' });
    expect(tries).toBe(1);
  });
});
