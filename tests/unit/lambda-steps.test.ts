/** The λ slider's stops and the words screen readers hear for it (src/features/studies/lambda-steps.ts). */
import { describe, expect, it } from 'vitest';
import { cutoffPeriod, lambdaPresets } from '../../server/schemas/methods.js';
import { decadeStep, lambdaSteps, lambdaValueText, nearestStep } from '../../src/features/studies/lambda-steps.js';

const quarterly = lambdaSteps(lambdaPresets('Q').map((p) => p.lambda));

describe('the λ slider', () => {
  it('stops at 1, 2 and 5 times each power of ten from 0.1 to 10⁷, and at the presets', () => {
    expect(quarterly.slice(0, 6)).toEqual([0.1, 0.2, 0.5, 1, 2, 5]);
    expect(quarterly.filter((v) => v >= 1000 && v <= 20000)).toEqual([1000, 1600, 2000, 5000, 10000, 20000]);
    expect(quarterly).toContain(400000);
    expect(quarterly[quarterly.length - 1]).toBe(1e7);
    expect(quarterly.every((v, i) => i === 0 || v > quarterly[i - 1])).toBe(true);
    // Ravn–Uhlig's annual 6.25 and monthly 129 600 (server/schemas/methods.ts) are stops at their frequencies.
    expect(lambdaSteps(lambdaPresets('A').map((p) => p.lambda))).toEqual(expect.arrayContaining([6.25, 100]));
    expect(lambdaSteps(lambdaPresets('M').map((p) => p.lambda))).toEqual(expect.arrayContaining([14400, 129600]));
  });

  it('puts a typed value at the nearest stop on a log scale, and steps a decade with Page Up / Page Down', () => {
    expect(quarterly[nearestStep(quarterly, 1600)]).toBe(1600);
    expect(quarterly[nearestStep(quarterly, 1400)]).toBe(1600);
    expect(quarterly[nearestStep(quarterly, 1200)]).toBe(1000);
    expect(quarterly[nearestStep(quarterly, 3e9)]).toBe(1e7);
    expect(quarterly[decadeStep(quarterly, quarterly.indexOf(1600), 1)]).toBe(20000);
    expect(quarterly[decadeStep(quarterly, quarterly.indexOf(20000), -1)]).toBe(2000);
    expect(quarterly[decadeStep(quarterly, quarterly.indexOf(5e6), 1)]).toBe(1e7);
    expect(quarterly[decadeStep(quarterly, quarterly.indexOf(0.5), -1)]).toBe(0.1);
  });

  it('says λ and its cut-off period, not the position on the scale', () => {
    // Hodrick–Prescott λ = 1600: cut-off about 39.7 quarters (the half-power period of the HP filter).
    expect(lambdaValueText(1600, cutoffPeriod(1600), 'quarters', 4)).toBe('λ = 1,600; cut-off 39.7 quarters (9.9 years)');
    // λ = 6.25 (annual): 2 − 2cos ω = 6.25^(−1/2) = 0.4, ω = acos(0.8), P = 2π/ω = 9.76 years.
    expect(lambdaValueText(6.25, cutoffPeriod(6.25), 'years', 1)).toBe('λ = 6.25; cut-off 9.8 years');
    expect(lambdaValueText(0.01, cutoffPeriod(0.01), 'quarters', 4)).toBe('λ = 0.01; no cut-off above 2 periods');
    expect(lambdaValueText(undefined, null, 'quarters', 4)).toBe('λ not set');
  });
});
