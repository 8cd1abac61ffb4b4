/**
 * "Rerun as a script": a study as a Python program (script-template.ts) that fetches its exact
 * vintage through the API, recomputes it with statsmodels where statsmodels has the method and
 * through POST /decompose otherwise, and checks the numbers the study showed.
 */
import type { Db } from '../../db.js';
import type { ExportFile } from '../../importers/export.js';
import { SCRIPT_TEMPLATE } from './script-template.js';
import { studyResult } from './results.js';
import type { AnalysisPool } from '../../workers/pool.js';

/** The methods the script recomputes with statsmodels (the rest go through POST /decompose). */
export const STATSMODELS_METHODS = ['hp', 'baxter-king', 'christiano-fitzgerald', 'uc'] as const;

/** Largest difference allowed, relative to the size of the cycle (at least 1): the same filters agree to about 1e-9. */
const TOLERANCE = 1e-6;

/** JSON that sits safely inside a Python raw string in single triple quotes: no quote of that kind at all. */
const embed = (value: unknown) => JSON.stringify(value).replace(/'/g, '\\u0027');

export async function studyScript(db: Db, id: number, origin: string, pool?: AnalysisPool): Promise<ExportFile> {
  const r = await studyResult(db, id, pool);
  const dataLength = r.extension ? r.extension.from : r.periods.length;
  const study = {
    id: r.study.id,
    title: r.study.title,
    origin,
    seriesId: r.series.id,
    seriesCode: r.series.code,
    frequency: r.frequency,
    start: r.periods[0] ?? null,
    dataLength,
    vintage: r.vintage,
    asOf: r.asOf,
    transform: r.transform,
    method: r.method,
    params: r.params,
    diagnostics: r.diagnostics,
    methodLine: r.methodLine,
    tolerance: TOLERANCE,
  };
  const filename = `study-${r.study.id}.py`;
  // The fixed words first, the study's own text last (through functions: no "$" patterns apply).
  const body = SCRIPT_TEMPLATE.replaceAll('__STUDY_ID__', String(r.study.id))
    .replaceAll('__WRITTEN_AT__', new Date().toISOString().slice(0, 16).replace('T', ' ') + ' UTC')
    .replaceAll('__ORIGIN__', origin.replace(/[^A-Za-z0-9:/._-]/g, ''))
    .replaceAll('__FILENAME__', filename)
    .replace('__SHOWN_JSON__', () => embed({ periods: r.periods, cycle: r.cycle, trend: r.trend }))
    .replace('__STUDY_JSON__', () => embed(study));
  return { filename, contentType: 'text/x-python; charset=utf-8', body };
}
