/**
 * The stops of the λ slider: round values (1, 2 and 5 times each power of ten, from 0.1 to 10⁷) and
 * the frequency's presets (server/schemas/methods.ts), so that arrow keys move between values a
 * person would choose, and the words a screen reader says for the slider's value.
 */
import { fmt } from '@/components/charts/echarts';

export const LAMBDA_SLIDER_MIN = 0.1;
export const LAMBDA_SLIDER_MAX = 1e7;

export function lambdaSteps(presets: readonly number[]): number[] {
  const round: number[] = [];
  for (let e = -1; e <= 7; e++) for (const m of [1, 2, 5]) round.push(Number((m * 10 ** e).toPrecision(2)));
  const inRange = (v: number) => v >= LAMBDA_SLIDER_MIN && v <= LAMBDA_SLIDER_MAX;
  return [...new Set([...round, ...presets].filter(inRange))].sort((a, b) => a - b);
}

/** The index of the stop nearest to `value` on a logarithmic scale (values off the stops, as typed, sit at the nearest). */
export function nearestStep(steps: readonly number[], value: number | undefined): number {
  if (!value || !(value > 0)) return steps.findIndex((s) => s >= 1000);
  let best = 0;
  for (let i = 1; i < steps.length; i++) if (Math.abs(Math.log(steps[i] / value)) < Math.abs(Math.log(steps[best] / value))) best = i;
  return best;
}

/** The stop about a decade away (Page Up / Page Down): the first stop at or beyond ten times (a tenth of) the value. */
export function decadeStep(steps: readonly number[], index: number, direction: 1 | -1): number {
  const target = steps[index] * 10 ** direction;
  if (direction > 0) {
    const i = steps.findIndex((s) => s >= target * 0.999);
    return i < 0 ? steps.length - 1 : i;
  }
  for (let i = steps.length - 1; i >= 0; i--) if (steps[i] <= target * 1.001) return i;
  return 0;
}

/** What a screen reader says for λ: its value and the cut-off period it implies. */
export function lambdaValueText(lambda: number | undefined, cutoff: number | null, periods: string, perYear: number): string {
  if (!lambda || !(lambda > 0)) return 'λ not set';
  const l = Number(lambda.toPrecision(6)).toLocaleString('en-US');
  if (!cutoff) return `λ = ${l}; no cut-off above 2 periods`;
  return `λ = ${l}; cut-off ${fmt(cutoff, 1)} ${periods}${perYear > 1 ? ` (${fmt(cutoff / perYear, 1)} years)` : ''}`;
}
