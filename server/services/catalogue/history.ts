/**
 * History loads: a series' whole release history from one file (importers/history.ts reads it),
 * compared release by release with the one before (the first with the latest stored vintage),
 * previewed, and stored as vintages numbered in release order, all in one transaction.
 */
import type { Db } from '../../db.js';
import { badRequest, conflict, unprocessable } from '../../lib/errors.js';
import { transaction } from '../../lib/retry.js';
import { readGrid } from '../../importers/grid.js';
import { readHistory, type Release } from '../../importers/history.js';
import { readPeriodCell } from '../../importers/release-labels.js';
import type { FileProblem, RevisionSummary } from '../../schemas/catalogue.js';
import type { HistoryAnswer, HistoryFields, HistorySkipped, HistoryVintage } from '../../schemas/history.js';
import type { AlertDeps } from '../alerts/landed.js';
import { deliverSoon, queueReleaseAlerts } from '../alerts/outbox.js';
import { audit } from '../audit.js';
import { dateOnly } from './rows.js';
import { getSeries } from './series.js';
import { checksumOf, insertObservations, keepVintageMetadata, observationsOf } from './vintages.js';
import type { UploadedFile } from './loads/preview.js';
import { revisionSummaryOf } from './revisions.js';

export interface HistoryRequest {
  seriesId: number;
  file: UploadedFile;
  fields: HistoryFields;
  dryRun: boolean;
  actor: { id: number; ip?: string };
  alerts?: AlertDeps;
}

interface Candidate extends Release {
  checksum: string;
  changes: RevisionSummary;
}

const today = () => new Date().toISOString().slice(0, 10);

async function latestStored(db: Db, seriesId: number) {
  const v = await db('vintages').where('series_id', seriesId).orderBy('number', 'desc').first('id', 'number', 'as_of', 'checksum');
  if (!v) return null;
  return { number: v.number as number, asOf: dateOnly(v.as_of), checksum: v.checksum as string, ...(await observationsOf(db, v.id)) };
}

export async function loadHistory(db: Db, request: HistoryRequest): Promise<HistoryAnswer> {
  const { seriesId, file, fields, dryRun, actor } = request;
  const series = await getSeries(db, seriesId);
  // Without a sheet named: the one named after the series, else the first with periods down its first column.
  const periodsDown = (cells: string[]) => cells.filter((c) => c.trim() && !('error' in readPeriodCell(c, series.frequency))).length >= 4;
  const grid = await readGrid(file.buffer, file.filename, { sheet: fields.sheet, preferSheet: series.code, looksLikeData: periodsDown });
  const read = readHistory(grid, series.frequency, fields);
  const problems: FileProblem[] = [...read.problems];
  if (grid.droppedReferences) problems.push({ row: null, column: null, message: `The workbook refers to ${grid.droppedReferences} part${grid.droppedReferences === 1 ? '' : 's'} it does not contain (a drawing, a chart or a comment); they were left out and the cells read.`, severity: 'warning' });
  // Vintages are numbered in release order: releases are taken by date (the file's order kept for a tie).
  const releases = read.releases.map((r, i) => ({ r, i })).sort((a, b) => (a.r.asOf < b.r.asOf ? -1 : a.r.asOf > b.r.asOf ? 1 : a.i - b.i)).map((x) => x.r);
  if (releases.some((r, i) => r !== read.releases[i])) problems.push({ row: read.headerRow, column: null, message: 'The releases are not in date order in the file; they are numbered by release date.', severity: 'warning' });
  const latest = await latestStored(db, seriesId);
  const skipped: HistorySkipped[] = [];
  const candidates: Candidate[] = [];
  let before: { periods: string[]; values: (number | null)[]; checksum: string; what: string } | null = latest ? { ...latest, what: `the latest stored vintage (${latest.number})` } : null;
  for (const r of releases) {
    if (!r.periods.length) {
      skipped.push({ column: r.column, label: r.label, reason: 'empty: no values' });
      continue;
    }
    const checksum = checksumOf(r.periods, r.values);
    if (before && checksum === before.checksum) {
      skipped.push({ column: r.column, label: r.label, reason: `identical to ${before.what}` });
      continue;
    }
    const changes = before ? revisionSummaryOf(before, r) : { revised: 0, new: r.periods.length, removed: 0, unchanged: 0, meanRevision: null, meanAbsoluteRevision: null, maxAbsoluteRevision: null };
    candidates.push({ ...r, checksum, changes });
    before = { periods: r.periods, values: r.values, checksum, what: `the release before it (${r.column}, ${r.label})` };
  }
  for (const c of candidates) {
    if (c.asOf > today()) problems.push({ row: read.releaseDateRow ?? read.headerRow, column: c.column, message: `The release date ${c.asOf} is in the future; a release is dated when it was published.`, severity: 'error' });
  }
  const early = latest ? candidates.filter((c) => c.asOf < latest.asOf) : [];
  for (const c of early.slice(0, 50)) {
    problems.push({ row: read.releaseDateRow ?? read.headerRow, column: c.column, message: `Released ${c.asOf}, before the latest stored vintage (${latest!.number}, ${latest!.asOf}): vintage numbers follow release order and are pinned by studies and exhibits, so earlier releases cannot be added after it.`, severity: 'error' });
  }
  if (!candidates.length && releases.length) problems.push({ row: null, column: null, message: 'Every release is empty or identical to the one before it: there is nothing new to store.', severity: 'warning' });
  const errors = problems.filter((p) => p.severity === 'error').length;
  const first = (latest?.number ?? 0) + 1;
  const vintages: HistoryVintage[] = candidates.map((c, k) => ({ number: first + k, asOf: c.asOf, label: c.label, rowCount: c.periods.length, column: c.column, firstPeriod: c.periods[0] ?? null, lastPeriod: c.periods[c.periods.length - 1] ?? null, changes: c.changes }));
  const preview = {
    format: grid.format,
    filename: file.filename,
    sheets: grid.sheets,
    sheet: grid.sheet,
    layout: read.layout,
    headerRow: read.headerRow,
    releaseDateRow: read.releaseDateRow,
    detected: read.detected,
    headers: read.headers.slice(0, 2000),
    vintages,
    skipped,
    latestVintage: latest ? { number: latest.number, asOf: latest.asOf } : null,
    problems: problems.slice(0, 1000),
    errors,
    warnings: problems.length - errors,
    canStore: errors === 0 && candidates.length > 0,
  };
  if (dryRun) return { vintages, skipped, preview };
  if (early.length) throw conflict('release_before_latest', `${early.length} release${early.length === 1 ? ' is' : 's are'} dated before the latest stored vintage (${latest!.number}, released ${latest!.asOf}); vintage numbers follow release order and are pinned by studies and exhibits, so only later releases can be added. Nothing was stored.`, problems.filter((p) => p.severity === 'error').slice(0, 200));
  if (errors) throw unprocessable('file_has_errors', `The file has ${errors} problem${errors === 1 ? '' : 's'} to fix before it can be stored; nothing was stored.`, problems.filter((p) => p.severity === 'error').slice(0, 200));
  if (!candidates.length) throw conflict('no_change', 'Nothing new: every release in the file is empty or identical to the one before it, so no vintage was stored.');
  const { out: stored, job } = await storeHistory(db, series.id, series.code, candidates, latest, fields, file.filename, grid.format, actor, !!request.alerts);
  // After the commit: the job of the alerts was queued with the vintages.
  if (request.alerts && job) deliverSoon(request.alerts, job);
  const done = vintages.map((v, k) => ({ ...v, number: stored[k].number }));
  return { vintages: done, skipped, loadId: stored[0]?.loadId, preview: { ...preview, vintages: done } };
}

async function storeHistory(db: Db, seriesId: number, code: string, candidates: Candidate[], latest: { number: number; asOf: string } | null, fields: HistoryFields, filename: string, format: string, actor: { id: number; ip?: string }, alerts: boolean) {
  if (candidates.some((c) => c.asOf > today())) throw badRequest('as_of_in_future', 'A release date is in the future; a release is dated when it was published.');
  return transaction(db, async (trx) => {
    await trx('series').where('id', seriesId).forUpdate().select('id');
    const now = await trx('vintages').where('series_id', seriesId).orderBy('number', 'desc').first('number', 'as_of');
    // Another load may have landed while this one was checked: the same rules, against it.
    if ((now?.number ?? 0) !== (latest?.number ?? 0)) {
      const asOf = now ? dateOnly(now.as_of) : '';
      if (candidates[0].asOf < asOf) throw conflict('release_before_latest', `Vintage ${now.number} (released ${asOf}) was stored a moment ago, after the first release of this file; preview it again.`);
    }
    const [loadId] = await trx('loads').insert({ created_by: actor.id, filename: filename.slice(0, 255), format, series_count: 1, observation_count: candidates.reduce((n, c) => n + c.periods.length, 0), note: fields.note ?? null });
    // One statement for the vintages and a few for all their rows: hundreds of releases in a handful of round trips.
    const first = (now?.number ?? 0) + 1;
    const rows = candidates.map((c, k) => ({
      series_id: seriesId,
      number: first + k,
      as_of: c.asOf,
      note: fields.note ?? `From a history load: ${c.column} (${c.label.slice(0, 100)})`,
      row_count: c.periods.length,
      checksum: c.checksum,
      first_period: c.periods[0],
      last_period: c.periods[c.periods.length - 1],
      load_id: loadId,
      created_by: actor.id,
    }));
    for (let i = 0; i < rows.length; i += 500) await trx('vintages').insert(rows.slice(i, i + 500));
    const ids = new Map((await trx('vintages').where('load_id', loadId).select('id', 'number')).map((r) => [r.number as number, r.id as number]));
    await insertObservations(trx, candidates.map((c, k) => ({ vintageId: ids.get(first + k)!, periods: c.periods, values: c.values })));
    const out = candidates.map((_, k) => ({ number: first + k, loadId }));
    await keepVintageMetadata(trx, loadId);
    await audit(trx, { actorId: actor.id, action: 'load.history', targetType: 'load', targetId: loadId, details: { filename, code, vintages: out.map((o) => o.number), count: out.length }, ip: actor.ip });
    const job = alerts ? await queueReleaseAlerts(trx, { seriesId, numbers: out.map((v) => v.number), actorId: actor.id, source: 'history', label: `a history load of ${filename}` }) : null;
    return { out, job };
  });
}
