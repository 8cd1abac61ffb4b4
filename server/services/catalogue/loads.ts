/**
 * A Load: one upload that becomes vintages. `loadFile` is the one service call behind both load
 * routes: it reads and checks the file, and then either answers the preview (`dryRun`) or stores
 * every changed series as a new vintage in one transaction and answers what it stored. A file
 * with errors stores nothing (422 with the problems by row and column).
 */
import type { Db } from '../../db.js';
import type { Progress } from '../../lib/stream.js';
import type { LoadAnswer, LoadFields } from '../../schemas/catalogue.js';
import { previewJson, previewLoad, type UploadedFile } from './loads/preview.js';
import { storeLoad } from './loads/store.js';
import type { AlertDeps } from '../alerts/landed.js';

export { listLoads } from './loads/store.js';
export type { UploadedFile };

/** Previews of loads into one series carry the observations up to this many (for the chart). */
const PREVIEW_OBSERVATIONS_MAX = 5000;
/** Stored loads of many series answer the preview of the first this many. */
const STORED_PREVIEW_SERIES_MAX = 200;

export interface LoadRequest {
  file: UploadedFile;
  fields: LoadFields;
  dryRun: boolean;
  /** A load into one series (POST /series/:id/vintages); without it, every series in the file is matched. */
  seriesId?: number;
  actor: { id: number; ip?: string };
  onProgress?: Progress;
  /** Mail and background work for the release alerts of what is stored (services/alerts). */
  alerts?: AlertDeps;
}

export async function loadFile(db: Db, request: LoadRequest): Promise<LoadAnswer> {
  const { file, fields, dryRun, seriesId, actor, onProgress, alerts } = request;
  const checked = await previewLoad(db, file, seriesId, onProgress);
  if (dryRun) {
    return { preview: previewJson(checked, { withObservations: seriesId !== undefined && checked.observations <= PREVIEW_OBSERVATIONS_MAX }) };
  }
  const storeFields = seriesId !== undefined ? fields : { note: fields.note, asOf: fields.asOf };
  const stored = await storeLoad(db, actor.id, checked, storeFields, actor.ip, onProgress, alerts);
  const preview = previewJson(checked, { withObservations: false });
  if (seriesId !== undefined) {
    const v = stored.vintages[0];
    return { vintage: { number: v.number, asOf: v.asOf, rowCount: v.rowCount, checksum: v.checksum }, loadId: stored.loadId, preview };
  }
  return {
    load: { id: stored.loadId },
    vintages: stored.vintages,
    unchanged: checked.series.filter((s) => s.identicalToLatest).map((s) => s.series!.code),
    preview: { ...preview, series: preview.series.slice(0, STORED_PREVIEW_SERIES_MAX) },
  };
}
