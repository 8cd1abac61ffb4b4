/**
 * The gain of a method's cycle filter over a grid of periods, for charts: the method states its
 * gain (server/analysis/methods/<id>.ts); methods that are not linear filters have none.
 *
 * Example: gainCurve({ method: 'hp', params: { lambda: 1600 } }) → 160 periods from 2 to about
 * 119, the gain rising from 0 to 1, cut-off 39.7 (the gain is one half there).
 */
import { periodGrid, type GainCurve } from './gain.js';
import { findMethod } from './methods/index.js';
import type { Diagnostics } from './methods/types.js';

export type { GainCurve };

export interface GainInput {
  method: string;
  /** The method's parameters, checked and with defaults filled in. */
  params: Record<string, unknown>;
  /** Series length, for the sample-dependent filters (Christiano–Fitzgerald). */
  n?: number;
  /** The diagnostics of a run: estimated coefficients (Hamilton), iterations (boosted HP). */
  diagnostics?: Diagnostics;
  maxPeriod?: number;
}

export function gainCurve(input: GainInput): GainCurve {
  const method = findMethod(input.method);
  if (!method) throw new RangeError(`no method ${input.method}`);
  if (!method.gain) {
    return { periods: periodGrid(input.maxPeriod ?? 120), gain: [], cutoff: null, note: `${method.name} is not a linear filter, so it has no gain function.` };
  }
  const g = method.gain(input.params, { n: input.n, diagnostics: input.diagnostics ?? {} });
  const scale = g.cutoff ?? g.band?.[1] ?? 40;
  const periods = periodGrid(input.maxPeriod ?? Math.min(1000, Math.max(64, scale * 3)));
  const gain = periods.map((p) => g.response((2 * Math.PI) / p));
  return { periods, gain, cutoff: g.cutoff ?? null, band: g.band, note: g.note };
}
