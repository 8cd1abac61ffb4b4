import type { Db } from '../server/db.js';

/** Seeds the demo workspace. Returns false when the database already holds people. */
export async function seedDemo(db: Db, { onlyIfEmpty }: { onlyIfEmpty: boolean }): Promise<boolean> {
  if (onlyIfEmpty) {
    const [{ n }] = await db('users').count({ n: '*' });
    if (Number(n) > 0) return false;
  }
  return true;
}
