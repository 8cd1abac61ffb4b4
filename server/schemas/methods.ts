/**
 * The method catalogue as the client sees it: the description of a decomposition method and its
 * parameters (what GET /methods answers, read by the parameter editor and the method lists), the
 * λ presets, and the link between λ and the cut-off period (pure arithmetic the λ slider needs
 * without a request). This is the one deliberate shared module about methods: the methods
 * themselves (their filters, defaults and checks) live in server/analysis/methods/.
 */
import { PERIODS_PER_YEAR, type Frequency } from './frequency.js';

/** A value a parameter can take. */
export type ParamValue = number | string | boolean;

/** A named alternative to a number ("auto", "none"). */
export interface ParamChoice {
  value: string;
  label: string;
}

interface ParamBase {
  /** The form's label. */
  label: string;
  /** A line under the field; "{periods}" stands for the frequency's period word ("quarters"). */
  hint?: string;
}

/**
 * How a parameter is entered and checked:
 * - `lambda`: a smoothing parameter λ > 0 (slider on a log scale, the presets, the cut-off period);
 *   `orderParam` names the parameter holding the order of the difference penalty (default 2);
 *   `squaredPenalty: false` for a λ that is not the Whittaker/Hodrick–Prescott one (ℓ1 trend
 *   filtering): no presets and no cut-off period are shown for it.
 * - `number` / `integer`: with bounds; `unit: 'periods'` when it counts periods of the series;
 *   `choices` adds named alternatives to a number (a union number | "auto" | "none").
 * - `enum`: one of the options, each with its label.
 * - `boolean`: a check box.
 */
export type ParamSpec =
  | (ParamBase & { kind: 'lambda'; orderParam?: string; squaredPenalty?: boolean })
  | (ParamBase & { kind: 'number'; min?: number; max?: number; step?: number; unit?: 'periods'; choices?: readonly ParamChoice[] })
  | (ParamBase & { kind: 'integer'; min: number; max: number; unit?: 'periods'; choices?: readonly ParamChoice[] })
  | (ParamBase & { kind: 'enum'; options: readonly { value: string | number; label: string }[] })
  | (ParamBase & { kind: 'boolean' });

export type ParamSpecs = Record<string, ParamSpec>;

/** A parameter as GET /methods describes it. */
export type ParamDescription = ParamSpec & {
  name: string;
  /** No conventional default: the request must give it. */
  required: boolean;
};

/** A method as GET /methods describes it. */
export interface MethodDescription {
  id: string;
  name: string;
  /** Two-sided filters use data after t for the estimate at t; their end points are revised. */
  twoSided: boolean;
  /** How interior missing values are treated (see MethodDefinition.gaps). */
  gaps: 'weighted' | 'local' | 'refused';
  /** A linear filter has a gain function. */
  linear: boolean;
  /** The parameter names (kept for older callers; `params` describes them). */
  parameters: string[];
  params: ParamDescription[];
  /** The conventional parameters by frequency, as decompose fills them in. */
  defaults: Record<Frequency, Record<string, ParamValue>>;
  /** What a parameter editor starts from: the defaults, and suggestions where there is no convention. */
  initial: Record<Frequency, Record<string, ParamValue>>;
}

/** GET /methods. */
export interface MethodsAnswer {
  methods: MethodDescription[];
  presets: Record<Frequency, (LambdaPreset & { cutoffPeriod: number | null })[]>;
}

// ------------------------------------------------------------------ λ

export const LAMBDA_MIN = 1e-10;
export const LAMBDA_MAX = 1e15;

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
