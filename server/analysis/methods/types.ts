/**
 * What a decomposition method is: one object per method (server/analysis/methods/<id>.ts), read
 * by decompose(), the methods route, OpenAPI, the parameter editor (through GET /methods), the
 * gain charts and the comparisons. See DEVELOPERS.md, "How to add a decomposition method".
 */
import type { Frequency } from '../../schemas/frequency.js';
import type { ParamSpec, ParamSpecs } from '../../schemas/methods.js';

export type { ParamSpec, ParamSpecs };

/** The TypeScript type of a parameter's value, from its description. */
export type ParamType<P extends ParamSpec> = P extends { kind: 'enum'; options: readonly { value: infer V }[] }
  ? V
  : P extends { kind: 'boolean' }
    ? boolean
    : P extends { choices: readonly { value: infer C }[] }
      ? number | C
      : number;

/** Every parameter of a method, checked and with its defaults filled in. */
export type ParamsOf<S extends ParamSpecs> = { -readonly [K in keyof S]: ParamType<S[K]> };

/** Free-form numbers and facts about a run (fitted parameters, iterations, convergence…), shown as they are. */
export type Diagnostics = Record<string, unknown>;

export interface RunContext {
  frequency: Frequency;
  /** Interior missing values (NaN) in the series given to run(); 0 unless the method accepts gaps. */
  gaps: number;
}

/**
 * What run() returns. `trend` and `cycle` have the length of the series given to run(), or that
 * length plus `extension.periods` when the method extends the sample (forecasts past its end).
 */
export interface MethodOutput {
  trend: Float64Array;
  cycle: Float64Array;
  /** Further series on the same periods as `trend` (for example bands: cycleLower, cycleUpper); the JSON answer carries each by its name. */
  series?: Record<string, Float64Array>;
  diagnostics?: Diagnostics;
  /** Sentences for the person, after the general cautions. */
  warnings?: string[];
  /** Periods past the end of the sample that the outputs carry, and what to call them on charts ("forecast"). */
  extension?: { periods: number; label: string };
}

/** The gain of a linear method's cycle filter, as a function of the angular frequency ω = 2π/P. */
export interface LinearGain {
  response: (omega: number) => number;
  /** The period where the trend gain is one half (λ-based methods). */
  cutoff?: number | null;
  /** The pass band, in periods (band-pass filters). */
  band?: [number, number];
  note?: string;
}

export interface GainContext {
  /** Series length, for sample-dependent filters. */
  n?: number;
  /** The diagnostics of a run (estimated coefficients, iterations), when the gain depends on them. */
  diagnostics: Diagnostics;
}

/**
 * One decomposition method. Document the object like a numerical library's function: the
 * objective or model, the parameters and their defaults, references, and a worked example.
 */
export interface MethodDefinition<S extends ParamSpecs = ParamSpecs> {
  /** The id used in requests (`method: "hp"`). */
  id: string;
  /** The published name, as method lines print it. */
  name: string;
  /** Uses data after t for the estimate at t: the last two years are revised as data arrive. */
  twoSided: boolean;
  params: S;
  /** Conventional parameters for a frequency. A parameter left out has no convention and must be given. */
  defaults(frequency: Frequency): Partial<ParamsOf<S>>;
  /** Starting values for the parameter editor where there is no convention. */
  suggested?(frequency: Frequency): Partial<ParamsOf<S>>;
  /** A rule across parameters that the per-field checks cannot state; the message when it is broken. */
  check?(params: ParamsOf<S>): { param: string; message: string } | null;
  /** The fewest observations the method needs with these parameters, and why. */
  minimumLength(params: ParamsOf<S>): { count: number; why?: string };
  /**
   * Interior missing values: `weighted` — they enter with weight zero and the trend runs through
   * them; `local` — the method has no value wherever its window or regression touches one;
   * `refused` — the method needs a series without gaps (decompose answers 400).
   */
  gaps: 'weighted' | 'local' | 'refused';
  /** Cautions particular to the method (after the general two-sided caution). */
  cautions?(params: ParamsOf<S>, frequency: Frequency): string[];
  /**
   * The decomposition of `y`: the sample from its first to its last observed value (NaN at
   * interior gaps when `gaps` is not `refused`). Throws AnalysisError on what it cannot compute.
   */
  run(y: Float64Array, params: ParamsOf<S>, context: RunContext): MethodOutput;
  /** The gain of the cycle filter; absent for methods that are not linear filters. */
  gain?(params: ParamsOf<S>, context: GainContext): LinearGain;
  /** The parameters as the method line prints them after the name ("λ = 1 600"). */
  methodLine(params: ParamsOf<S>, diagnostics: Diagnostics): string;
}

/** Declares a method with its parameter types inferred from `params`. */
export function defineMethod<const S extends ParamSpecs>(definition: MethodDefinition<S>): MethodDefinition<S> {
  return definition;
}

/** A method of any parameters, as the registry holds it. */
// eslint-disable-next-line @typescript-eslint/no-explicit-any
export type AnyMethod = MethodDefinition<any>;
