/**
 * decompose(request) → result: one series split into trend and cycle by a method of the registry
 * (server/analysis/methods/). This module does what every method shares: it checks the request,
 * fills the method's defaults by frequency, applies the transform, trims leading and trailing
 * missing values, enforces the method's minimum length and gap rule, runs it, puts the outputs
 * back on the full sample, and adds the cautions.
 *
 * Inside the library `input`, `trend`, `cycle` and extra series are Float64Arrays with NaN for
 * "no value"; toJsonResponse turns NaN into null (API.md: missing values are null, never NaN).
 *
 * The run is synchronous today. The steps are apart (prepare → method.run → finish) so that an
 * asynchronous method needs only an awaiting variant of decompose(), not a new structure.
 *
 * Example:
 *   decompose({ frequency: 'Q', start: '1990-Q1', values: gdp, transform: 'log100', method: 'hp' })
 *   → { method: 'hp', params: { lambda: 1600 }, periods: ['1990-Q1', …], input, trend, cycle, warnings, diagnostics }
 */
import { FREQUENCIES, PERIOD_WORD, PERIODS_PER_YEAR, type Frequency } from '../schemas/frequency.js';
import { MAX_VALUES, TRANSFORMS, type Transform } from '../schemas/decompose.js';
import type { ParamSpecs, ParamValue } from '../schemas/methods.js';
import { SingularSystemError } from './banded.js';
import { AnalysisError } from './errors.js';
import { findMethod, METHOD_REGISTRY, methodIds } from './methods/index.js';
import { paramsSchema } from './methods/params.js';
import type { AnyMethod, Diagnostics, MethodOutput } from './methods/types.js';
import { periodIndex, periodRange } from './periods.js';
import { applyTransform } from './transform.js';

export interface DecomposeRequest {
  frequency: Frequency;
  start?: string;
  values: ArrayLike<number | null>;
  transform?: Transform;
  method: string;
  params?: Record<string, unknown>;
}

export interface DecomposeResult {
  method: string;
  params: Record<string, ParamValue>;
  transform: Transform;
  frequency: Frequency;
  periods?: string[];
  input: Float64Array;
  trend: Float64Array;
  cycle: Float64Array;
  /** Extra output series of the method (for example cycleLower, cycleUpper), on the same periods. */
  series: Record<string, Float64Array>;
  /** Periods past the end of the input that the outputs carry (forecasts), and their label. */
  extension?: { from: number; periods: number; label: string };
  warnings: string[];
  diagnostics: Diagnostics;
}

const methodOf = (id: string): AnyMethod => {
  const m = findMethod(id);
  if (!m) throw new AnalysisError('unknown_method', `There is no method "${String(id)}"; choose one of ${methodIds().join(', ')}.`);
  return m;
};

/** The method's parameters with its defaults for the frequency filled in, checked. */
export function resolveParams(methodId: string, frequency: Frequency, given: Record<string, unknown> | undefined): Record<string, ParamValue> {
  return checkParams(methodOf(methodId), frequency, given);
}

function checkParams(method: AnyMethod, frequency: Frequency, given: Record<string, unknown> | undefined): Record<string, ParamValue> {
  const merged: Record<string, unknown> = { ...method.defaults(frequency), ...(given ?? {}) };
  for (const [name, spec] of Object.entries(method.params as ParamSpecs)) {
    if (merged[name] === undefined) {
      throw new AnalysisError('missing_parameter', `${method.name} needs params.${name}: it has no conventional default.${spec.hint ? ` ${spec.hint}` : ''}`);
    }
  }
  const schema = paramsSchema(method.params);
  const parsed = schema.safeParse(merged);
  if (!parsed.success) {
    const issue = parsed.error.issues[0];
    const name = issue.path.join('.');
    const message =
      issue.code === 'unrecognized_keys'
        ? `${method.name} has no parameter ${(issue as { keys?: string[] }).keys?.join(', ')}; its parameters are ${Object.keys(schema.shape).join(', ')}.`
        : `params.${name || '?'}: ${issue.message}`;
    // One problem per parameter: a bad λ fails several checks, but the person needs one sentence.
    const details = parsed.error.issues.map((i) => ({ path: `params.${i.path.join('.')}`, message: i.message })).filter((d, k, all) => all.findIndex((e) => e.path === d.path) === k);
    throw new AnalysisError('invalid_parameter', message, details);
  }
  const params = parsed.data as Record<string, ParamValue>;
  const broken = method.check?.(params);
  if (broken) throw new AnalysisError('invalid_parameter', `params.${broken.param}: ${broken.message}`, [{ path: `params.${broken.param}`, message: broken.message }]);
  return params;
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

/** A checked request, ready for its method: the trimmed sample `core` = input[lo..hi]. */
interface Prepared {
  method: AnyMethod;
  params: Record<string, ParamValue>;
  frequency: Frequency;
  transform: Transform;
  periods?: string[];
  start?: string;
  input: Float64Array;
  lo: number;
  hi: number;
  core: Float64Array;
  gaps: number;
}

function prepare(method: AnyMethod, request: DecomposeRequest): Prepared {
  const { frequency } = request;
  if (!FREQUENCIES.includes(frequency)) throw new AnalysisError('invalid_frequency', 'frequency must be "A", "Q" or "M".');
  const transform: Transform = request.transform ?? 'none';
  if (!TRANSFORMS.includes(transform)) throw new AnalysisError('invalid_transform', 'transform must be "none", "log" or "log100".');
  const params = checkParams(method, frequency, request.params);
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
  const core = input.subarray(lo, hi + 1);
  let gaps = 0;
  for (let i = 0; i < core.length; i++) if (Number.isNaN(core[i])) gaps++;

  const need = method.minimumLength(params);
  if (core.length - gaps < need.count) {
    throw new AnalysisError('series_too_short', `${method.name} needs at least ${need.count} observations${need.why ? ` (${need.why})` : ''}; this series has ${core.length - gaps}.`);
  }
  if (gaps > 0 && method.gaps === 'refused') {
    const able = METHOD_REGISTRY.filter((m) => m.gaps !== 'refused').map((m) => m.id);
    throw new AnalysisError('gaps_not_supported', `${method.name} needs a series without gaps; this one has ${gaps} missing value${gaps === 1 ? '' : 's'} inside the sample. Fill them, shorten the series, or use ${able.slice(0, -1).join(', ')} or ${able[able.length - 1]}.`);
  }
  return { method, params, frequency, transform, periods, start: request.start, input, lo, hi, core, gaps };
}

/** Puts the method's outputs back on the full sample (NaN outside it) and adds the cautions. */
function finish(p: Prepared, out: MethodOutput): DecomposeResult {
  const { method, params, frequency, input, lo, hi, core, gaps } = p;
  const m = core.length;
  const ext = out.extension?.periods ?? 0;
  // Forecast periods fill trailing missing periods first, then lengthen the sample.
  const n = Math.max(input.length, hi + 1 + ext);
  const place = (a: Float64Array) => {
    if (lo === 0 && a.length === n) return a; // the whole sample: no copy (1 000 000 values stay cheap)
    const full = new Float64Array(n).fill(NaN);
    full.set(a.subarray(0, m + ext), lo);
    return full;
  };
  const trend = place(out.trend);
  const cycle = place(out.cycle);
  if (gaps > 0) for (let i = 0; i < m; i++) if (Number.isNaN(core[i])) cycle[lo + i] = NaN;
  const series = Object.fromEntries(Object.entries(out.series ?? {}).map(([k, v]) => [k, place(v)]));
  const diagnostics: Diagnostics = { ...(out.diagnostics ?? {}) };
  if (gaps > 0) diagnostics.gaps = gaps;
  let fullInput = input;
  let periods = p.periods;
  if (n > input.length) {
    fullInput = new Float64Array(n).fill(NaN);
    fullInput.set(input);
    if (p.start !== undefined) periods = periodRange(p.start, n, frequency);
  }
  const warnings = [...cautions(method, params, frequency, gaps), ...(out.warnings ?? [])];
  return {
    method: method.id,
    params,
    transform: p.transform,
    frequency,
    periods,
    input: fullInput,
    trend,
    cycle,
    series,
    ...(out.extension ? { extension: { from: hi + 1, periods: ext, label: out.extension.label } } : {}),
    warnings,
    diagnostics,
  };
}

function cautions(method: AnyMethod, params: Record<string, ParamValue>, frequency: Frequency, gaps: number): string[] {
  const out: string[] = [];
  if (method.twoSided) {
    out.push(`Two-sided filter: the last ${2 * PERIODS_PER_YEAR[frequency]} ${PERIOD_WORD[frequency][1]} (two years) use data that do not exist yet and will be revised as new data arrive.`);
  }
  out.push(...(method.cautions?.(params, frequency) ?? []));
  if (gaps > 0 && method.gaps === 'weighted') {
    out.push(`${gaps} missing value${gaps === 1 ? '' : 's'} inside the sample: the trend runs through ${gaps === 1 ? 'it' : 'them'} with weight zero.`);
  }
  return out;
}

/** Decomposes one series into trend and cycle. Throws AnalysisError on a request it cannot compute. */
export function decompose(request: DecomposeRequest): DecomposeResult {
  if (!FREQUENCIES.includes(request.frequency)) throw new AnalysisError('invalid_frequency', 'frequency must be "A", "Q" or "M".');
  return decomposeWith(methodOf(request.method), request);
}

/** decompose() with a given method definition (`request.method` is not looked up): the steps every method shares. */
export function decomposeWith(method: AnyMethod, request: DecomposeRequest): DecomposeResult {
  const p = prepare(method, request);
  let out: MethodOutput;
  try {
    out = method.run(p.core, p.params, { frequency: p.frequency, gaps: p.gaps });
  } catch (error) {
    // A system the solver cannot factor is a request to change, not a server failure.
    if (error instanceof SingularSystemError) {
      throw new AnalysisError('unsolvable', `${method.name} cannot be computed accurately for these ${p.core.length.toLocaleString('en-US')} observations with these parameters (the linear system is too ill-conditioned). Use a shorter series, a smaller smoothing parameter, or another method.`);
    }
    throw error;
  }
  return finish(p, out);
}

/** "Hodrick–Prescott, λ = 1 600; 100 × log": the method line printed on exhibits and downloads. */
export function methodLine(methodId: string, params: Record<string, unknown>, transform?: string, diagnostics: Diagnostics = {}): string {
  const method = methodOf(methodId);
  const t = transform === 'log100' ? '; 100 × log' : transform === 'log' ? '; log' : '';
  return `${method.name}, ${method.methodLine(params, diagnostics)}${t}`;
}
