/** The pass band shared by the band-pass methods (Baxter–King, Christiano–Fitzgerald): its parameters, defaults and rule. */
import type { Frequency } from '../../schemas/frequency.js';

/** Business-cycle bands in periods of each frequency, and Baxter–King's K. */
export const BAND: Record<Frequency, { low: number; high: number; k: number }> = {
  Q: { low: 6, high: 32, k: 12 },
  M: { low: 18, high: 96, k: 36 },
  A: { low: 2, high: 8, k: 3 },
};

export const bandParams = {
  low: { kind: 'number', label: 'Shortest period', min: 2, unit: 'periods', hint: '{periods}' },
  high: { kind: 'number', label: 'Longest period', unit: 'periods', hint: '{periods}' },
} as const;

export function checkBand({ low, high }: { low: number; high: number }) {
  return high > low ? null : { param: 'high', message: 'high must be longer than low.' };
}
