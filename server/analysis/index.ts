/**
 * Tidegauge's decomposition library: `decompose(request) → response`, the function behind
 * `POST /api/v1/decompose`, the bench and the reference tests. Pure: arrays in, arrays out.
 *
 * Inside the library `input`, `trend` and `cycle` are Float64Arrays with NaN for "no value"; the
 * HTTP layer turns NaN into null (toJsonResponse). Leading and trailing missing values are trimmed
 * before filtering and come back as NaN; interior gaps are handled by each method as documented.
 *
 * Example:
 *   decompose({ frequency: 'Q', start: '1990-Q1', values: gdp, transform: 'log100', method: 'hp' })
 *   → { method: 'hp', params: { lambda: 1600 }, periods: ['1990-Q1', …], input, trend, cycle, warnings }
 */
import { boostedHp, BOOSTED_BIC_MAX_N } from './boosted.js';
import { baxterKingCycle, christianoFitzgerald } from './bandpass.js';
import {
  cutoffPeriod,
  defaultParams,
  FREQUENCIES,
  HP_CONVENTION,
  METHOD_NAMES,
  METHODS,
  PERIODS_PER_YEAR,
  PERIOD_WORD,
  TWO_SIDED,
  type Frequency,
  type Method,
} from './frequency.js';
import { hamiltonFilter } from './hamilton.js';
import { l1Trend } from './l1trend.js';
import { periodIndex, periodRange } from './periods.js';
import { applyTransform, type Transform } from './transform.js';
import { hpCycleInto, hpOneSidedCycle, hpOneSidedTrendWeighted, whittakerCycle, whittakerTrendFilled, whittakerTrendWeighted } from './whittaker.js';
import { SingularSystemError } from './banded.js';
import { AnalysisError } from './errors.js';
import { paramSchemas, MAX_VALUES } from '../schemas/decompose.js';

export type { Transform };
export { AnalysisError };
export * from './frequency.js';

export interface DecomposeRequest {
  frequency: Frequency;
  start?: string;
  values: ArrayLike<number | null>;
  transform?: Transform;
  method: Method;
  params?: Record<string, unknown>;
}

export interface Diagnostics {
  /** Boosted HP: iterations actually run. */
  iterationsUsed?: number;
  /** Boosted HP with BIC: the criterion at each iteration. */
  criterion?: number[];
  /** ℓ1 trend filtering. */
  dualityGap?: number;
  iterations?: number;
  converged?: boolean;
  lambdaMax?: number;
  /** Hamilton: [β₀, β₁, …] and the rows of the regression. */
  coefficients?: number[];
  observationsUsed?: number;
  /** λ-based methods: the period at which the trend gain is one half. */
  cutoffPeriod?: number | null;
  gaps?: number;
}

export interface DecomposeResult {
  method: Method;
  params: Record<string, number | string | boolean>;
  transform: Transform;
  frequency: Frequency;
  periods?: string[];
  input: Float64Array;
  trend: Float64Array;
  cycle: Float64Array;
  warnings: string[];
  diagnostics: Diagnostics;
}

const MIN_POINTS: Partial<Record<Method, number>> = { hp: 3, 'hp-one-sided': 3, 'boosted-hp': 3, 'l1-trend': 3, 'christiano-fitzgerald': 4 };

function fillParams(method: Method, frequency: Frequency, given: Record<string, unknown> | undefined) {
  const defaults = defaultParams(method, frequency);
  const merged: Record<string, unknown> = { ...defaults, ...(given ?? {}) };
  if (method === 'l1-trend' && merged.lambda === undefined) {
    throw new AnalysisError('missing_parameter', 'ℓ1 trend filtering needs params.lambda (for example 10 for quarterly data in 100 × log); it has no conventional default.');
  }
  const schema = paramSchemas[method];
  const parsed = schema.safeParse(merged);
  if (!parsed.success) {
    const issue = parsed.error.issues[0];
    const name = issue.path.join('.');
    const message =
      issue.code === 'unrecognized_keys'
        ? `${METHOD_NAMES[method]} has no parameter ${(issue as { keys?: string[] }).keys?.join(', ')}; its parameters are ${Object.keys(schema.shape).join(', ')}.`
        : `params.${name || '?'}: ${issue.message}`;
    throw new AnalysisError('invalid_parameter', message, parsed.error.issues.map((i) => ({ path: `params.${i.path.join('.')}`, message: i.message })));
  }
  return parsed.data as Record<string, number | string | boolean>;
}

function readValues(values: ArrayLike<number | null>): Float64Array {
  if (values == null || typeof (values as ArrayLike<unknown>).length !== 'number') {
    throw new AnalysisError('invalid_values', 'values must be an array of numbers or null.');
  }
  const n = values.length;
  if (n > MAX_VALUES) throw new AnalysisError('too_many_values', `Send at most ${MAX_VALUES.toLocaleString('en-US')} values; this request has ${n.toLocaleString('en-US')}.`);
  if (values instanceof Float64Array) return values;
  const out = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const v = values[i];
    if (v === null || v === undefined) out[i] = NaN;
    else if (typeof v === 'number' && Number.isFinite(v)) out[i] = v;
    else {
      const shown = typeof v === 'string' ? `the text "${String(v).slice(0, 20)}"` : String(v);
      throw new AnalysisError('invalid_values', `values[${i}] is ${shown}; every value must be a finite number, or null where it is missing.`, [{ path: `values.${i}`, message: 'not a finite number or null' }]);
    }
  }
  return out;
}

/** Decomposes one series into trend and cycle. Throws AnalysisError on a request it cannot compute. */
export function decompose(request: DecomposeRequest): DecomposeResult {
  const { frequency } = request;
  if (!FREQUENCIES.includes(frequency)) throw new AnalysisError('invalid_frequency', 'frequency must be "A", "Q" or "M".');
  const method = request.method;
  if (!METHODS.includes(method)) throw new AnalysisError('unknown_method', `There is no method "${String(method)}"; choose one of ${METHODS.join(', ')}.`);
  const transform: Transform = request.transform ?? 'none';
  if (!['none', 'log', 'log100'].includes(transform)) throw new AnalysisError('invalid_transform', 'transform must be "none", "log" or "log100".');
  const params = fillParams(method, frequency, request.params);
  const raw = readValues(request.values);
  const n = raw.length;

  let periods: string[] | undefined;
  if (request.start !== undefined) {
    if (periodIndex(request.start, frequency) === null) {
      const example = frequency === 'A' ? '1990' : frequency === 'Q' ? '1990-Q1' : '1990-01';
      throw new AnalysisError('invalid_start', `start "${request.start}" is not a ${frequency} period; write it like ${example}.`);
    }
    periods = periodRange(request.start, n, frequency);
  }

  const transformed = transform === 'none' && request.values instanceof Float64Array ? { ok: raw } : applyTransform(raw, transform);
  if ('badIndex' in transformed) {
    const i = transformed.badIndex;
    const where = periods ? `at ${periods[i]}` : `at index ${i}`;
    throw new AnalysisError('log_of_non_positive', `The value ${raw[i]} ${where} is not positive, so it has no logarithm; use transform "none" or remove it.`);
  }
  const input = transformed.ok;

  let lo = 0;
  while (lo < n && Number.isNaN(input[lo])) lo++;
  let hi = n - 1;
  while (hi >= lo && Number.isNaN(input[hi])) hi--;
  const m = hi - lo + 1;
  const core = input.subarray(lo, hi + 1);
  let gaps = 0;
  for (let i = 0; i < m; i++) if (Number.isNaN(core[i])) gaps++;
  const observed = m - gaps;

  const need = minimumLength(method, params);
  if (observed < need.count) {
    throw new AnalysisError('series_too_short', `${METHOD_NAMES[method]} needs at least ${need.count} observations${need.why ? ` (${need.why})` : ''}; this series has ${observed}.`);
  }
  if (gaps > 0 && (method === 'christiano-fitzgerald' || method === 'boosted-hp' || method === 'l1-trend')) {
    throw new AnalysisError('gaps_not_supported', `${METHOD_NAMES[method]} needs a series without gaps; this one has ${gaps} missing value${gaps === 1 ? '' : 's'} inside the sample. Fill them, shorten the series, or use hp, whittaker, hamilton or baxter-king.`);
  }

  // Outputs are written in place through views of the trimmed sample.
  const trend = new Float64Array(n);
  const cycle = new Float64Array(n);
  trend.fill(NaN, 0, lo);
  cycle.fill(NaN, 0, lo);
  trend.fill(NaN, hi + 1);
  cycle.fill(NaN, hi + 1);
  const trendCore = trend.subarray(lo, hi + 1);
  const cycleCore = cycle.subarray(lo, hi + 1);
  const diagnostics: Diagnostics = {};
  const warnings: string[] = [];
  const lambda = Number(params.lambda);

  switch (method) {
    case 'hp':
    case 'whittaker': {
      const order = method === 'hp' ? 2 : Number(params.order);
      if (gaps === 0 && order === 2) {
        hpCycleInto(core, lambda, cycleCore, trendCore);
      } else if (gaps === 0) {
        whittakerCycle(core, lambda, order, cycleCore);
        for (let i = 0; i < m; i++) trendCore[i] = core[i] - cycleCore[i];
      } else {
        // Gaps: the filled-gap iteration (accurate at large λ), else the direct weighted solve.
        const filled = lambda >= 100 ? whittakerTrendFilled(core, lambda, order) : null;
        if (filled) trendCore.set(filled);
        else {
          const w = new Float64Array(m);
          for (let i = 0; i < m; i++) w[i] = Number.isNaN(core[i]) ? 0 : 1;
          trendCore.set(solveOrRefuse(() => whittakerTrendWeighted(core, w, lambda, order)));
        }
        for (let i = 0; i < m; i++) cycleCore[i] = core[i] - trendCore[i];
      }
      diagnostics.cutoffPeriod = cutoffPeriod(lambda, order);
      break;
    }
    case 'hp-one-sided': {
      if (gaps === 0) {
        cycleCore.set(hpOneSidedCycle(core, lambda));
        for (let i = 0; i < m; i++) trendCore[i] = core[i] - cycleCore[i];
      } else {
        const w = new Float64Array(m);
        for (let i = 0; i < m; i++) w[i] = Number.isNaN(core[i]) ? 0 : 1;
        trendCore.set(solveOrRefuse(() => hpOneSidedTrendWeighted(core, w, lambda)));
        for (let i = 0; i < m; i++) cycleCore[i] = core[i] - trendCore[i];
      }
      diagnostics.cutoffPeriod = cutoffPeriod(lambda, 2);
      warnings.push('The one-sided filter starts at the third period, and its first years rest on few observations.');
      break;
    }
    case 'hamilton': {
      const h = Number(params.h);
      const p = Number(params.p);
      let result;
      try {
        result = hamiltonFilter(core, h, p);
      } catch (error) {
        throw new AnalysisError('series_too_short', `Hamilton regression: ${(error as Error).message}.`);
      }
      trendCore.set(result.trend);
      cycleCore.set(result.cycle);
      diagnostics.coefficients = result.coefficients;
      diagnostics.observationsUsed = result.observationsUsed;
      break;
    }
    case 'baxter-king': {
      const k = Number(params.k);
      const c = baxterKingCycle(core, Number(params.low), Number(params.high), k);
      cycleCore.set(c);
      for (let i = 0; i < m; i++) trendCore[i] = core[i] - c[i];
      break;
    }
    case 'christiano-fitzgerald': {
      const { cycle } = christianoFitzgerald(core, Number(params.low), Number(params.high), Boolean(params.drift));
      cycleCore.set(cycle);
      for (let i = 0; i < m; i++) trendCore[i] = core[i] - cycle[i];
      break;
    }
    case 'boosted-hp': {
      if (params.stopping === 'bic' && m > BOOSTED_BIC_MAX_N) {
        throw new AnalysisError('series_too_long', `Boosted HP with BIC stopping handles at most ${BOOSTED_BIC_MAX_N} observations; use stopping "fixed" for longer series.`);
      }
      const r = boostedHp(core, lambda, params.stopping as 'bic' | 'fixed', Number(params.iterations));
      trendCore.set(r.trend);
      cycleCore.set(r.cycle);
      diagnostics.iterationsUsed = r.iterations;
      if (r.criterion.length) diagnostics.criterion = r.criterion;
      diagnostics.cutoffPeriod = cutoffPeriod(lambda, 2);
      if (params.stopping === 'bic' && r.iterations === Number(params.iterations)) {
        warnings.push(`The BIC rule did not stop within ${params.iterations} iterations; the result is after the cap.`);
      }
      break;
    }
    case 'l1-trend': {
      const r = l1Trend(core, lambda);
      trendCore.set(r.trend);
      for (let i = 0; i < m; i++) cycleCore[i] = core[i] - r.trend[i];
      Object.assign(diagnostics, { dualityGap: r.dualityGap, iterations: r.iterations, converged: r.converged, lambdaMax: r.lambdaMax });
      if (!r.converged) warnings.push(`ℓ1 trend filtering stopped after ${r.iterations} iterations with a duality gap of ${r.dualityGap.toPrecision(3)}.`);
      if (lambda >= r.lambdaMax) warnings.push(`λ is at or above λ_max = ${r.lambdaMax.toPrecision(4)}: the trend is the least-squares straight line.`);
      break;
    }
  }

  if (gaps > 0) {
    for (let i = 0; i < m; i++) if (Number.isNaN(core[i])) cycleCore[i] = NaN;
    diagnostics.gaps = gaps;
  }

  warnings.unshift(...cautions(method, frequency, params, gaps));
  return { method, params, transform, frequency, periods, input, trend, cycle, warnings, diagnostics };
}

/** A direct banded solve that cannot be factorized (λ far too large for the data) is a 400, not a crash. */
function solveOrRefuse(solve: () => Float64Array): Float64Array {
  try {
    return solve();
  } catch (error) {
    if (error instanceof SingularSystemError) {
      throw new AnalysisError('lambda_too_large', 'λ is too large for this series with gaps: the system cannot be solved accurately. Use a smaller λ, or fill the gaps.');
    }
    throw error;
  }
}

function minimumLength(method: Method, params: Record<string, unknown>): { count: number; why?: string } {
  if (method === 'hamilton') {
    const h = Number(params.h);
    const p = Number(params.p);
    return { count: h + 2 * p + 1, why: `h + 2p + 1 with h = ${h}, p = ${p}, so that the regression has more rows than coefficients` };
  }
  if (method === 'baxter-king') {
    const k = Number(params.k);
    return { count: 2 * k + 1, why: `2K + 1 with K = ${k}` };
  }
  if (method === 'whittaker') return { count: Number(params.order) + 1, why: `order + 1` };
  return { count: MIN_POINTS[method] ?? 3 };
}

function cautions(method: Method, frequency: Frequency, params: Record<string, unknown>, gaps: number): string[] {
  const out: string[] = [];
  const s = PERIODS_PER_YEAR[frequency];
  if (TWO_SIDED[method]) {
    const k = 2 * s;
    out.push(`Two-sided filter: the last ${k} ${PERIOD_WORD[frequency][1]} (two years) use data that do not exist yet and will be revised as new data arrive.`);
  }
  if (method === 'hp' || method === 'whittaker' || method === 'boosted-hp' || method === 'hp-one-sided') {
    out.push('The Hodrick–Prescott family can produce cycles that are not in the data (Hamilton 2018); compare with another method before drawing conclusions.');
    const lambda = Number(params.lambda);
    for (const f of FREQUENCIES) {
      if (f !== frequency && HP_CONVENTION[f] === lambda && HP_CONVENTION[frequency] !== lambda) {
        out.push(`λ = ${lambda} is the convention for ${f === 'A' ? 'annual' : f === 'Q' ? 'quarterly' : 'monthly'} data; for this series it would be ${HP_CONVENTION[frequency]}.`);
      }
    }
  }
  if (gaps > 0 && method !== 'hamilton' && method !== 'baxter-king') {
    out.push(`${gaps} missing value${gaps === 1 ? '' : 's'} inside the sample: the trend runs through ${gaps === 1 ? 'it' : 'them'} with weight zero.`);
  }
  return out;
}

export interface DecomposeJson {
  method: Method;
  params: Record<string, number | string | boolean>;
  transform: Transform;
  frequency: Frequency;
  periods?: string[];
  input: (number | null)[];
  trend: (number | null)[];
  cycle: (number | null)[];
  warnings: string[];
  diagnostics: Diagnostics;
}

export function nullable(a: ArrayLike<number>): (number | null)[] {
  const out = new Array<number | null>(a.length);
  for (let i = 0; i < a.length; i++) out[i] = Number.isNaN(a[i]) ? null : a[i];
  return out;
}

/** The JSON form of a result: NaN becomes null (API.md: missing values are null, never NaN). */
export function toJsonResponse(r: DecomposeResult): DecomposeJson {
  const diagnostics = { ...r.diagnostics };
  return {
    method: r.method,
    params: r.params,
    transform: r.transform,
    frequency: r.frequency,
    ...(r.periods ? { periods: r.periods } : {}),
    input: nullable(r.input),
    trend: nullable(r.trend),
    cycle: nullable(r.cycle),
    warnings: r.warnings,
    diagnostics,
  };
}

export type BatchOutcome = { ok: true; result: DecomposeResult } | { ok: false; error: { code: string; message: string } };

/** Many decompositions; one failing item does not stop the others. Equal-length HP runs share a factorization. */
export function decomposeBatch(requests: DecomposeRequest[]): BatchOutcome[] {
  return requests.map((req) => {
    try {
      return { ok: true as const, result: decompose(req) };
    } catch (error) {
      if (error instanceof AnalysisError) return { ok: false as const, error: { code: error.code, message: error.message } };
      return { ok: false as const, error: { code: 'computation_failed', message: `The computation failed: ${(error as Error).message}.` } };
    }
  });
}

export { gainCurve } from './gain.js';
export { cycleStatistics, crossCorrelations, reliability, turningPoints } from './stats.js';
