/**
 * Studies: saved decompositions of a Catalogue series (a vintage pin or "latest"), a transform, a
 * method and its parameters — or, for a study of kind "range", a list of methods whose range of
 * gap estimates it shows. Only the owner changes or deletes a study; others duplicate it.
 */
import type { Db } from '../../db.js';
import { conflict, forbidden, notFound } from '../../lib/errors.js';
import type { PublicUser } from '../../schemas/people.js';
import type { CreateStudyBody, MethodChoice, Study, StudySpec, UpdateStudyBody } from '../../schemas/studies.js';
import type { AnalysisPool } from '../../workers/pool.js';
import { badRequest } from '../../lib/errors.js';
import { audit } from '../audit.js';
import { runSpec } from './spec.js';
import { runRangeSpec } from './range.js';
import { dateOnly } from '../catalogue/rows.js';
import { getChronology } from '../chronology.js';

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
    kind: r.kind ?? 'single',
    method: r.method,
    params: JSON.parse(r.params),
    methods: r.methods ? JSON.parse(r.methods) : null,
    chronologyId: r.chronology_id ?? null,
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
export async function createStudy(db: Db, owner: PublicUser, body: Omit<CreateStudyBody, 'kind'> & { kind?: Study['kind'] }, ip?: string, pool?: AnalysisPool) {
  const kind = body.kind ?? 'single';
  const checked = await checkSpec(db, pool, kind, { ...body, method: body.method ?? RANGE, methods: body.methods ?? null });
  if (body.chronologyId) await getChronology(db, body.chronologyId);
  const [id] = await db('studies').insert({
    owner_id: owner.id,
    series_id: body.seriesId,
    vintage_number: body.vintage === 'latest' || body.asOf ? null : body.vintage,
    vintage_as_of: body.asOf ?? null,
    transform: body.transform,
    kind,
    ...checked,
    title: body.title,
    notes: body.notes ?? null,
    chronology_id: body.chronologyId ?? null,
  });
  await audit(db, { actorId: owner.id, action: 'study.create', targetType: 'study', targetId: id, ip });
  return getStudy(db, id);
}

/**
 * A study of one method, for what only such a study has (exports, scripts, the real-time
 * analysis, release alerts); a range study is refused with what to use instead. `what` starts
 * the message ("The real-time analysis").
 */
export function singleMethodOnly(study: Study, what: string): Study {
  if (study.kind === 'range')
    throw badRequest('range_study', `${what} is for a study of one method, and "${study.title}" is a range study across methods: its range is on the study page (GET /studies/${study.id}/result); save a study of one of its methods for this.`);
  return study;
}

/** The `method` column of a range study. */
const RANGE = 'range';

/**
 * Checks a specification by computing it once (AnalysisError → 400) and answers the columns that
 * hold the method(s) with every default filled in.
 */
async function checkSpec(db: Db, pool: AnalysisPool | undefined, kind: Study['kind'], spec: StudySpec & { methods: MethodChoice[] | null }) {
  if (kind === 'range') {
    const r = await runRangeSpec(db, pool, { ...spec, methods: spec.methods! });
    return { method: RANGE, params: '{}', methods: JSON.stringify(r.items.map((i) => ({ method: i.method, params: i.params }))) };
  }
  const { params } = await runSpec(db, spec, { pool });
  return { method: spec.method, params: JSON.stringify(params), methods: null };
}

function assertOwner(study: Study, user: PublicUser) {
  if (study.owner.id !== user.id) throw forbidden('not_owner', `Only ${study.owner.name}, who owns this study, can change it; duplicate it to make your own.`);
}

export async function updateStudy(db: Db, user: PublicUser, id: number, body: UpdateStudyBody, pool?: AnalysisPool) {
  const study = await getStudy(db, id);
  assertOwner(study, user);
  if (study.kind === 'range' && (body.method !== undefined || body.params !== undefined))
    throw badRequest('range_study', 'This is a range study: change its list of methods (methods), not method or params.', [{ path: body.method !== undefined ? 'method' : 'params', message: 'A range study has methods, not one method.' }]);
  if (study.kind === 'single' && body.methods !== undefined)
    throw badRequest('single_study', 'This study has one method: change method and params, or save a new study of kind "range" for a list of methods.', [{ path: 'methods', message: 'A single-method study has no list of methods.' }]);
  const spec: StudySpec = {
    seriesId: body.seriesId ?? study.seriesId,
    vintage: body.vintage ?? study.vintage,
    // A date pin stays until a date, null or a vintage is sent.
    asOf: body.asOf !== undefined ? body.asOf : body.vintage !== undefined ? null : study.asOf,
    transform: body.transform ?? study.transform,
    method: body.method ?? study.method,
    params: body.params ?? (body.method && body.method !== study.method ? {} : study.params),
  };
  const checked = await checkSpec(db, pool, study.kind, { ...spec, methods: body.methods ?? study.methods });
  if (body.chronologyId) await getChronology(db, body.chronologyId);
  await db('studies')
    .where('id', id)
    .update({
      series_id: spec.seriesId,
      vintage_number: spec.vintage === 'latest' || spec.asOf ? null : spec.vintage,
      vintage_as_of: spec.asOf ?? null,
      transform: spec.transform,
      ...checked,
      title: body.title ?? study.title,
      notes: body.notes === undefined ? study.notes : body.notes,
      chronology_id: body.chronologyId === undefined ? study.chronologyId : body.chronologyId,
      updated_at: new Date(),
    });
  return getStudy(db, id);
}

export async function duplicateStudy(db: Db, user: PublicUser, id: number, pool?: AnalysisPool) {
  const s = await getStudy(db, id);
  const which = s.kind === 'range' ? { method: undefined, methods: s.methods! } : { method: s.method, methods: undefined };
  return createStudy(db, user, { title: `${s.title} (copy)`.slice(0, 200), notes: s.notes ?? undefined, chronologyId: s.chronologyId, seriesId: s.seriesId, vintage: s.vintage, asOf: s.asOf, transform: s.transform, kind: s.kind, params: s.params, ...which }, undefined, pool);
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
