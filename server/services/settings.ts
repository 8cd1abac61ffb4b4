import type { Db } from '../db.js';
import { transaction } from '../lib/retry.js';
import { DEFAULT_SOURCE_WORDING } from '../schemas/charts/figure.js';
import { audit } from './audit.js';

export interface WorkspaceSettings {
  /** Published exhibits can be opened by anyone with the link, without signing in. */
  publicExhibitLinks: boolean;
  /** The institution's name on exhibits' figures (empty: none printed). */
  institutionName: string;
  /** The wording of exhibits' source line, with {sources} for the exhibit's sources. */
  sourceLineWording: string;
}

const DEFAULTS: WorkspaceSettings = { publicExhibitLinks: false, institutionName: '', sourceLineWording: DEFAULT_SOURCE_WORDING };

export async function getSettings(db: Db): Promise<WorkspaceSettings> {
  const rows = await db('settings').select('key', 'value');
  const out: WorkspaceSettings = { ...DEFAULTS };
  for (const r of rows) if (r.key in out) (out as unknown as Record<string, unknown>)[r.key] = JSON.parse(r.value);
  return out;
}

export async function updateSettings(db: Db, actorId: number, change: Partial<WorkspaceSettings>, ip?: string) {
  await transaction(db, async (trx) => {
    for (const [key, value] of Object.entries(change)) {
      await trx.raw('INSERT INTO settings (`key`, value, updated_at) VALUES (?, ?, NOW(3)) ON DUPLICATE KEY UPDATE value = VALUES(value), updated_at = NOW(3)', [key, JSON.stringify(value)]);
    }
    await audit(trx, { actorId, action: 'settings.update', targetType: 'settings', details: change, ip });
  });
  return getSettings(db);
}
