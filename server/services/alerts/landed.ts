/**
 * Release alerts: when new vintages land (a load, a history load, a feed run), each person whose
 * studies follow "latest", or whose boards or exhibits draw on the series, gets one mail for the
 * whole load saying how each affected study's gap moved. The load queues the job in its
 * transaction and it is delivered after the answer (outbox.ts), so a load never waits for mail, a
 * failure is logged, never shown to the steward, and a server that stops before the mails go
 * leaves the job for the next sweep.
 *
 * Example: `await sendReleaseAlerts(deps, { seriesId: 7, numbers: [5], actorId: 2, source: 'load' })`.
 */
import type { Config } from '../../config.js';
import type { Db } from '../../db.js';
import type { Background } from '../../lib/background.js';
import type { Logger } from '../../lib/logger.js';
import { composeMail, type Mailer } from '../../mail/mailer.js';
import type { LandedSource, StudyMove } from '../../schemas/alerts.js';
import { CAUTION_LINE } from '../../schemas/cautions.js';
import type { AnalysisPool } from '../../workers/pool.js';
import { affectedPeople, studyMoves, type LandedVintages } from './moves.js';

export type { LandedVintages };

export interface AlertDeps {
  db: Db;
  mailer: Mailer;
  background: Background;
  config: Config;
  logger?: Logger;
  /** Worker threads for heavy batches (the app's pool); without it the decompositions run here. */
  pool?: AnalysisPool;
}

/** New vintages of one series, or of several (`series`) when one load stored many. */
export type VintagesLanded = ({ seriesId: number; numbers: number[] } | { series: LandedVintages[] }) & {
  actorId: number;
  source: LandedSource;
  /** Words for where it came from ("the feed “Estuary national accounts”"), when the source says more than its kind. */
  label?: string;
};

const signed = (v: number) => `${v > 0 ? '+' : v < 0 ? '−' : ''}${Math.abs(v).toFixed(2)}`;

/** One study's lines in the mail. */
export function describeMove(m: StudyMove): string {
  const gap = (x: StudyMove['before']) => (x.gap === null ? 'no estimate' : `${signed(x.gap)} in ${x.period}`);
  const why = m.because.map((b) => ({ study: 'your study', board: 'on your board', exhibit: 'behind your exhibit' })[b]).join(', ');
  const revision = m.largestRevision
    ? `Largest revision of the gap in the last two years: ${signed(m.largestRevision.change)} in ${m.largestRevision.period} (from ${signed(m.largestRevision.before)} to ${signed(m.largestRevision.after)}).`
    : 'No period of the last two years was estimated by both vintages.';
  return `“${m.title}” (${m.seriesCode}; ${m.methodLine}; ${why}). Last gap estimate: ${gap(m.before)} on vintage ${m.before.vintage}, now ${gap(m.after)} on vintage ${m.after.vintage} (${m.unitOfCycle}). ${revision}`;
}

/**
 * Computes and sends the alerts of a release; returns the mails sent and the addresses whose mail
 * the mail server did not take. Addresses in `served` (sent by an earlier attempt) are skipped.
 */
export async function sendReleaseAlerts(deps: AlertDeps, landed: VintagesLanded, served: ReadonlySet<string> = new Set()): Promise<{ sent: { to: string; studies: number[] }[]; failed: string[] }> {
  const series = 'series' in landed ? landed.series : [{ seriesId: landed.seriesId, numbers: landed.numbers }];
  const recipients = await affectedPeople(deps.db, series.map((s) => s.seriesId));
  if (!recipients.length) return { sent: [], failed: [] };
  const moves = await studyMoves(deps.db, deps.pool, series, recipients);
  const codes: { id: number; code: string }[] = await deps.db('series').whereIn('id', series.map((s) => s.seriesId)).select('id', 'code');
  const what = series
    .map((s) => `${codes.find((c) => c.id === s.seriesId)?.code ?? `series ${s.seriesId}`} (vintage${s.numbers.length > 1 ? 's' : ''} ${[...s.numbers].sort((a, b) => a - b).join(', ')})`)
    .join(', ');
  const from = landed.label ?? { load: 'a load', history: 'a history load', feed: 'a feed run' }[landed.source];
  const sent: { to: string; studies: number[] }[] = [];
  const failed: string[] = [];
  for (const r of recipients) {
    if (served.has(r.email)) continue;
    const mine: StudyMove[] = [...r.studies].filter(([id]) => moves.has(id)).map(([id, why]) => ({ ...moves.get(id)!, because: [...why] }));
    if (!mine.length) continue;
    const { text, html } = composeMail({
      greeting: `Hello ${r.name},`,
      paragraphs: [
        `New data landed through ${from}: ${what}. ${mine.length === 1 ? 'One study you follow moved' : `${mine.length} studies you follow moved`}:`,
        ...mine.map(describeMove),
        CAUTION_LINE,
      ],
      action: { label: mine.length === 1 ? 'Open the study' : 'Open your studies', url: `${deps.config.publicOrigin}/studies${mine.length === 1 ? `/${mine[0].studyId}` : ''}` },
      footer: '— Tidegauge. Turn these messages off on your Profile page.',
    });
    const subject = `New data: ${what}`.slice(0, 200);
    if (await deps.mailer.send({ to: r.email, subject, text, html })) sent.push({ to: r.email, studies: mine.map((m) => m.studyId) });
    else failed.push(r.email);
  }
  deps.logger?.info({ sent: sent.length, failed: failed.length, source: landed.source }, 'release alerts sent');
  return { sent, failed };
}
