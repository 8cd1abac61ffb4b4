/**
 * Frequencies, conventional parameters and the link between the smoothing parameter λ and the
 * cut-off period. Pure functions, also used by the browser client.
 */

export type Frequency = 'A' | 'Q' | 'M';
export const FREQUENCIES: Frequency[] = ['A', 'Q', 'M'];

export const PERIODS_PER_YEAR: Record<Frequency, number> = { A: 1, Q: 4, M: 12 };
export const FREQUENCY_LABELS: Record<Frequency, string> = { A: 'annual', Q: 'quarterly', M: 'monthly' };
export const PERIOD_WORD: Record<Frequency, [string, string]> = {
  A: ['year', 'years'],
  Q: ['quarter', 'quarters'],
  M: ['month', 'months'],
};

/** Hodrick and Prescott (1997): 1600 for quarterly data; 100 and 14 400 by the usual convention. */
export const HP_CONVENTION: Record<Frequency, number> = { A: 100, Q: 1600, M: 14400 };

/**
 * Ravn and Uhlig (2002), "On adjusting the Hodrick–Prescott filter for the frequency of
 * observations", Review of Economics and Statistics 84(2): λ = 1600·(s/4)⁴ with s periods a year,
 * giving 6.25 for annual and 129 600 for monthly data.
 */
export function ravnUhlig(frequency: Frequency): number {
  return 1600 * Math.pow(PERIODS_PER_YEAR[frequency] / 4, 4);
}

/**
 * Basel Committee on Banking Supervision (2010), "Guidance for national authorities operating the
 * countercyclical capital buffer": one-sided HP with λ = 400 000 on quarterly credit-to-GDP.
 */
export const CREDIT_GAP_LAMBDA = 400_000;

export interface LambdaPreset {
  id: 'hp' | 'ravn-uhlig' | 'credit-gap';
  label: string;
  lambda: number;
  source: string;
}

export function lambdaPresets(frequency: Frequency): LambdaPreset[] {
  const presets: LambdaPreset[] = [
    { id: 'hp', label: 'Hodrick–Prescott convention', lambda: HP_CONVENTION[frequency], source: 'Hodrick and Prescott (1997)' },
    { id: 'ravn-uhlig', label: 'Ravn–Uhlig scaling', lambda: ravnUhlig(frequency), source: 'Ravn and Uhlig (2002)' },
  ];
  if (frequency === 'Q') {
    presets.push({ id: 'credit-gap', label: 'Credit-to-GDP gap', lambda: CREDIT_GAP_LAMBDA, source: 'BCBS (2010) countercyclical buffer guidance' });
  }
  return presets;
}

/**
 * The period P (in observations) at which the trend gain of the Whittaker–Henderson smoother of
 * order d, 1 / (1 + λ·(2 − 2cos ω)^d), equals one half: λ·(2 − 2cos(2π/P))^d = 1.
 * For d = 2 (Hodrick–Prescott) and λ = 1600 this is about 39.7 quarters.
 * Returns null when the gain never falls to one half (tiny λ: the cut-off is below 2 periods).
 */
export function cutoffPeriod(lambda: number, order = 2): number | null {
  if (!(lambda > 0) || !Number.isFinite(lambda)) return null;
  const x = Math.pow(lambda, -1 / order); // = 2 − 2cos ω
  if (x >= 4) return null;
  const omega = Math.acos(1 - x / 2);
  return (2 * Math.PI) / omega;
}

/** Inverse of cutoffPeriod: λ = 1 / (2 − 2cos(2π/P))^d, for P > 2. */
export function lambdaForCutoff(period: number, order = 2): number {
  if (!(period > 2)) throw new RangeError('the cut-off period must be longer than 2 periods');
  const x = 2 - 2 * Math.cos((2 * Math.PI) / period);
  return 1 / Math.pow(x, order);
}

export type Method =
  | 'hp'
  | 'hp-one-sided'
  | 'whittaker'
  | 'hamilton'
  | 'baxter-king'
  | 'christiano-fitzgerald'
  | 'boosted-hp'
  | 'l1-trend';

export const METHODS: Method[] = ['hp', 'hp-one-sided', 'whittaker', 'hamilton', 'baxter-king', 'christiano-fitzgerald', 'boosted-hp', 'l1-trend'];

export const METHOD_NAMES: Record<Method, string> = {
  hp: 'Hodrick–Prescott',
  'hp-one-sided': 'Hodrick–Prescott, one-sided',
  whittaker: 'Whittaker–Henderson',
  hamilton: 'Hamilton regression filter',
  'baxter-king': 'Baxter–King',
  'christiano-fitzgerald': 'Christiano–Fitzgerald',
  'boosted-hp': 'Boosted HP',
  'l1-trend': 'ℓ1 trend filtering',
};

/** Two-sided methods use data after t to estimate the trend at t, so their end points are revised. */
export const TWO_SIDED: Record<Method, boolean> = {
  hp: true,
  'hp-one-sided': false,
  whittaker: true,
  hamilton: false,
  'baxter-king': true,
  'christiano-fitzgerald': true,
  'boosted-hp': true,
  'l1-trend': true,
};

const BAND: Record<Frequency, { low: number; high: number; k: number }> = {
  Q: { low: 6, high: 32, k: 12 },
  M: { low: 18, high: 96, k: 36 },
  A: { low: 2, high: 8, k: 3 },
};
const HAMILTON: Record<Frequency, { h: number; p: number }> = {
  Q: { h: 8, p: 4 },
  M: { h: 24, p: 12 },
  A: { h: 2, p: 1 },
};

/** The conventional parameters of each method for a frequency (API.md's table). */
export function defaultParams(method: Method, frequency: Frequency): Record<string, number | string | boolean> {
  switch (method) {
    case 'hp':
    case 'hp-one-sided':
      return { lambda: HP_CONVENTION[frequency] };
    case 'whittaker':
      return { lambda: HP_CONVENTION[frequency], order: 2 };
    case 'hamilton':
      return { ...HAMILTON[frequency] };
    case 'baxter-king':
      return { ...BAND[frequency] };
    case 'christiano-fitzgerald':
      return { low: BAND[frequency].low, high: BAND[frequency].high, drift: true };
    case 'boosted-hp':
      return { lambda: HP_CONVENTION[frequency], stopping: 'bic', iterations: 100 };
    case 'l1-trend':
      return {};
  }
}

/** "Hodrick–Prescott, λ = 1600": the method line printed on exhibits. */
export function methodLine(method: Method, params: Record<string, unknown>, transform?: string): string {
  const fmt = (v: unknown) => (typeof v === 'number' ? formatNumber(v) : String(v));
  let detail = '';
  switch (method) {
    case 'hp':
    case 'hp-one-sided':
      detail = `λ = ${fmt(params.lambda)}`;
      break;
    case 'whittaker':
      detail = `λ = ${fmt(params.lambda)}, order ${fmt(params.order)}`;
      break;
    case 'hamilton':
      detail = `h = ${fmt(params.h)}, p = ${fmt(params.p)}`;
      break;
    case 'baxter-king':
      detail = `periods ${fmt(params.low)}–${fmt(params.high)}, K = ${fmt(params.k)}`;
      break;
    case 'christiano-fitzgerald':
      detail = `periods ${fmt(params.low)}–${fmt(params.high)}${params.drift ? ', drift removed' : ''}`;
      break;
    case 'boosted-hp':
      detail = `λ = ${fmt(params.lambda)}, ${params.stopping === 'bic' ? 'BIC stopping' : 'fixed'}${params.iterationsUsed !== undefined ? `, ${fmt(params.iterationsUsed)} iterations` : ''}`;
      break;
    case 'l1-trend':
      detail = `λ = ${fmt(params.lambda)}`;
      break;
  }
  const t = transform === 'log100' ? '; 100 × log' : transform === 'log' ? '; log' : '';
  return `${METHOD_NAMES[method]}, ${detail}${t}`;
}

export function formatNumber(v: number): string {
  if (!Number.isFinite(v)) return String(v);
  if (Number.isInteger(v) && Math.abs(v) < 1e15) return v.toLocaleString('en-US').replace(/,/g, ' ');
  return String(Number(v.toPrecision(6)));
}
