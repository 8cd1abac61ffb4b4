/** A person's own alert settings (the Profile page). */
import type { Db } from '../../db.js';
import type { AlertSettings } from '../../schemas/alerts.js';
import { audit } from '../audit.js';

export async function alertSettings(db: Db, userId: number): Promise<AlertSettings> {
  const row = await db('users').where('id', userId).first('release_alerts');
  return { releaseAlerts: Boolean(row?.release_alerts) };
}

export async function updateAlertSettings(db: Db, userId: number, change: AlertSettings, ip?: string): Promise<AlertSettings> {
  await db('users').where('id', userId).update({ release_alerts: change.releaseAlerts });
  await audit(db, { actorId: userId, action: 'alerts.settings', targetType: 'user', targetId: userId, details: change, ip });
  return alertSettings(db, userId);
}
