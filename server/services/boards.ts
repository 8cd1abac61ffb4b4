/**
 * Boards: pages of panels an economist composes and shares with the team (or keeps private).
 * A panel shows one study, or compares several studies across methods or series, or one study
 * across vintages. Panels that follow "latest" say when a newer vintage was loaded.
 */
import type { Knex } from 'knex';
import type { Db } from '../db.js';
import { badRequest, conflict, forbidden, notFound } from '../lib/errors.js';
import type { PublicUser } from '../schemas/people.js';
import type { Board, Panel, PanelBody, PanelData } from '../schemas/boards.js';
export type { Board, Panel, PanelData };
import type { Study, StudyResult } from '../schemas/studies.js';
import { computeSpec, rangeStudyResult } from './studies/results.js';
import type { AnalysisPool } from '../workers/pool.js';
import { getStudy } from './studies/studies.js';
import { transaction } from '../lib/retry.js';

const iso = (d: Date | string) => new Date(d).toISOString();

function toBoard(r: Record<string, any>): Board {
  return { id: r.id, title: r.title, description: r.description, visibility: r.visibility, owner: { id: r.owner_id, name: r.owner_name }, createdAt: iso(r.created_at), updatedAt: iso(r.updated_at), panelCount: r.panel_count === undefined ? undefined : Number(r.panel_count) };
}

function toPanel(r: Record<string, any>): Panel {
  const ids = JSON.parse(r.study_ids) as number[];
  return {
    id: r.id,
    boardId: r.board_id,
    position: r.position,
    width: r.width === 2 ? 2 : 1,
    height: r.height,
    title: r.title,
    notes: r.notes,
    kind: ids.length > 1 || r.compare_by === 'vintages' ? 'compare' : 'study',
    studyIds: ids,
    compareBy: r.compare_by,
    vintages: r.vintages ? JSON.parse(r.vintages) : null,
    updatedAt: iso(r.updated_at),
  };
}

export async function listBoards(db: Db, user: PublicUser) {
  const rows = await db('boards as b')
    .join('users as u', 'u.id', 'b.owner_id')
    .leftJoin('board_panels as p', 'p.board_id', 'b.id')
    .where((w) => w.where('b.visibility', 'team').orWhere('b.owner_id', user.id))
    .groupBy('b.id', 'u.name')
    .orderBy('b.updated_at', 'desc')
    .select('b.*', 'u.name as owner_name', db.raw('COUNT(p.id) AS panel_count'));
  return rows.map(toBoard);
}

async function boardRow(db: Db | Knex.Transaction, id: number) {
  return db('boards as b').join('users as u', 'u.id', 'b.owner_id').where('b.id', id).first('b.*', 'u.name as owner_name');
}

/** A board the user may see (team boards, or their own private ones). */
export async function getBoard(db: Db, user: PublicUser, id: number) {
  const row = await boardRow(db, id);
  if (!row || (row.visibility === 'private' && row.owner_id !== user.id)) throw notFound('The board');
  const panels = (await db('board_panels').where('board_id', id).orderBy('position')).map(toPanel);
  return { ...toBoard(row), panels };
}

async function ownBoard(db: Db | Knex.Transaction, user: PublicUser, id: number) {
  const row = await boardRow(db, id);
  if (!row || (row.visibility === 'private' && row.owner_id !== user.id)) throw notFound('The board');
  if (row.owner_id !== user.id) throw forbidden('not_owner', `Only ${row.owner_name}, who composed this board, can change it.`);
  return row;
}

export async function createBoard(db: Db, user: PublicUser, body: { title: string; description?: string; visibility: 'private' | 'team' }) {
  const [id] = await db('boards').insert({ owner_id: user.id, title: body.title, description: body.description ?? null, visibility: body.visibility });
  return getBoard(db, user, id);
}

export async function updateBoard(db: Db, user: PublicUser, id: number, body: Partial<{ title: string; description: string; visibility: 'private' | 'team' }>) {
  await ownBoard(db, user, id);
  await db('boards').where('id', id).update({ ...body, updated_at: new Date() });
  return getBoard(db, user, id);
}

export async function deleteBoard(db: Db, user: PublicUser, id: number) {
  await ownBoard(db, user, id);
  const [{ n }] = await db('exhibits as e').join('board_panels as p', 'p.id', 'e.panel_id').where('p.board_id', id).whereIn('e.status', ['draft', 'in_review', 'returned']).count({ n: '*' });
  if (Number(n) > 0) throw conflict('board_in_use', 'An exhibit not yet published is drafted from a panel of this board; finish or delete it first.');
  await db('boards').where('id', id).delete();
}

async function checkStudies(db: Db, ids: number[], compareBy?: string | null) {
  const studies = [];
  for (const id of ids) studies.push(await getStudy(db, id));
  // A range study is a panel of its own: its chart is the range across its methods.
  const ranged = studies.find((s) => s.kind === 'range');
  if (ranged && (ids.length > 1 || compareBy === 'vintages')) {
    throw badRequest('range_study_alone', `"${ranged.title}" is a range study: it makes a panel on its own (the range across its methods), not compared with other studies or vintages. Give it a panel of its own.`, [{ path: 'studyIds', message: 'A range study is alone in its panel.' }]);
  }
  const frequencies = [...new Set(studies.map((s) => s.series.frequency))];
  if (frequencies.length > 1) {
    throw badRequest('mixed_frequencies', `These studies are on series of different frequencies (${studies.map((s) => `${s.series.code}: ${s.series.frequency}`).join(', ')}); a panel compares series of one frequency. Compare them on a common frequency in a study’s Compare view.`);
  }
}

/** A line's name: the method when the series are the same, the series when the methods are, both otherwise. */
function lineLabel(results: StudyResult[], r: StudyResult) {
  const method = r.methodLine.split(';')[0];
  const oneSeries = new Set(results.map((x) => x.series.id)).size === 1;
  const oneMethod = new Set(results.map((x) => x.methodLine.split(';')[0])).size === 1;
  return oneSeries ? method : oneMethod ? r.series.code : `${r.series.code} · ${method}`;
}

export async function addPanel(db: Db, user: PublicUser, boardId: number, body: PanelBody) {
  await checkStudies(db, body.studyIds, body.compareBy);
  return transaction(db, async (trx) => {
    await ownBoard(trx, user, boardId);
    await trx('boards').where('id', boardId).forUpdate().select('id');
    const [{ max }] = await trx('board_panels').where('board_id', boardId).max({ max: 'position' });
    const [id] = await trx('board_panels').insert({
      board_id: boardId,
      position: (max ?? -1) + 1,
      width: body.width,
      height: body.height,
      title: body.title,
      notes: body.notes ?? null,
      kind: body.studyIds.length > 1 || body.compareBy === 'vintages' ? 'compare' : 'study',
      study_ids: JSON.stringify(body.studyIds),
      compare_by: body.studyIds.length > 1 || body.compareBy === 'vintages' ? body.compareBy : null,
      vintages: body.vintages ? JSON.stringify(body.vintages) : null,
    });
    await trx('boards').where('id', boardId).update({ updated_at: new Date() });
    return toPanel(await trx('board_panels').where('id', id).first());
  });
}

async function panelOf(db: Db | Knex.Transaction, boardId: number, panelId: number) {
  const row = await db('board_panels').where({ id: panelId, board_id: boardId }).first();
  if (!row) throw notFound('The panel');
  return row;
}

export async function updatePanel(db: Db, user: PublicUser, boardId: number, panelId: number, body: Partial<PanelBody> & { compareBy?: string | null; vintages?: number[] | null }) {
  await ownBoard(db, user, boardId);
  const row = await panelOf(db, boardId, panelId);
  const ids = body.studyIds ?? JSON.parse(row.study_ids);
  const compareBy = body.compareBy === undefined ? row.compare_by : body.compareBy;
  if (body.studyIds || body.compareBy !== undefined) await checkStudies(db, ids, compareBy);
  if (ids.length > 1 && !compareBy) throw conflict('compare_by_required', 'Say what several studies are compared across (methods or series).');
  const change: Record<string, unknown> = { updated_at: new Date() };
  if (body.title !== undefined) change.title = body.title;
  if (body.notes !== undefined) change.notes = body.notes;
  if (body.width !== undefined) change.width = body.width;
  if (body.height !== undefined) change.height = body.height;
  if (body.studyIds !== undefined) change.study_ids = JSON.stringify(body.studyIds);
  if (body.compareBy !== undefined) change.compare_by = body.compareBy;
  if (body.vintages !== undefined) change.vintages = body.vintages ? JSON.stringify(body.vintages) : null;
  change.kind = ids.length > 1 || compareBy === 'vintages' ? 'compare' : 'study';
  await db('board_panels').where('id', panelId).update(change);
  await db('boards').where('id', boardId).update({ updated_at: new Date() });
  return toPanel(await db('board_panels').where('id', panelId).first());
}

export async function deletePanel(db: Db, user: PublicUser, boardId: number, panelId: number) {
  await ownBoard(db, user, boardId);
  await panelOf(db, boardId, panelId);
  const [{ n }] = await db('exhibits').where('panel_id', panelId).whereIn('status', ['draft', 'in_review', 'returned']).count({ n: '*' });
  if (Number(n) > 0) throw conflict('panel_in_use', 'An exhibit not yet published is drafted from this panel.');
  await db('board_panels').where('id', panelId).delete();
}

export async function reorderPanels(db: Db, user: PublicUser, boardId: number, panelIds: number[]) {
  await transaction(db, async (trx) => {
    await ownBoard(trx, user, boardId);
    const existing = (await trx('board_panels').where('board_id', boardId).forUpdate().select('id')).map((r) => r.id).sort();
    if (JSON.stringify([...panelIds].sort()) !== JSON.stringify(existing)) throw conflict('panels_changed', 'Send every panel of the board exactly once, in the new order.');
    for (let i = 0; i < panelIds.length; i++) await trx('board_panels').where('id', panelIds[i]).update({ position: i });
    await trx('boards').where('id', boardId).update({ updated_at: new Date() });
  });
  return getBoard(db, user, boardId);
}

// ------------------------------------------------------------------ panel data

export async function panelData(db: Db, panel: Panel, pool?: AnalysisPool): Promise<PanelData> {
  const studies = await Promise.all(panel.studyIds.map((id) => getStudy(db, id)));
  if (studies[0]?.kind === 'range') return rangePanel(db, panel, studies[0], pool);
  const lines: PanelData['lines'] = [];
  const results: StudyResult[] = [];
  if (panel.compareBy === 'vintages') {
    const s = studies[0];
    // Computed side by side (on the worker threads when slow), listed in the panel's order.
    const byVintage = await Promise.all((panel.vintages ?? []).map((v) => computeSpec(db, { ...s, vintage: v }, { pool })));
    for (const [k, v] of (panel.vintages ?? []).entries()) {
      const r = byVintage[k];
      results.push(r);
      lines.push({ label: `vintage ${v} (${r.asOf})`, studyId: s.id, periods: r.periods, values: r.cycle, vintage: v, methodLine: r.methodLine });
    }
  } else {
    results.push(...(await Promise.all(studies.map((s) => computeSpec(db, s, { pool })))));
    studies.forEach((s, k) => {
      const r = results[k];
      const label = panel.kind === 'compare' ? lineLabel(results, r) : s.title;
      lines.push({ label, studyId: s.id, periods: r.periods, values: r.cycle, vintage: r.vintage, methodLine: r.methodLine });
    });
    if (new Set(results.map((r) => r.frequency)).size > 1) throw conflict('mixed_frequencies', 'This panel compares series of different frequencies; change its studies so that they share one frequency.');
  }
  const freshness = await freshnessOf(db, panel, studies);
  const seriesSeen = new Map<number, PanelData['series'][number]>();
  for (const r of results) seriesSeen.set(r.series.id, { id: r.series.id, code: r.series.code, title: r.series.title, unit: r.series.unit, source: r.series.source });
  return {
    panelId: panel.id,
    kind: panel.kind,
    compareBy: panel.compareBy,
    lines,
    result: panel.kind === 'study' ? results[0] : undefined,
    unit: [...new Set(results.map((r) => r.unitOfCycle))].join(' · '),
    endOfSamplePeriods: Math.max(0, ...results.map((r) => r.endOfSamplePeriods)),
    cautions: results[0]?.cautions ?? [],
    methodLines: [...new Set(results.map((r) => r.methodLine))],
    vintageStamps: [...new Set(results.map((r) => `${r.series.code}: ${r.vintageStamp}`))],
    series: [...seriesSeen.values()],
    studies,
    freshness,
  };
}

export async function getPanel(db: Db, user: PublicUser, boardId: number, panelId: number) {
  await getBoard(db, user, boardId);
  return toPanel(await panelOf(db, boardId, panelId));
}

/** A panel found by id alone (for exhibits drafted from a panel), with its board's visibility checked. */
export async function panelById(db: Db, user: PublicUser, panelId: number) {
  const row = await db('board_panels').where('id', panelId).first();
  if (!row) throw notFound('The panel');
  await getBoard(db, user, row.board_id);
  return toPanel(row);
}

/** For studies that follow "latest": the newest vintage and whether it was loaded since the panel last changed. */
async function freshnessOf(db: Db, panel: Panel, studies: Study[]) {
  const freshness = [];
  for (const s of studies) {
    if (s.vintage !== 'latest' || s.asOf || panel.compareBy === 'vintages') continue;
    const v = await db('vintages').where('series_id', s.seriesId).orderBy('number', 'desc').first();
    if (v) {
      freshness.push({
        studyId: s.id,
        code: s.series.code,
        vintage: v.number,
        asOf: new Date(v.as_of).toISOString().slice(0, 10),
        loadedAt: iso(v.created_at),
        newSincePanel: new Date(v.created_at).getTime() > new Date(panel.updatedAt).getTime(),
      });
    }
  }
  return freshness;
}

/** A panel of one range study: the range across its methods, its methods' cycles as the lines. */
async function rangePanel(db: Db, panel: Panel, s: Study, pool: AnalysisPool | undefined): Promise<PanelData> {
  const r = await rangeStudyResult(db, pool, s);
  const series = { id: r.series.id, code: r.series.code, title: r.series.title, unit: r.series.unit, source: r.series.source };
  return {
    panelId: panel.id,
    kind: panel.kind,
    compareBy: panel.compareBy,
    lines: r.items.map((it) => ({ label: it.name, studyId: s.id, periods: r.periods, values: it.cycle, vintage: r.vintage, methodLine: it.methodLine })),
    range: r,
    unit: r.unitOfCycle,
    endOfSamplePeriods: 0,
    cautions: r.cautions,
    methodLines: r.items.map((it) => it.methodLine),
    vintageStamps: [`${r.series.code}: data as of ${r.asOf}, vintage ${r.vintage}`],
    series: [series],
    studies: [s],
    freshness: await freshnessOf(db, panel, [s]),
  };
}
