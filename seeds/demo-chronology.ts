/**
 * The demo's reference chronology (invented, like all demo data): started, as an editor would,
 * from the Harding–Pagan dates of the invented economy's real GDP, and kept as the staff's own.
 */
import type { Db } from '../server/db.js';
import { createChronology, hardingPaganTurns } from '../server/services/chronology.js';
import { loadUser } from '../server/services/people/users.js';

export async function seedDemoChronology(db: Db, people: Record<string, number>) {
  const editor = (await loadUser(db, people['editor@demo.test']))!;
  const gdp = (await db('series').where('code', 'EST_GDP_REAL').first())?.id as number | undefined;
  if (!gdp) return;
  const { turns } = await hardingPaganTurns(db, gdp, 'latest');
  await createChronology(db, editor, { name: 'Staff reference chronology (invented)', area: 'Estuary', notes: 'Started from the Harding–Pagan dates of real GDP; invented demo data.', turns });
}
