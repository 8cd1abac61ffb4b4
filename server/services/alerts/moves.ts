/**
 * What a release did to the gaps people follow: who is affected by new vintages of a series
 * (their studies that follow "latest", and the studies their boards and exhibits draw on), and
 * for each affected study the last gap estimate before and after the release and the largest
 * revision of the gap over the last two years.
 */
import { methodLine } from '../../analysis/index.js';
import type { Db } from '../../db.js';
import { PERIODS_PER_YEAR } from '../../schemas/frequency.js';
import type { StudyMove } from '../../schemas/alerts.js';
import type { Study } from '../../schemas/studies.js';
import type { DecomposeJson } from '../../schemas/decompose.js';
import type { BatchItem, FailedItem } from '../../workers/batch-types.js';
import type { AnalysisPool } from '../../workers/pool.js';
import { readSeriesValues } from '../catalogue/stored-values.js';
import { runBatch } from '../decompose.js';
import { cycleUnit } from '../studies/results.js';
import { getStudy } from '../studies/studies.js';

/** New vintages of one series: their numbers (one for a load, several for a history load). */
export interface LandedVintages {
  seriesId: number;
  numbers: number[];
}

export interface Recipient {
  userId: number;
  email: string;
  name: string;
  /** Study id → why the person hears of it. */
  studies: Map<number, Set<'study' | 'board' | 'exhibit'>>;
}

const studyIdsOf = (text: string): number[] => {
  try {
    const ids = JSON.parse(text);
    return Array.isArray(ids) ? ids.map(Number).filter(Number.isInteger) : [];
  } catch {
    return [];
  }
};

/**
 * The people to tell about new vintages of `seriesIds`, with the studies that concern each:
 * owners of studies that follow "latest", owners of boards with a panel showing a study of the
 * series, authors of exhibits (not withdrawn or superseded) drawn from such a study or panel.
 * People who turned release alerts off, and deactivated people, are left out.
 */
export async function affectedPeople(db: Db, seriesIds: number[]): Promise<Recipient[]> {
  if (!seriesIds.length) return [];
  const onSeries: { id: number; owner_id: number; vintage_number: number | null; vintage_as_of: Date | null }[] = await db('studies').whereIn('series_id', seriesIds).select('id', 'owner_id', 'vintage_number', 'vintage_as_of');
  const ids = new Set(onSeries.map((s) => s.id));
  const byPerson = new Map<number, Map<number, Set<'study' | 'board' | 'exhibit'>>>();
  const add = (userId: number, studyId: number, why: 'study' | 'board' | 'exhibit') => {
    if (!byPerson.has(userId)) byPerson.set(userId, new Map());
    const m = byPerson.get(userId)!;
    if (!m.has(studyId)) m.set(studyId, new Set());
    m.get(studyId)!.add(why);
  };
  for (const s of onSeries) if (s.vintage_number === null && s.vintage_as_of === null) add(s.owner_id, s.id, 'study');
  if (!ids.size) return [];
  const panels: { id: number; owner_id: number; study_ids: string }[] = await db('board_panels as p').join('boards as b', 'b.id', 'p.board_id').select('p.id', 'b.owner_id', 'p.study_ids');
  const panelStudies = new Map<number, number[]>();
  for (const p of panels) {
    const mine = studyIdsOf(p.study_ids).filter((id) => ids.has(id));
    panelStudies.set(p.id, mine);
    for (const id of mine) add(p.owner_id, id, 'board');
  }
  const exhibits: { author_id: number; study_id: number | null; panel_id: number | null }[] = await db('exhibits').whereNotIn('status', ['withdrawn', 'superseded']).select('author_id', 'study_id', 'panel_id');
  for (const e of exhibits) {
    const mine = e.study_id !== null ? (ids.has(e.study_id) ? [e.study_id] : []) : (panelStudies.get(e.panel_id ?? 0) ?? []);
    for (const id of mine) add(e.author_id, id, 'exhibit');
  }
  if (!byPerson.size) return [];
  const people: { id: number; email: string; name: string }[] = await db('users').whereIn('id', [...byPerson.keys()]).where('status', 'active').where('release_alerts', true).select('id', 'email', 'name');
  return people.map((p) => ({ userId: p.id, email: p.email, name: p.name, studies: byPerson.get(p.id)! })).sort((a, b) => a.userId - b.userId);
}

/** The last period with a gap estimate, and the estimate. */
function lastGap(periods: string[], cycle: (number | null)[]) {
  for (let i = cycle.length - 1; i >= 0; i--) if (cycle[i] !== null && Number.isFinite(cycle[i])) return { period: periods[i], gap: cycle[i] as number };
  return { period: null, gap: null };
}

type Decomposed = DecomposeJson & Partial<FailedItem>;

/**
 * How the gap of `study` moved between two decompositions of its series (vintage `before` and
 * `after`, with the study's own method, parameters and transform): the last estimate of each, and
 * the largest absolute change over the last two years of the new sample (periods both estimate).
 */
export function studyMove(study: Study, a: Decomposed, b: Decomposed, before: number, after: number, because: StudyMove['because']): StudyMove {
  const periodsA = a.periods ?? [];
  const periodsB = b.periods ?? [];
  const old = new Map<string, number>();
  periodsA.forEach((p, i) => a.cycle[i] !== null && old.set(p, a.cycle[i] as number));
  const window = 2 * PERIODS_PER_YEAR[study.series.frequency];
  let largest: StudyMove['largestRevision'] = null;
  const end = b.extension ? b.extension.from : periodsB.length;
  for (let i = Math.max(0, end - window); i < end; i++) {
    const y = b.cycle[i];
    const x = old.get(periodsB[i]);
    if (x === undefined || y === null) continue;
    if (!largest || Math.abs(y - x) > Math.abs(largest.change)) largest = { period: periodsB[i], before: x, after: y, change: y - x };
  }
  const upTo = (d: Decomposed) => (d.extension ? d.cycle.slice(0, d.extension.from) : d.cycle);
  return {
    studyId: study.id,
    title: study.title,
    methodLine: methodLine(b.method, b.params, b.transform, b.diagnostics),
    unitOfCycle: cycleUnit(study.transform, study.series.unit),
    seriesCode: study.series.code,
    because,
    before: { vintage: before, ...lastGap(periodsA, upTo(a)) },
    after: { vintage: after, ...lastGap(periodsB, upTo(b)) },
    largestRevision: largest,
  };
}

/** The vintage a release is compared with (the one before its first new vintage) and the newest it brought. */
export function comparedVintages(l: LandedVintages): { before: number; after: number } | null {
  const first = Math.min(...l.numbers);
  if (!Number.isFinite(first) || first < 2) return null;
  return { before: first - 1, after: Math.max(...l.numbers) };
}

/**
 * Every affected study's move, computed once however many people follow it: both vintages of
 * every study in one batch, on the worker threads when the batch is heavy (services/decompose.ts).
 */
export async function studyMoves(db: Db, pool: AnalysisPool | undefined, landed: LandedVintages[], recipients: Recipient[]): Promise<Map<number, Omit<StudyMove, 'because'>>> {
  const wanted = [...new Set(recipients.flatMap((r) => [...r.studies.keys()]))].sort((a, b) => a - b);
  const jobs: { study: Study; before: number; after: number }[] = [];
  const items: BatchItem[] = [];
  for (const id of wanted) {
    const study = await getStudy(db, id);
    const l = landed.find((x) => x.seriesId === study.seriesId);
    const v = l && comparedVintages(l);
    // A range study has no one cycle to move; its followers are told of its single-method studies only.
    if (!v || study.kind === 'range') continue;
    jobs.push({ study, ...v });
    for (const number of [v.before, v.after]) {
      const data = await readSeriesValues(db, study.seriesId, number);
      items.push({ id: `${id}:${number}`, frequency: data.series.frequency, start: data.start ?? undefined, values: data.values, transform: study.transform, method: study.method, params: study.params });
    }
  }
  const out = new Map<number, Omit<StudyMove, 'because'>>();
  if (!items.length) return out;
  const results = (await runBatch(items, 'full', pool)).map((j) => JSON.parse(j) as Decomposed);
  jobs.forEach((job, k) => {
    const [a, b] = [results[2 * k], results[2 * k + 1]];
    // A study whose method cannot run on one of the vintages (too short, say) is left out of the mail.
    if (a.error || b.error) return;
    const { because: _, ...move } = studyMove(job.study, a, b, job.before, job.after, []);
    out.set(job.study.id, move);
  });
  return out;
}
