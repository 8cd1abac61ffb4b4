/**
 * Tidegauge's decomposition library, the front door: `decompose(request) → result` (the function
 * behind POST /api/v1/decompose, the bench and the reference tests), its JSON form, the method
 * registry, gain curves and cycle statistics. Pure: arrays in, arrays out; no Express, no Knex,
 * no I/O.
 *
 * Example:
 *   decompose({ frequency: 'Q', start: '1990-Q1', values: gdp, transform: 'log100', method: 'hp' })
 *   → { method: 'hp', params: { lambda: 1600 }, periods: ['1990-Q1', …], input, trend, cycle, warnings, diagnostics }
 *   toJsonResponse(result) → the same with null for missing values, as API.md answers it
 */
import type { DecomposeJson } from '../schemas/decompose.js';
import type { DecomposeResult } from './decompose.js';

export { AnalysisError } from './errors.js';
export { decompose, methodLine, resolveParams, type DecomposeRequest, type DecomposeResult } from './decompose.js';
export { describeMethods, findMethod, METHOD_REGISTRY, methodIds, methodName } from './methods/index.js';
export type { Diagnostics } from './methods/types.js';
export { gainCurve, type GainCurve } from './gain-curve.js';
export { cycleStatistics, crossCorrelations, reliability, turningPoints } from './stats.js';
export type { DecomposeJson };

/** Float64Array with NaN → array with null. */
export function nullable(a: ArrayLike<number>): (number | null)[] {
  const out = new Array<number | null>(a.length);
  for (let i = 0; i < a.length; i++) out[i] = Number.isNaN(a[i]) ? null : a[i];
  return out;
}

/** The JSON form of a result: NaN becomes null (API.md: missing values are null, never NaN); extra series by their names. */
export function toJsonResponse(r: DecomposeResult): DecomposeJson {
  return {
    method: r.method,
    params: r.params,
    transform: r.transform,
    frequency: r.frequency,
    ...(r.periods ? { periods: r.periods } : {}),
    input: nullable(r.input),
    trend: nullable(r.trend),
    cycle: nullable(r.cycle),
    ...Object.fromEntries(Object.entries(r.series).map(([k, v]) => [k, nullable(v)])),
    ...(r.extension ? { extension: r.extension } : {}),
    warnings: r.warnings,
    diagnostics: { ...r.diagnostics },
  };
}
