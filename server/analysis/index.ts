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

const JSON_KEYS = new Set(['method', 'params', 'transform', 'frequency', 'periods', 'input', 'trend', 'cycle', 'extension', 'warnings', 'diagnostics']);
const floats = (a: (number | null)[]) => Float64Array.from(a, (v) => (v === null ? NaN : v));

/** A result back from its JSON form (as a worker thread sends it): null becomes NaN; keys other than the result's own are extra series. */
export function fromJsonResponse(j: DecomposeJson): DecomposeResult {
  const series: Record<string, Float64Array> = {};
  for (const [k, v] of Object.entries(j)) if (!JSON_KEYS.has(k) && Array.isArray(v)) series[k] = floats(v as (number | null)[]);
  return {
    method: j.method,
    params: j.params as DecomposeResult['params'],
    transform: j.transform as DecomposeResult['transform'],
    frequency: j.frequency as DecomposeResult['frequency'],
    ...(j.periods ? { periods: j.periods } : {}),
    input: floats(j.input),
    trend: floats(j.trend),
    cycle: floats(j.cycle),
    series,
    ...(j.extension ? { extension: j.extension as DecomposeResult['extension'] } : {}),
    warnings: j.warnings,
    diagnostics: j.diagnostics as DecomposeResult['diagnostics'],
  };
}
