/**
 * Studies: saved decompositions of a Catalogue series (a vintage pin or "latest"), a transform, a
 * method and its parameters. Only the owner changes or deletes a study; others duplicate it.
 */
import type { Db } from '../../db.js';
import { conflict, forbidden, notFound } from '../../lib/errors.js';
import type { PublicUser } from '../../schemas/people.js';
import type { CreateStudyBody, Study, StudySpec } from '../../schemas/studies.js';
import { audit } from '../audit.js';
import { runSpec } from './spec.js';
import { dateOnly } from '../catalogue/rows.js';

function toStudy(r: Record<string, any>): Study {
  return {
    id: r.id,
    title: r.title,
    notes: r.notes,
    seriesId: r.series_id,
    series: { code: r.code, title: r.series_title, frequency: r.frequency, unit: r.unit },
    vintage: r.vintage_number ?? 'latest',
    asOf: r.vintage_as_of ? dateOnly(r.vintage_as_of) : null,
    transform: r.transform,
    method: r.method,
    params: JSON.parse(r.params),
    owner: { id: r.owner_id, name: r.owner_name },
    createdAt: new Date(r.created_at).toISOString(),
    updatedAt: new Date(r.updated_at).toISOString(),
  };
}

const base = (db: Db) =>
  db('studies as st')
    .join('series as s', 's.id', 'st.series_id')
    .join('users as u', 'u.id', 'st.owner_id')
    .select('st.*', 's.code', 's.title as series_title', 's.frequency', 's.unit', 'u.name as owner_name');

export async function listStudies(db: Db, filter: { owner?: number; seriesId?: number; method?: string; q?: string }) {
  const q = base(db).orderBy('st.updated_at', 'desc');
  if (filter.owner) q.where('st.owner_id', filter.owner);
  if (filter.seriesId) q.where('st.series_id', filter.seriesId);
  if (filter.method) q.where('st.method', filter.method);
  if (filter.q) q.where((w) => w.whereILike('st.title', `%${filter.q}%`).orWhereILike('s.code', `%${filter.q}%`));
  return (await q.limit(500)).map(toStudy);
}

export async function getStudy(db: Db, id: number): Promise<Study> {
  const row = await base(db).where('st.id', id).first();
  if (!row) throw notFound('The study');
  return toStudy(row);
}

/** Checks a study's specification by computing it once; returns the parameters with defaults filled. */
export async function createStudy(db: Db, owner: PublicUser, body: CreateStudyBody, ip?: string) {
  const { params } = await runSpec(db, body);
  const [id] = await db('studies').insert({
    owner_id: owner.id,
    series_id: body.seriesId,
    vintage_number: body.vintage === 'latest' || body.asOf ? null : body.vintage,
    vintage_as_of: body.asOf ?? null,
    transform: body.transform,
    method: body.method,
    params: JSON.stringify(params),
    title: body.title,
    notes: body.notes ?? null,
  });
  await audit(db, { actorId: owner.id, action: 'study.create', targetType: 'study', targetId: id, ip });
  return getStudy(db, id);
}

function assertOwner(study: Study, user: PublicUser) {
  if (study.owner.id !== user.id) throw forbidden('not_owner', `Only ${study.owner.name}, who owns this study, can change it; duplicate it to make your own.`);
}

export async function updateStudy(db: Db, user: PublicUser, id: number, body: Partial<CreateStudyBody>) {
  const study = await getStudy(db, id);
  assertOwner(study, user);
  const spec: StudySpec = {
    seriesId: body.seriesId ?? study.seriesId,
    vintage: body.vintage ?? study.vintage,
    // A date pin stays until a date, null or a vintage is sent.
    asOf: body.asOf !== undefined ? body.asOf : body.vintage !== undefined ? null : study.asOf,
    transform: body.transform ?? study.transform,
    method: body.method ?? study.method,
    params: body.params ?? (body.method && body.method !== study.method ? {} : study.params),
  };
  const { params } = await runSpec(db, spec);
  await db('studies')
    .where('id', id)
    .update({
      series_id: spec.seriesId,
      vintage_number: spec.vintage === 'latest' || spec.asOf ? null : spec.vintage,
      vintage_as_of: spec.asOf ?? null,
      transform: spec.transform,
      method: spec.method,
      params: JSON.stringify(params),
      title: body.title ?? study.title,
      notes: body.notes === undefined ? study.notes : body.notes,
      updated_at: new Date(),
    });
  return getStudy(db, id);
}

export async function duplicateStudy(db: Db, user: PublicUser, id: number) {
  const s = await getStudy(db, id);
  return createStudy(db, user, { title: `${s.title} (copy)`.slice(0, 200), notes: s.notes ?? undefined, seriesId: s.seriesId, vintage: s.vintage, asOf: s.asOf, transform: s.transform, method: s.method, params: s.params });
}

export async function deleteStudy(db: Db, user: PublicUser, id: number, ip?: string) {
  const study = await getStudy(db, id);
  assertOwner(study, user);
  const [{ n }] = await db('exhibits').where('study_id', id).whereIn('status', ['draft', 'in_review', 'returned']).count({ n: '*' });
  if (Number(n) > 0) throw conflict('study_in_use', 'An exhibit that is not yet published is built on this study; withdraw or finish it first.');
  const panels = await db('board_panels').whereRaw('JSON_CONTAINS(study_ids, ?)', [String(id)]).count({ n: '*' });
  if (Number(panels[0].n) > 0) throw conflict('study_in_use', 'A board panel shows this study; remove it from the board first.');
  await db('studies').where('id', id).delete();
  await audit(db, { actorId: user.id, action: 'study.delete', targetType: 'study', targetId: id, ip });
}
