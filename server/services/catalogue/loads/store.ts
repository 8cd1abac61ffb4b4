/**
 * Storing a checked load: one new vintage per changed series, all in one transaction (a failure
 * anywhere stores nothing), and the list of past loads.
 */
import type { Db } from '../../../db.js';
import { badRequest, conflict, unprocessable } from '../../../lib/errors.js';
import type { Progress } from '../../../lib/stream.js';
import type { LoadFields, LoadSummary, StoredLoadVintage } from '../../../schemas/catalogue.js';
import { audit } from '../../audit.js';
import { iso } from '../rows.js';
import { insertObservations, keepVintageMetadata } from '../vintages.js';
import { allProblems, type CheckedLoad } from './preview.js';
import { transaction } from '../../../lib/retry.js';
import type { AlertDeps, VintagesLanded } from '../../alerts/landed.js';
import { deliverSoon, queueReleaseAlerts } from '../../alerts/outbox.js';

/**
 * Stores a checked load. Series rows are locked in id order, so concurrent loads of the same
 * series queue up and take the numbers n and n+1, never the same one. On a Galera cluster the
 * lock holds on one node only: a load on another node collides at commit on the unique
 * (series_id, number) and the whole transaction runs again (lib/retry.ts). A load with errors, a load
 * that changes nothing and a file that differs from the one previewed are refused. With `alerts`,
 * the people whose gaps the new vintages move hear of it after the commit: the job is queued in the
 * same transaction (services/alerts/outbox.ts); `announce` says where the vintages came from.
 */
export async function storeLoad(
  db: Db,
  actorId: number,
  preview: CheckedLoad,
  fields: LoadFields,
  ip?: string,
  onProgress?: Progress,
  alerts?: AlertDeps,
  announce: Pick<VintagesLanded, 'source' | 'label'> = { source: 'load', label: `a load of ${preview.filename}` },
): Promise<{ loadId: number; vintages: StoredLoadVintage[] }> {
  if (preview.errors > 0) {
    throw unprocessable('file_has_errors', `The file has ${preview.errors} problem${preview.errors === 1 ? '' : 's'} to fix before it can be stored; nothing was stored.`, allProblems(preview).filter((p) => p.severity === 'error').slice(0, 200));
  }
  const asOf = fields.asOf ?? new Date().toISOString().slice(0, 10);
  if (asOf > new Date().toISOString().slice(0, 10)) throw badRequest('as_of_in_future', `The as-of date ${asOf} is in the future; a release is dated when it was published.`);
  const candidates = preview.series.filter((s) => s.series && !s.identicalToLatest);
  if (candidates.length === 0) {
    const v = preview.series[0]?.latestVintage;
    throw conflict('no_change', `Nothing new: the file matches the latest vintage${preview.series.length === 1 && v ? ` (${v})` : 's'} exactly, so no vintage was stored.`);
  }
  if (fields.expectChecksum && (candidates.length !== 1 || candidates[0].checksum !== fields.expectChecksum)) {
    throw conflict('preview_mismatch', 'The file differs from the one previewed; preview it again before storing.');
  }
  const total = candidates.reduce((n, c) => n + c.rowCount, 0);
  let written = 0;
  const stored = await transaction(db, async (trx) => {
    written = 0; // a retried attempt reports its progress from the start
    const ids = candidates.map((c) => c.series!.id).sort((a, b) => a - b);
    for (let i = 0; i < ids.length; i += 1000) await trx('series').whereIn('id', ids.slice(i, i + 1000)).forUpdate().select('id');
    const latestNumber = new Map<number, { n: number; checksum: string }>();
    for (let i = 0; i < ids.length; i += 1000) {
      const rows = await trx('vintages as v')
        .whereIn('v.series_id', ids.slice(i, i + 1000))
        .whereRaw('v.number = (SELECT MAX(v2.number) FROM vintages v2 WHERE v2.series_id = v.series_id)')
        .select('v.series_id', 'v.number', 'v.checksum');
      for (const r of rows) latestNumber.set(r.series_id, { n: r.number, checksum: r.checksum });
    }
    // Another load may have stored the same data while this one waited for the lock.
    const todo = candidates.filter((c) => latestNumber.get(c.series!.id)?.checksum !== c.checksum);
    if (todo.length === 0) throw conflict('no_change', 'Nothing new: the same data was stored a moment ago by another load.');
    const [loadId] = await trx('loads').insert({
      created_by: actorId,
      filename: preview.filename.slice(0, 255),
      format: preview.format,
      series_count: todo.length,
      observation_count: todo.reduce((n, c) => n + c.rowCount, 0),
      note: fields.note ?? null,
    });
    const out: StoredLoadVintage[] = [];
    for (const c of todo) {
      const number = (latestNumber.get(c.series!.id)?.n ?? 0) + 1;
      const [vintageId] = await trx('vintages').insert({
        series_id: c.series!.id,
        number,
        as_of: asOf,
        note: fields.note ?? null,
        row_count: c.rowCount,
        checksum: c.checksum,
        first_period: c.firstPeriod,
        last_period: c.lastPeriod,
        load_id: loadId,
        created_by: actorId,
      });
      await insertObservations(trx, [{ vintageId, periods: c.periods, values: c.values }], (rows) => {
        written += rows;
        onProgress?.('storing', written, total);
      });
      out.push({ seriesId: c.series!.id, code: c.series!.code, number, asOf, rowCount: c.rowCount, checksum: c.checksum! });
    }
    await keepVintageMetadata(trx, loadId);
    await audit(trx, { actorId, action: 'load.store', targetType: 'load', targetId: loadId, details: { filename: preview.filename, vintages: out.map((o) => `${o.code}#${o.number}`).slice(0, 50), count: out.length }, ip });
    const job = alerts ? await queueReleaseAlerts(trx, { series: out.map((v) => ({ seriesId: v.seriesId, numbers: [v.number] })), actorId, ...announce }) : null;
    return { loadId, vintages: out, job };
  });
  // After the commit: the vintages are there for whoever reads them, and a retried transaction queued one job.
  if (alerts && stored.job) deliverSoon(alerts, stored.job);
  return { loadId: stored.loadId, vintages: stored.vintages };
}

export async function listLoads(db: Db, limit = 100): Promise<LoadSummary[]> {
  const rows = await db('loads as l').leftJoin('users as u', 'u.id', 'l.created_by').orderBy('l.id', 'desc').limit(limit).select('l.*', 'u.name as creator_name');
  return rows.map((r) => ({
    id: r.id,
    filename: r.filename,
    format: r.format,
    seriesCount: r.series_count,
    observationCount: r.observation_count,
    note: r.note,
    createdAt: iso(r.created_at)!,
    createdBy: r.creator_name,
  }));
}
