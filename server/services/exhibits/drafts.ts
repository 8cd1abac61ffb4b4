/** Drafting exhibits: created from a study or a board panel, edited by the author while a draft or returned. */
import type { PublicUser } from '../../schemas/people.js';
import type { CreateExhibitBody, UpdateExhibitBody } from '../../schemas/exhibits.js';
import { badRequest, conflict, forbidden, notFound } from '../../lib/errors.js';
import type { Knex } from 'knex';
import type { Db } from '../../db.js';
import { audit } from '../audit.js';
import { panelById, panelData } from '../boards.js';
import { getChronology } from '../chronology.js';
import { computeSpec, rangeStudyResult } from '../studies/results.js';
import { getStudy } from '../studies/studies.js';
import { canSee, exhibitRow, getExhibit, type ExhibitDeps } from './read.js';
import { transaction } from '../../lib/retry.js';

export async function createExhibit(deps: ExhibitDeps, user: PublicUser, body: CreateExhibitBody, ip?: string) {
  const { db } = deps;
  let units = body.units ?? null;
  let sourceLine = body.sourceLine ?? null;
  // An exhibit drafted from a study shades what the study shades unless told otherwise.
  let chronologyId = body.chronologyId;
  if (body.studyId) {
    const s = await getStudy(db, body.studyId);
    if (chronologyId === undefined) chronologyId = s.chronologyId;
    const r = s.kind === 'range' ? await rangeStudyResult(db, deps.pool, s) : await computeSpec(db, s, { pool: deps.pool });
    units ??= r.unitOfCycle;
    sourceLine ??= r.series.source;
  } else {
    const panel = await panelById(db, user, body.panelId!);
    const data = await panelData(db, panel, deps.pool);
    units ??= data.unit;
    sourceLine ??= [...new Set(data.series.map((s) => s.source))].join('; ');
  }
  if (body.chronologyId) await getChronology(db, body.chronologyId);
  await assertBandFits(db, body.studyId ?? null, !!body.revisionBand, body.chartKind ?? 'cycle');
  const id = await transaction(db, async (trx) => {
    const [newId] = await trx('exhibits').insert({
      author_id: user.id,
      study_id: body.studyId ?? null,
      panel_id: body.panelId ?? null,
      title: body.title,
      subtitle: body.subtitle ?? null,
      units,
      source_line: sourceLine,
      notes: body.notes ?? null,
      chart_kind: body.chartKind ?? 'cycle',
      number_label: body.number || null,
      chronology_id: chronologyId ?? null,
      revision_band: !!body.revisionBand,
      status: 'draft',
    });
    await trx('exhibit_events').insert({ exhibit_id: newId, actor_id: user.id, from_status: null, to_status: 'draft', comment: null, revision: 0 });
    await audit(trx, { actorId: user.id, action: 'exhibit.create', targetType: 'exhibit', targetId: newId, ip });
    return newId;
  });
  return getExhibit(deps, user, id);
}

/** The band of past revisions belongs on the cycle chart of one study of one method; refused otherwise, with what to do. */
async function assertBandFits(db: Db | Knex.Transaction, studyId: number | null, band: boolean, chartKind: string) {
  if (!band) return;
  const what = 'The band of past revisions';
  if (!studyId) throw badRequest('revision_band_study_only', `${what} is drawn on an exhibit drafted from one study of one method, not from a panel.`, [{ path: 'revisionBand', message: 'Only for an exhibit from one study.' }]);
  const s = await getStudy(db as Db, studyId);
  if (s.kind === 'range') throw badRequest('revision_band_study_only', `${what} is drawn around one method's estimates; "${s.title}" is a range study across methods.`, [{ path: 'revisionBand', message: 'Not for a range study.' }]);
  if (chartKind !== 'cycle') throw badRequest('revision_band_cycle_only', `${what} is drawn on the cycle chart: choose chartKind "cycle" to show it.`, [{ path: 'revisionBand', message: 'Only on the cycle chart.' }]);
}

export async function updateExhibit(deps: ExhibitDeps, user: PublicUser, id: number, body: UpdateExhibitBody) {
  const { db } = deps;
  if (body.chronologyId) await getChronology(db, body.chronologyId);
  await transaction(db, async (trx) => {
    const row = await exhibitRow(trx, id, true);
    if (!canSee(user, row)) throw notFound('The exhibit');
    if (row.status !== 'draft' && row.status !== 'returned') {
      throw conflict('exhibit_frozen', `An exhibit that is ${row.status.replace('_', ' ')} cannot be changed${row.status === 'published' || row.status === 'approved' ? '; a change to it is a new exhibit' : ''}.`);
    }
    if (row.author_id !== user.id) throw forbidden('not_author', `Only ${row.author_name}, the author, edits this exhibit.`);
    const change: Record<string, unknown> = { updated_at: new Date() };
    if (body.title !== undefined) change.title = body.title;
    if (body.subtitle !== undefined) change.subtitle = body.subtitle || null;
    if (body.notes !== undefined) change.notes = body.notes || null;
    if (body.units !== undefined) change.units = body.units || null;
    if (body.sourceLine !== undefined) change.source_line = body.sourceLine || null;
    if (body.chartKind !== undefined) change.chart_kind = body.chartKind;
    if (body.number !== undefined) change.number_label = body.number || null;
    if (body.chronologyId !== undefined) change.chronology_id = body.chronologyId;
    if (body.revisionBand !== undefined) change.revision_band = body.revisionBand;
    await assertBandFits(trx, row.study_id, body.revisionBand ?? !!row.revision_band, body.chartKind ?? row.chart_kind);
    await trx('exhibits').where('id', id).update(change);
  });
  return getExhibit(deps, user, id);
}

export async function deleteExhibit(deps: ExhibitDeps, user: PublicUser, id: number) {
  const row = await exhibitRow(deps.db, id);
  if (!canSee(user, row)) throw notFound('The exhibit');
  if (row.author_id !== user.id) throw forbidden('not_author', 'Only the author deletes a draft.');
  if (row.status !== 'draft') throw conflict('exhibit_frozen', 'Only a draft that was never submitted can be deleted; a published exhibit is withdrawn instead.');
  await deps.db('exhibits').where('id', id).delete();
}
