/**
 * The method registry: every decomposition method, one file each. decompose(), GET /methods,
 * OpenAPI, the gain charts, the parameter editor and the comparisons read it. To add a method,
 * write server/analysis/methods/<id>.ts and list it here (DEVELOPERS.md has the recipe).
 */
import { z } from 'zod';
import type { Frequency } from '../../schemas/frequency.js';
import { FREQUENCIES } from '../../schemas/frequency.js';
import { cutoffPeriod, lambdaPresets, type MethodDescription, type MethodsAnswer, type ParamValue } from '../../schemas/methods.js';
import { baxterKing } from './baxter-king.js';
import { bnFilterMethod } from './bn-filter.js';
import { boostedHp } from './boosted-hp.js';
import { christianoFitzgerald } from './christiano-fitzgerald.js';
import { hamilton } from './hamilton.js';
import { hamiltonAverage } from './hamilton-average.js';
import { hp } from './hp.js';
import { hpForecast } from './hp-forecast.js';
import { hpOneSided } from './hp-one-sided.js';
import { l1Trend } from './l1-trend.js';
import { describeParams } from './params.js';
import type { AnyMethod } from './types.js';
import { uc } from './uc.js';
import { whittaker } from './whittaker.js';

export type { AnyMethod, MethodDefinition, MethodOutput } from './types.js';

/** Every method, in the order lists show them. */
export const METHOD_REGISTRY: readonly AnyMethod[] = [hp, hpOneSided, whittaker, hamilton, baxterKing, christianoFitzgerald, boostedHp, l1Trend, hpForecast, hamiltonAverage, bnFilterMethod, uc];

const byId = new Map(METHOD_REGISTRY.map((m) => [m.id, m]));

export function findMethod(id: string): AnyMethod | undefined {
  return typeof id === 'string' ? byId.get(id) : undefined;
}

export function methodIds(): string[] {
  return METHOD_REGISTRY.map((m) => m.id);
}

/** The published name of a method ("Hodrick–Prescott"), or the id when it is unknown. */
export function methodName(id: string): string {
  return findMethod(id)?.name ?? id;
}

const byFrequency = (f: (frequency: Frequency) => Record<string, ParamValue>) => Object.fromEntries(FREQUENCIES.map((fr) => [fr, f(fr)])) as Record<Frequency, Record<string, ParamValue>>;

export function describeMethod(m: AnyMethod): MethodDescription {
  return {
    id: m.id,
    name: m.name,
    twoSided: m.twoSided,
    gaps: m.gaps,
    linear: !!m.gain,
    parameters: Object.keys(m.params),
    params: describeParams(m),
    defaults: byFrequency((f) => m.defaults(f) as Record<string, ParamValue>),
    initial: byFrequency((f) => ({ ...m.defaults(f), ...(m.suggested?.(f) ?? {}) }) as Record<string, ParamValue>),
  };
}

/** GET /methods: every method described, and the λ presets with their cut-off periods. */
export function describeMethods(): MethodsAnswer {
  return {
    methods: METHOD_REGISTRY.map(describeMethod),
    presets: Object.fromEntries(FREQUENCIES.map((f) => [f, lambdaPresets(f).map((p) => ({ ...p, cutoffPeriod: cutoffPeriod(p.lambda) }))])) as MethodsAnswer['presets'],
  };
}

/** The method field of request bodies, checked against the registry (a 400 that lists the methods). */
export function methodIdEnum() {
  const ids = methodIds();
  return z.enum(ids as [string, ...string[]], { error: `Choose a method: ${ids.join(', ')}.` });
}
