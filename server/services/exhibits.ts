/**
 * Exhibits: charts prepared for publication, and their review.
 *
 *   draft ──submit──▶ in_review ──approve──▶ approved ──publish──▶ published ──withdraw──▶ withdrawn
 *     ▲                  │
 *     └── returned ◀─return (comment required)
 *   returned ──submit──▶ in_review
 *
 * Only the author edits a draft or a returned exhibit and submits it; only editors return,
 * approve, publish or withdraw, and never their own exhibit. Submitting freezes a snapshot (data,
 * vintage numbers and checksums, method, parameters, software version); from then on the exhibit
 * renders from its latest snapshot, whatever happens to the series. Approved and published
 * exhibits never change.
 */
import type { Knex } from 'knex';
import type { Config } from '../config.js';
import type { Db } from '../db.js';
import { badRequest, conflict, forbidden, HttpError, notFound } from '../lib/errors.js';
import { randomToken, sha256 } from '../lib/secrets.js';
import { version } from '../lib/version.js';
import { composeMail, type Mailer } from '../mail/mailer.js';
import type { PublicUser, Role } from '../schemas/auth.js';
import type { CreateExhibitBody, ExhibitState, Snapshot } from '../schemas/boards.js';
export type { Snapshot };
import { audit } from './audit.js';
import { panelById, panelData, type PanelData } from './boards.js';
import { computeSpec, getStudy, type StudyResult } from './studies.js';
import { CAUTION_LINE } from '../schemas/cautions.js';
import { getSettings } from './settings.js';

export interface ExhibitDeps {
  db: Db;
  config: Config;
  mailer: Mailer;
}

type Move = { to: ExhibitState; from: ExhibitState[]; by: 'author' | 'editor'; comment: 'required' | 'optional'; verb: string };

export const MOVES: Move[] = [
  { to: 'in_review', from: ['draft', 'returned'], by: 'author', comment: 'optional', verb: 'submitted' },
  { to: 'returned', from: ['in_review'], by: 'editor', comment: 'required', verb: 'returned' },
  { to: 'approved', from: ['in_review'], by: 'editor', comment: 'optional', verb: 'approved' },
  { to: 'published', from: ['approved'], by: 'editor', comment: 'optional', verb: 'published' },
  { to: 'withdrawn', from: ['published'], by: 'editor', comment: 'required', verb: 'withdrew' },
];


const iso = (d: Date | string | null) => (d ? new Date(d).toISOString() : null);

async function exhibitRow(db: Db | Knex.Transaction, id: number, lock = false) {
  const q = db('exhibits as e').join('users as u', 'u.id', 'e.author_id').where('e.id', id).select('e.*', 'u.name as author_name', 'u.email as author_email');
  if (lock) q.forUpdate();
  const row = await q.first();
  if (!row) throw notFound('The exhibit');
  return row;
}

/** Who may see which exhibits. Readers: published and withdrawn ones; authors: their own; editors: all but others' drafts. */
function canSee(user: PublicUser, row: Record<string, any>) {
  if (row.status === 'published' || row.status === 'withdrawn') return true;
  if (row.author_id === user.id || user.roles.includes('admin')) return true;
  if (user.roles.includes('editor') && row.status !== 'draft') return true;
  return false;
}

// ------------------------------------------------------------------ snapshots

async function vintageChecksum(db: Db, seriesId: number, number: number) {
  return (await db('vintages').where({ series_id: seriesId, number }).first('checksum'))?.checksum ?? '';
}

/** The exhibit's content computed from the current data (a draft's live view, or the next snapshot). */
export async function buildSnapshot(db: Db, user: PublicUser, row: Record<string, any>, frozen: boolean): Promise<Snapshot> {
  const common = {
    schema: 1 as const,
    text: { title: row.title, subtitle: row.subtitle, units: row.units, sourceLine: row.source_line, notes: row.notes },
    caution: CAUTION_LINE,
    software: { name: 'Tidegauge', version },
    frozenAt: frozen ? new Date().toISOString() : null,
  };
  // One study's decomposition: the series, its trend and its cycle.
  const single = (kind: Snapshot['kind'], r: StudyResult, studies: Snapshot['studies'], series: Snapshot['series']): Snapshot => ({
    ...common,
    kind,
    chartKind: row.chart_kind === 'trend' ? 'trend' : 'cycle',
    series,
    lines: (['input', 'trend', 'cycle'] as const).map((role) => ({ label: role, role, periods: r.periods, values: r[role] })),
    studies,
    turningPoints: r.turningPoints.map((t) => ({ period: t.period, type: t.type })),
    endOfSamplePeriods: r.endOfSamplePeriods,
    methodLine: r.methodLine,
    vintageStamp: r.vintageStamp,
  });
  if (row.study_id) {
    const s = await getStudy(db, row.study_id);
    const r = await computeSpec(db, s);
    const studies = [{ id: s.id, title: s.title, method: r.method, params: r.params, transform: r.transform, vintage: r.vintage, asOf: r.asOf, vintageChecksum: await vintageChecksum(db, r.series.id, r.vintage), methodLine: r.methodLine }];
    return single('study', r, studies, [{ id: r.series.id, code: r.series.code, title: r.series.title, unit: r.series.unit, source: r.series.source }]);
  }
  if (!row.panel_id) throw conflict('exhibit_source_gone', 'The study or panel this exhibit was drafted from no longer exists.');
  const panel = await panelById(db, user, row.panel_id).catch((e) => {
    if (e instanceof HttpError && e.status === 404) throw conflict('exhibit_source_gone', 'The panel this exhibit was drafted from no longer exists.');
    throw e;
  });
  const data: PanelData = await panelData(db, panel);
  const studies: Snapshot['studies'] = [];
  for (const l of data.lines) {
    const s = data.studies.find((x) => x.id === l.studyId)!;
    studies.push({ id: s.id, title: s.title, method: s.method, params: s.params, transform: s.transform, vintage: l.vintage, asOf: '', vintageChecksum: await vintageChecksum(db, s.seriesId, l.vintage), methodLine: l.methodLine });
  }
  if (data.kind === 'study' && data.result) {
    studies[0].asOf = data.result.asOf;
    return single('panel', data.result, studies, data.series);
  }
  return {
    ...common,
    kind: 'panel',
    chartKind: 'compare',
    series: data.series,
    lines: data.lines.map((l) => ({ label: l.label, role: 'cycle' as const, periods: l.periods, values: l.values })),
    studies,
    endOfSamplePeriods: 0,
    methodLine: data.methodLines.join(' · '),
    vintageStamp: data.vintageStamps.join(' · '),
  };
}

export const snapshotChecksum = (s: Snapshot) => sha256(JSON.stringify(s));

// ------------------------------------------------------------------ reading

async function latestRevision(db: Db | Knex.Transaction, exhibitId: number, number?: number) {
  const q = db('exhibit_revisions').where('exhibit_id', exhibitId);
  if (number) q.where('number', number);
  else q.orderBy('number', 'desc');
  const r = await q.first();
  return r ? { number: r.number as number, snapshot: JSON.parse(r.snapshot) as Snapshot, checksum: r.checksum as string, createdAt: iso(r.created_at) } : null;
}

async function events(db: Db, exhibitId: number) {
  const rows = await db('exhibit_events as ev').leftJoin('users as u', 'u.id', 'ev.actor_id').where('ev.exhibit_id', exhibitId).orderBy('ev.id').select('ev.*', 'u.name as actor_name');
  return rows.map((r) => ({ id: r.id, at: iso(r.at), actor: r.actor_id ? { id: r.actor_id, name: r.actor_name } : null, from: r.from_status, to: r.to_status, comment: r.comment, revision: r.revision }));
}

function summary(row: Record<string, any>) {
  return {
    id: row.id,
    title: row.title,
    subtitle: row.subtitle,
    units: row.units,
    sourceLine: row.source_line,
    notes: row.notes,
    chartKind: row.chart_kind,
    status: row.status as ExhibitState,
    revision: row.revision,
    studyId: row.study_id,
    panelId: row.panel_id,
    author: { id: row.author_id, name: row.author_name },
    submittedAt: iso(row.submitted_at),
    publishedAt: iso(row.published_at),
    createdAt: iso(row.created_at),
    updatedAt: iso(row.updated_at),
  };
}

/** The moves the user may make now (for the buttons on the exhibit page). */
function allowedMoves(user: PublicUser, row: Record<string, any>) {
  return MOVES.filter((m) => m.from.includes(row.status) && (m.by === 'author' ? row.author_id === user.id && user.roles.includes('economist') : user.roles.includes('editor') && row.author_id !== user.id)).map((m) => ({ to: m.to, comment: m.comment }));
}

export async function getExhibit(deps: ExhibitDeps, user: PublicUser, id: number) {
  const { db } = deps;
  const row = await exhibitRow(db, id);
  if (!canSee(user, row)) throw notFound('The exhibit');
  const revision = await latestRevision(db, id);
  const settings = await getSettings(db);
  const editable = (row.status === 'draft' || row.status === 'returned') && row.author_id === user.id;
  // A draft (or a returned exhibit being reworked) shows its live content; otherwise the frozen snapshot.
  const live = editable || (!revision && row.author_id === user.id) ? await buildSnapshot(db, user, row, false).catch((e) => (e instanceof HttpError ? null : Promise.reject(e))) : null;
  return {
    ...summary(row),
    snapshot: revision?.snapshot ?? null,
    snapshotChecksum: revision?.checksum ?? null,
    live,
    events: await events(db, id),
    moves: allowedMoves(user, row),
    editable,
    publicUrl: row.status === 'published' && settings.publicExhibitLinks && row.public_slug ? `${deps.config.publicOrigin}/p/${row.public_slug}` : null,
  };
}

export async function listExhibits(db: Db, user: PublicUser, filter: { status?: string; mine?: boolean }) {
  const q = db('exhibits as e').join('users as u', 'u.id', 'e.author_id').select('e.*', 'u.name as author_name').orderBy('e.updated_at', 'desc').limit(500);
  if (filter.status) q.where('e.status', filter.status);
  if (filter.mine) q.where('e.author_id', user.id);
  const rows = (await q).filter((r) => canSee(user, r));
  return rows.map(summary);
}

// ------------------------------------------------------------------ writing

export async function createExhibit(deps: ExhibitDeps, user: PublicUser, body: CreateExhibitBody, ip?: string) {
  const { db } = deps;
  let units = body.units ?? null;
  let sourceLine = body.sourceLine ?? null;
  if (body.studyId) {
    const s = await getStudy(db, body.studyId);
    const r = await computeSpec(db, s);
    units ??= r.unitOfCycle;
    sourceLine ??= r.series.source;
  } else {
    const panel = await panelById(db, user, body.panelId!);
    const data = await panelData(db, panel);
    units ??= data.unit;
    sourceLine ??= [...new Set(data.series.map((s) => s.source))].join('; ');
  }
  const id = await db.transaction(async (trx) => {
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
      status: 'draft',
    });
    await trx('exhibit_events').insert({ exhibit_id: newId, actor_id: user.id, from_status: null, to_status: 'draft', comment: null, revision: 0 });
    await audit(trx, { actorId: user.id, action: 'exhibit.create', targetType: 'exhibit', targetId: newId, ip });
    return newId;
  });
  return getExhibit(deps, user, id);
}

export async function updateExhibit(deps: ExhibitDeps, user: PublicUser, id: number, body: Partial<{ title: string; subtitle: string; notes: string; units: string; sourceLine: string; chartKind: 'cycle' | 'trend' }>) {
  const { db } = deps;
  await db.transaction(async (trx) => {
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

const STATE_WORDS: Record<ExhibitState, string> = { draft: 'a draft', in_review: 'in review', returned: 'returned', approved: 'approved', published: 'published', withdrawn: 'withdrawn' };

export async function transition(deps: ExhibitDeps, user: PublicUser, id: number, to: ExhibitState, comment: string | undefined, ip?: string) {
  const { db } = deps;
  const move = MOVES.find((m) => m.to === to);
  const first = await exhibitRow(db, id);
  if (!move) throw conflict('move_not_allowed', `No move leads back to ${STATE_WORDS[to]}.`);
  const needs: Role = move.by === 'author' ? 'economist' : 'editor';
  if (!user.roles.includes(needs)) throw forbidden('role_required', `This needs the ${needs} role.`, { roles: [needs] });
  if (!canSee(user, first)) throw forbidden('not_allowed', move.by === 'author' ? 'Only the author submits this exhibit.' : 'This exhibit is not in review.');
  const row = await db.transaction(async (trx) => {
    const cur = await exhibitRow(trx, id, true);
    if (!move.from.includes(cur.status)) {
      throw conflict('move_not_allowed', `The exhibit is ${STATE_WORDS[cur.status as ExhibitState]}; it can be ${move.verb} only when it is ${move.from.map((f) => STATE_WORDS[f]).join(' or ')}.`);
    }
    if (move.by === 'author' && cur.author_id !== user.id) throw forbidden('not_author', `Only ${cur.author_name}, the author, submits this exhibit.`);
    if (move.by === 'editor' && cur.author_id === user.id) throw forbidden('own_exhibit', 'Nobody reviews, approves, publishes or withdraws their own exhibit; another editor must.');
    if (move.comment === 'required' && !comment) throw badRequest('comment_required', to === 'withdrawn' ? 'Give the reason for withdrawing the exhibit.' : 'Say what the author should change: a comment is required.');
    const change: Record<string, unknown> = { status: to, updated_at: new Date() };
    let revision = cur.revision as number;
    if (to === 'in_review') {
      const snap = await buildSnapshot(db, user, cur, true);
      revision += 1;
      await trx('exhibit_revisions').insert({ exhibit_id: id, number: revision, snapshot: JSON.stringify(snap), checksum: snapshotChecksum(snap), created_by: user.id });
      change.revision = revision;
      change.submitted_at = new Date();
    }
    if (to === 'published') {
      change.published_at = new Date();
      change.public_slug = cur.public_slug ?? randomToken(16);
    }
    await trx('exhibits').where('id', id).update(change);
    await trx('exhibit_events').insert({ exhibit_id: id, actor_id: user.id, from_status: cur.status, to_status: to, comment: comment ?? null, revision });
    await audit(trx, { actorId: user.id, action: `exhibit.${to}`, targetType: 'exhibit', targetId: id, details: { from: cur.status, revision }, ip });
    return { ...cur, status: to };
  });
  await notify(deps, user, row, to, comment);
  return getExhibit(deps, user, id);
}

/** Editors hear of submissions; the author hears of returns, approvals and publication. */
async function notify(deps: ExhibitDeps, actor: PublicUser, row: Record<string, any>, to: ExhibitState, comment?: string) {
  const link = `${deps.config.publicOrigin}/exhibits/${row.id}`;
  if (to === 'in_review') {
    const editors = await deps.db('users as u').join('user_roles as r', 'r.user_id', 'u.id').where('r.role', 'editor').andWhere('u.status', 'active').whereNot('u.id', row.author_id).select('u.email', 'u.name');
    if (!editors.length) return;
    const { text, html } = composeMail({
      greeting: 'Hello,',
      paragraphs: [`${actor.name} submitted the exhibit “${row.title}” for review.`, 'It is on the Review desk, oldest submissions first.'],
      action: { label: 'Open the exhibit', url: link },
    });
    await deps.mailer.send({ to: editors.map((e) => e.email), subject: `For review: ${row.title}`, text, html });
    return;
  }
  if (to === 'returned' || to === 'approved' || to === 'published') {
    const words = { returned: 'returned your exhibit with comments', approved: 'approved your exhibit', published: 'published your exhibit' } as const;
    const { text, html } = composeMail({
      greeting: `Hello ${row.author_name},`,
      paragraphs: [`${actor.name} ${words[to]} “${row.title}”.`, ...(comment ? [`Comment: ${comment}`] : [])],
      action: { label: 'Open the exhibit', url: link },
    });
    const subject = { returned: 'Returned', approved: 'Approved', published: 'Published' }[to];
    await deps.mailer.send({ to: row.author_email, subject: `${subject}: ${row.title}`, text, html });
  }
}

// ------------------------------------------------------------------ review desk

/** In-review exhibits, oldest first, with what changed since the last revision an editor saw. */
export async function reviewQueue(deps: ExhibitDeps, user: PublicUser) {
  const rows = await deps.db('exhibits as e').join('users as u', 'u.id', 'e.author_id').where('e.status', 'in_review').orderBy('e.submitted_at', 'asc').select('e.*', 'u.name as author_name');
  return rows.map((r) => ({ ...summary(r), own: r.author_id === user.id }));
}

export interface Diff {
  from: number | null;
  to: number;
  text: { field: string; before: string | null; after: string | null }[];
  studies: { id: number; what: string; before: unknown; after: unknown }[];
  data: { line: string; changedPeriods: number; newPeriods: number; maxAbsChange: number | null }[];
}

export function diffSnapshots(a: Snapshot | null, b: Snapshot, numbers: [number | null, number]): Diff {
  const text: Diff['text'] = [];
  for (const field of ['title', 'subtitle', 'units', 'sourceLine', 'notes'] as const) {
    const before = a ? a.text[field] : null;
    if (!a || before !== b.text[field]) text.push({ field, before, after: b.text[field] });
  }
  const studies: Diff['studies'] = [];
  for (const s of b.studies) {
    const old = a?.studies.find((x) => x.id === s.id);
    for (const what of ['method', 'params', 'transform', 'vintage'] as const) {
      if (!old || JSON.stringify(old[what]) !== JSON.stringify(s[what])) studies.push({ id: s.id, what, before: old ? old[what] : null, after: s[what] });
    }
  }
  const data: Diff['data'] = [];
  for (const line of b.lines) {
    const old = a?.lines.find((l) => l.label === line.label && l.role === line.role);
    const before = new Map(old ? old.periods.map((p, i) => [p, old.values[i]]) : []);
    let changed = 0;
    let added = 0;
    let max: number | null = null;
    line.periods.forEach((p, i) => {
      if (!before.has(p)) {
        added++;
        return;
      }
      const x = before.get(p);
      const y = line.values[i];
      if (x !== y) {
        changed++;
        if (x !== null && x !== undefined && y !== null) max = Math.max(max ?? 0, Math.abs(y - x));
      }
    });
    data.push({ line: `${line.label}${line.role !== 'cycle' && line.label !== line.role ? ` (${line.role})` : ''}`, changedPeriods: changed, newPeriods: a ? added : 0, maxAbsChange: max });
  }
  return { from: numbers[0], to: numbers[1], text, studies, data };
}

/** What changed between the exhibit's latest revision and the one before it. */
export async function exhibitDiff(deps: ExhibitDeps, user: PublicUser, id: number) {
  const row = await exhibitRow(deps.db, id);
  if (!canSee(user, row)) throw notFound('The exhibit');
  const current = await latestRevision(deps.db, id);
  if (!current) throw conflict('not_submitted', 'The exhibit has not been submitted yet, so there is no revision to compare.');
  const previous = current.number > 1 ? await latestRevision(deps.db, id, current.number - 1) : null;
  return { previous: previous?.snapshot ?? null, current: current.snapshot, diff: diffSnapshots(previous?.snapshot ?? null, current.snapshot, [previous?.number ?? null, current.number]) };
}

// ------------------------------------------------------------------ published copies

export async function publicExhibit(deps: ExhibitDeps, slug: string) {
  const settings = await getSettings(deps.db);
  const row = await deps.db('exhibits as e').join('users as u', 'u.id', 'e.author_id').where('e.public_slug', slug).first('e.*', 'u.name as author_name');
  if (!settings.publicExhibitLinks || !row || row.status !== 'published') throw notFound('The published exhibit');
  const revision = await latestRevision(deps.db, row.id);
  return { ...summary(row), snapshot: revision!.snapshot, snapshotChecksum: revision!.checksum, events: [] };
}
