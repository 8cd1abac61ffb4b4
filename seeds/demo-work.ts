/**
 * The demo workspace's own work, so that a first visit has something to look at: three studies,
 * a shared board, one published exhibit and one draft. Made through the services, as people would.
 */
import type { Config } from '../server/config.js';
import type { Db } from '../server/db.js';
import type { Mailer } from '../server/mail/mailer.js';
import { loadUser } from '../server/services/people/users.js';
import { addPanel, createBoard } from '../server/services/boards.js';
import { createExhibit } from '../server/services/exhibits/drafts.js';
import { transition } from '../server/services/exhibits/review.js';
import { createStudy } from '../server/services/studies/studies.js';

export async function seedDemoWork(db: Db, people: Record<string, number>, config: Config) {
  const economist = (await loadUser(db, people['economist@demo.test']))!;
  const editor = (await loadUser(db, people['editor@demo.test']))!;
  const id = async (code: string) => (await db('series').where('code', code).first()).id as number;
  const gap = await createStudy(db, economist, { title: 'Estuary output gap, Hodrick–Prescott', seriesId: await id('EST_GDP_REAL'), vintage: 'latest', transform: 'log100', method: 'hp', params: { lambda: 1600 }, notes: 'The conventional quarterly smoothing parameter.' });
  const hamilton = await createStudy(db, economist, { title: 'Estuary output gap, Hamilton filter', seriesId: await id('EST_GDP_REAL'), vintage: 'latest', transform: 'log100', method: 'hamilton', params: {} });
  const credit = await createStudy(db, economist, { title: 'Estuary credit-to-GDP gap', seriesId: await id('EST_CREDIT_GDP'), vintage: 'latest', transform: 'none', method: 'hp-one-sided', params: { lambda: 400000 }, notes: 'One-sided HP with λ = 400 000, as in the countercyclical buffer guidance.' });
  const board = await createBoard(db, economist, { title: 'Estuary cyclical monitor', description: 'The gaps the team follows each quarter (invented demo data).', visibility: 'team' });
  const p1 = await addPanel(db, economist, board.id, { title: 'Output gap', studyIds: [gap.id], width: 1, height: 'm' });
  await addPanel(db, economist, board.id, { title: 'Credit-to-GDP gap', studyIds: [credit.id], width: 1, height: 'm' });
  await addPanel(db, economist, board.id, { title: 'Two estimates of the output gap', studyIds: [gap.id, hamilton.id], compareBy: 'methods', width: 2, height: 'm' });
  await addPanel(db, economist, board.id, { title: 'The output gap across vintages', studyIds: [gap.id], compareBy: 'vintages', vintages: [1, 2, 3, 4], width: 2, height: 's' });
  const quiet: Mailer = { enabled: false, send: async () => false };
  const deps = { db, config, mailer: quiet };
  const published = await createExhibit(deps, economist, { studyId: gap.id, title: 'The output gap of Estuary', subtitle: 'Real GDP, deviation from its Hodrick–Prescott trend' });
  await transition(deps, economist, published.id, 'in_review', undefined);
  await transition(deps, editor, published.id, 'approved', 'Clear and correctly stamped.');
  await transition(deps, editor, published.id, 'published', undefined);
  await createExhibit(deps, economist, { panelId: p1.id, title: 'Output gap for the next report (draft)' });
  // On the release history (84 vintages): the real-time revision analysis has something to show.
  await createStudy(db, economist, { title: 'Estuary output gap in real time, 84 releases', seriesId: await id('EST_GDP_RT'), vintage: 'latest', transform: 'log100', method: 'hp', params: { lambda: 1600 }, notes: 'Open “Real-time revisions”: every release of real GDP since 2004 (invented demo data).' });
}
