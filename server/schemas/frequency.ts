/** Frequencies of series and their words: shared by the analysis library, the server and the client. */
import { z } from 'zod';

export type Frequency = 'A' | 'Q' | 'M';
export const FREQUENCIES: Frequency[] = ['A', 'Q', 'M'];
export const frequencySchema = z.enum(['A', 'Q', 'M']);

export const PERIODS_PER_YEAR: Record<Frequency, number> = { A: 1, Q: 4, M: 12 };
export const FREQUENCY_LABELS: Record<Frequency, string> = { A: 'annual', Q: 'quarterly', M: 'monthly' };
export const PERIOD_WORD: Record<Frequency, [string, string]> = {
  A: ['year', 'years'],
  Q: ['quarter', 'quarters'],
  M: ['month', 'months'],
};
