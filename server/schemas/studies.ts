/** Bodies of the Studies routes, shared with the study form. */
import { z } from 'zod';
import { methodSchema, transformSchema } from './decompose.js';
import type { Method } from '../analysis/frequency.js';

export const vintagePinSchema = z.union([z.number().int().positive(), z.literal('latest')], { error: 'The vintage is a number (1, 2, …) or "latest".' });

export const studySpecSchema = z.object({
  seriesId: z.number({ error: 'Choose a series.' }).int().positive(),
  vintage: vintagePinSchema.default('latest'),
  transform: transformSchema.default('none'),
  method: methodSchema,
  params: z.record(z.string(), z.unknown()).default({}),
});
export type StudySpec = z.infer<typeof studySpecSchema>;

export const createStudySchema = studySpecSchema.extend({
  title: z.string({ error: 'Give the study a title.' }).trim().min(1, 'Give the study a title.').max(200, 'A title has at most 200 characters.'),
  notes: z.string().max(10_000, 'Notes have at most 10 000 characters.').optional(),
});
export type CreateStudyBody = z.infer<typeof createStudySchema>;

export const updateStudySchema = createStudySchema.partial().refine((v) => Object.keys(v).length > 0, 'Send at least one field to change.');

export const compareSchema = z.object({
  items: z
    .array(studySpecSchema.extend({ label: z.string().max(100).optional() }))
    .min(1, 'Add at least one line to compare.')
    .max(12, 'Compare at most 12 lines at once.'),
  /** Index of the item the cross-correlations are measured against. */
  reference: z.number().int().min(0).default(0),
  maxLag: z.number().int().min(0).max(24).default(8),
});
export type CompareBody = z.infer<typeof compareSchema>;

/** A saved study as the API answers it. */
export interface Study {
  id: number;
  title: string;
  notes: string | null;
  seriesId: number;
  series: { code: string; title: string; frequency: 'A' | 'Q' | 'M'; unit: string };
  vintage: number | 'latest';
  transform: 'none' | 'log' | 'log100';
  method: Method;
  params: Record<string, unknown>;
  owner: { id: number; name: string };
  createdAt: string;
  updatedAt: string;
}
