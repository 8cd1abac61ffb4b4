/** A study's specification run on its stored series: the check behind saving, and the start of every result. */
import { decompose } from '../../analysis/index.js';
import type { Db } from '../../db.js';
import type { StudySpec } from '../../schemas/studies.js';
import { readSeriesValues } from '../catalogue/stored-values.js';

/** Runs a specification on its stored series: the data and the decomposition (AnalysisError → 400). */
export async function runSpec(db: Db, spec: StudySpec) {
  const data = await readSeriesValues(db, spec.seriesId, spec.vintage);
  const r = decompose({ frequency: data.series.frequency, start: data.start ?? undefined, values: data.values, transform: spec.transform, method: spec.method, params: spec.params });
  return { params: r.params, data, result: r };
}
