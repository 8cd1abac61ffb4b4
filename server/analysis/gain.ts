/**
 * Gain (the modulus of the frequency response) of each linear method's *cycle* filter, over a grid
 * of periods, for charts. At angular frequency ω = 2π/P:
 *
 *   hp, whittaker (order d):   G(ω) = λ·(2 − 2cos ω)^d / (1 + λ·(2 − 2cos ω)^d)   (two-sided, infinite sample)
 *   boosted-hp, m iterations:  G(ω)^m of the HP cycle gain
 *   hp-one-sided:              |1 − Σ_j w_j e^{−iωj}| with w the end-point weights of a long sample
 *   baxter-king:               |Σ_j a_j cos(jω)|
 *   christiano-fitzgerald:     |Σ_j w_j e^{−iωj}| with the weights of the middle observation
 *   hamilton:                  |1 − Σ_j β_j e^{−iω(h+j−1)}| with the estimated (or random-walk) β
 *   l1-trend:                  not linear: no gain
 */
import { baxterKingWeights } from './bandpass.js';
import { cutoffPeriod, type Method } from './frequency.js';
import { factorToeplitz, solveFactored } from './banded.js';
import { applyDT } from './differences.js';

export interface GainCurve {
  periods: number[];
  gain: number[];
  /** Period where the trend gain is one half (λ-based methods), or the band edges. */
  cutoff: number | null;
  band?: [number, number];
  note?: string;
}

/** Log-spaced periods from 2 to `maxPeriod`. */
export function periodGrid(maxPeriod: number, points = 160): number[] {
  const out: number[] = [];
  const lo = Math.log(2);
  const hi = Math.log(Math.max(4, maxPeriod));
  for (let i = 0; i < points; i++) out.push(Math.exp(lo + ((hi - lo) * i) / (points - 1)));
  return out;
}

const hpCycleGain = (lambda: number, order: number, omega: number) => {
  const x = lambda * Math.pow(2 - 2 * Math.cos(omega), order);
  return x / (1 + x);
};

function complexGain(weights: ArrayLike<number>, omega: number, offset = 0, oneMinus = false): number {
  let re = 0;
  let im = 0;
  for (let j = 0; j < weights.length; j++) {
    re += weights[j] * Math.cos(omega * (j + offset));
    im -= weights[j] * Math.sin(omega * (j + offset));
  }
  if (oneMinus) {
    re = 1 - re;
    im = -im;
  }
  return Math.hypot(re, im);
}

/** End-point weights of the two-sided HP trend on a sample of n points: wⱼ on y_{n−1−j}. */
export function hpEndpointWeights(lambda: number, n: number): Float64Array {
  // τ_{n−1} = e_{n−1}ᵀ(I + λDᵀD)⁻¹y; the row is (I − Dᵀ(μI + DDᵀ)⁻¹D) e_{n−1} by symmetry.
  const m = n - 2;
  const f = factorToeplitz(m, [6 + 1 / lambda, -4, 1]);
  const De = new Float64Array(m);
  De[m - 1] = 1; // D·e_{n−1}: only the last row of D touches the last point, with coefficient +1
  const x = solveFactored(f, De);
  const c = applyDT(x, 2, n);
  const w = new Float64Array(n);
  for (let j = 0; j < n; j++) w[j] = (j === 0 ? 1 : 0) - c[n - 1 - j];
  return w;
}

export interface GainInput {
  method: Method;
  params: Record<string, unknown>;
  /** Series length, for the sample-dependent filters (CF). */
  n?: number;
  /** Hamilton coefficients [β₀, β₁, …] when estimated. */
  coefficients?: number[];
  iterationsUsed?: number;
  maxPeriod?: number;
}

export function gainCurve(input: GainInput): GainCurve {
  const { method, params } = input;
  const lambda = Number(params.lambda);
  const order = Number(params.order ?? 2);
  const cutoff = method === 'hp' || method === 'hp-one-sided' || method === 'boosted-hp' ? cutoffPeriod(lambda, 2) : method === 'whittaker' ? cutoffPeriod(lambda, order) : null;
  const high = Number(params.high);
  const maxPeriod = input.maxPeriod ?? Math.min(1000, Math.max(64, (cutoff ?? (Number.isFinite(high) ? high : 40)) * 3));
  const periods = periodGrid(maxPeriod);
  const omegas = periods.map((p) => (2 * Math.PI) / p);
  let gain: number[];
  let note: string | undefined;
  let band: [number, number] | undefined;
  switch (method) {
    case 'hp':
      gain = omegas.map((w) => hpCycleGain(lambda, 2, w));
      break;
    case 'whittaker':
      gain = omegas.map((w) => hpCycleGain(lambda, order, w));
      break;
    case 'boosted-hp': {
      const m = input.iterationsUsed ?? Number(params.iterations ?? 1);
      gain = omegas.map((w) => Math.pow(hpCycleGain(lambda, 2, w), m));
      note = `after ${m} iteration${m === 1 ? '' : 's'}`;
      break;
    }
    case 'hp-one-sided': {
      const n = Math.min(4000, Math.max(400, Math.ceil(20 * (cutoff ?? 40))));
      const w = hpEndpointWeights(lambda, n);
      gain = omegas.map((om) => complexGain(w, om, 0, true));
      note = 'gain of the end-point (real-time) filter; it also shifts the phase';
      break;
    }
    case 'baxter-king': {
      const k = Number(params.k);
      const w = baxterKingWeights(Number(params.low), high, k);
      gain = omegas.map((om) => {
        let s = 0;
        for (let j = -k; j <= k; j++) s += w[j + k] * Math.cos(om * j);
        return Math.abs(s);
      });
      band = [Number(params.low), high];
      break;
    }
    case 'christiano-fitzgerald': {
      const n = Math.max(3, Math.min(input.n ?? 200, 2000));
      const a = (2 * Math.PI) / high;
      const b = (2 * Math.PI) / Number(params.low);
      const t = Math.floor(n / 2);
      // Weights of the middle observation, on y_{t−j} for j = −(n−1−t)…t, as in bandpass.ts.
      gain = omegas.map((om) => {
        let re = 0;
        let im = 0;
        const add = (lag: number, wgt: number) => {
          re += wgt * Math.cos(om * lag);
          im -= wgt * Math.sin(om * lag);
        };
        const B = (j: number) => (j === 0 ? (b - a) / Math.PI : (Math.sin(b * j) - Math.sin(a * j)) / (Math.PI * j));
        let sumUp = 0;
        for (let j = 1; j <= n - t - 2; j++) sumUp += B(j);
        let sumDown = 0;
        for (let j = 1; j <= t - 1; j++) sumDown += B(j);
        add(0, B(0));
        for (let j = 1; j <= n - t - 2; j++) add(-j, B(j));
        for (let j = 1; j <= t - 1; j++) add(j, B(j));
        const Bt = -0.5 * B(0) - sumUp;
        add(-(n - 1 - t), Bt);
        add(t, -B(0) - sumUp - sumDown - Bt);
        return Math.hypot(re, im);
      });
      band = [Number(params.low), high];
      note = `weights of the middle observation of a ${n}-period sample`;
      break;
    }
    case 'hamilton': {
      const h = Number(params.h);
      const p = Number(params.p);
      const beta = input.coefficients?.slice(1) ?? [1, ...new Array(p - 1).fill(0)];
      gain = omegas.map((om) => complexGain(beta, om, h, true));
      note = input.coefficients ? 'with the estimated coefficients' : 'for a random walk: the h-period change';
      break;
    }
    case 'l1-trend':
      return { periods, gain: [], cutoff: null, note: 'ℓ1 trend filtering is not a linear filter, so it has no gain function.' };
  }
  return { periods, gain, cutoff: cutoff ?? null, band, note };
}
