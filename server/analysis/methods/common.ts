/** Pieces several method files share: the λ parameter, the Hodrick–Prescott family's cautions, number formatting, and small array steps. */
import { SingularSystemError } from '../banded.js';
import { AnalysisError } from '../errors.js';
import { FREQUENCIES, FREQUENCY_LABELS, type Frequency } from '../../schemas/frequency.js';
import { HP_CONVENTION } from '../../schemas/methods.js';

/** The smoothing parameter as the λ-based methods declare it. */
export const LAMBDA_PARAM = { kind: 'lambda', label: 'Smoothing parameter λ' } as const;

/** What the Hodrick–Prescott filters with λ alone share: the parameter and its conventions, the minimum, gaps with weight zero, the cautions. */
export const hpLambdaOnly = {
  params: { lambda: LAMBDA_PARAM },
  defaults: (f: Frequency) => ({ lambda: HP_CONVENTION[f] }),
  minimumLength: () => ({ count: 3 }),
  gaps: 'weighted',
  cautions: (p: { lambda: number }, f: Frequency) => hpFamilyCautions(p.lambda, f),
  methodLine: (p: { lambda: number }) => `λ = ${fmt(p.lambda)}`,
} as const;

/** "1 600", "0.5", "1.23457e+20": numbers as method lines print them. */
export function formatNumber(v: number): string {
  if (!Number.isFinite(v)) return String(v);
  if (Number.isInteger(v) && Math.abs(v) < 1e15) return v.toLocaleString('en-US').replace(/,/g, ' ');
  return String(Number(v.toPrecision(6)));
}

/** A parameter value as a method line prints it. */
export const fmt = (v: unknown) => (typeof v === 'number' ? formatNumber(v) : String(v));

/** The cautions of the Hodrick–Prescott family: spurious cycles, and λ chosen for another frequency. */
export function hpFamilyCautions(lambda: number, frequency: Frequency): string[] {
  const out = ['The Hodrick–Prescott family can produce cycles that are not in the data (Hamilton 2018); compare with another method before drawing conclusions.'];
  for (const f of FREQUENCIES) {
    if (f !== frequency && HP_CONVENTION[f] === lambda && HP_CONVENTION[frequency] !== lambda) {
      out.push(`λ = ${lambda} is the convention for ${FREQUENCY_LABELS[f]} data; for this series it would be ${HP_CONVENTION[frequency]}.`);
    }
  }
  return out;
}

/** Weight 1 at an observation, 0 at a gap (NaN). */
export function observationWeights(y: ArrayLike<number>): Float64Array {
  const w = new Float64Array(y.length);
  for (let i = 0; i < y.length; i++) w[i] = Number.isNaN(y[i]) ? 0 : 1;
  return w;
}

/** y − x, element by element. */
export function minus(y: ArrayLike<number>, x: ArrayLike<number>): Float64Array {
  const out = new Float64Array(y.length);
  for (let i = 0; i < y.length; i++) out[i] = y[i] - x[i];
  return out;
}

/** A direct banded solve that cannot be factorized (λ far too large for the data) is a 400, not a crash. */
export function solveOrRefuse(solve: () => Float64Array): Float64Array {
  try {
    return solve();
  } catch (error) {
    if (error instanceof SingularSystemError) {
      throw new AnalysisError('lambda_too_large', 'λ is too large for this series with gaps: the system cannot be solved accurately. Use a smaller λ, or fill the gaps.');
    }
    throw error;
  }
}
