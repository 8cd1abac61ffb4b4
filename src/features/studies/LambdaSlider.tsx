import { useMemo } from 'react';
import { decadeStep, lambdaSteps, nearestStep } from './lambda-steps';

/**
 * The λ slider: it stops at round values and at the presets (arrow keys step between them, Page Up
 * and Page Down jump about a decade, Home and End go to the ends), and tells screen readers λ and
 * its cut-off period (`valueText`) rather than the position on its logarithmic scale.
 */
export function LambdaSlider({ value, presets, valueText, onChange }: { value: number | undefined; presets: readonly number[]; valueText: string; onChange: (lambda: number) => void }) {
  const steps = useMemo(() => lambdaSteps(presets), [presets.join(',')]);
  const index = nearestStep(steps, value);
  return (
    <input
      type="range"
      aria-label="λ (logarithmic scale)"
      aria-valuetext={valueText}
      className="w-full accent-trend"
      min={0}
      max={steps.length - 1}
      step={1}
      value={index}
      onChange={(e) => onChange(steps[Number(e.target.value)])}
      onKeyDown={(e) => {
        if (e.key !== 'PageUp' && e.key !== 'PageDown') return;
        e.preventDefault();
        onChange(steps[decadeStep(steps, index, e.key === 'PageUp' ? 1 : -1)]);
      }}
    />
  );
}
