/** Bodies of the decomposition routes, and the parameter rules of each method (also used by forms). */
import { z } from 'zod';
import { METHODS, type Method } from '../analysis/frequency.js';

export const frequencySchema = z.enum(['A', 'Q', 'M']);
export const transformSchema = z.enum(['none', 'log', 'log100']);
export const methodSchema = z.enum(METHODS as [Method, ...Method[]], {
  error: `Choose a method: ${METHODS.join(', ')}.`,
});

export const LAMBDA_MIN = 1e-10;
export const LAMBDA_MAX = 1e15;
const lambda = z
  .number({ error: 'λ must be a finite number.' })
  .refine((v) => v > 0, 'λ must be greater than 0.')
  .refine((v) => v >= LAMBDA_MIN && v <= LAMBDA_MAX, `λ must lie between ${LAMBDA_MIN} and ${LAMBDA_MAX}.`);
const periods = (what: string) => z.number({ error: `${what} must be a finite number of periods.` });
const count = (what: string, min: number, max: number) =>
  z.number({ error: `${what} must be a whole number.` }).int(`${what} must be a whole number.`).min(min, `${what} must be at least ${min}.`).max(max, `${what} must be at most ${max}.`);

const band = z
  .object({ low: periods('low').refine((v) => v >= 2, 'low must be at least 2 periods.'), high: periods('high') })
  .refine((v) => v.high > v.low, { message: 'high must be longer than low.', path: ['high'] });

/** Parameter schemas by method; every field optional here (defaults fill them in). */
export const paramSchemas = {
  hp: z.object({ lambda }).strict(),
  'hp-one-sided': z.object({ lambda }).strict(),
  whittaker: z.object({ lambda, order: z.union([z.literal(1), z.literal(2), z.literal(3)], { error: 'order must be 1, 2 or 3.' }) }).strict(),
  hamilton: z.object({ h: count('h', 1, 120), p: count('p', 1, 60) }).strict(),
  'baxter-king': z.object({ low: band.shape.low, high: band.shape.high, k: count('k', 1, 500) }).strict(),
  'christiano-fitzgerald': z.object({ low: band.shape.low, high: band.shape.high, drift: z.boolean({ error: 'drift must be true or false.' }) }).strict(),
  'boosted-hp': z.object({ lambda, stopping: z.enum(['bic', 'fixed'], { error: 'stopping must be "bic" or "fixed".' }), iterations: count('iterations', 1, 500) }).strict(),
  'l1-trend': z.object({ lambda }).strict(),
} satisfies Record<Method, z.ZodObject>;

export const MAX_VALUES = 1_000_000;

export const decomposeRequestSchema = z.object({
  frequency: frequencySchema,
  start: z.string().max(10).optional(),
  values: z.array(z.unknown()).max(MAX_VALUES, `Send at most ${MAX_VALUES.toLocaleString('en-US')} values per series.`),
  transform: transformSchema.optional(),
  method: methodSchema,
  params: z.record(z.string(), z.unknown()).optional(),
});
export type DecomposeRequestBody = z.infer<typeof decomposeRequestSchema>;

/** A decomposition of a stored series (by id and vintage), as boards and batch runs ask for it. */
export const storedDecomposeSchema = z.object({
  seriesId: z.number().int().positive(),
  vintage: z.union([z.number().int().positive(), z.literal('latest')]).default('latest'),
  transform: transformSchema.optional(),
  method: methodSchema,
  params: z.record(z.string(), z.unknown()).optional(),
});

export const MAX_BATCH_ITEMS = 20_000;
export const batchRequestSchema = z.object({
  items: z
    .array(z.union([decomposeRequestSchema.extend({ id: z.string().max(100).optional() }), storedDecomposeSchema.extend({ id: z.string().max(100).optional() })]))
    .min(1, 'Send at least one item.')
    .max(MAX_BATCH_ITEMS, `Send at most ${MAX_BATCH_ITEMS} items per batch.`),
  /** `summary` answers only the last values and cycle statistics, for very large batches. */
  output: z.enum(['full', 'summary']).default('full'),
});

/** One item of a batch answered with `output: "summary"`: the last values and the cycle statistics. */
export interface BatchSummaryItem {
  id?: string;
  seriesId?: number;
  vintage?: number;
  method: string;
  params: Record<string, unknown>;
  transform: string;
  last: { period: string | null; index: number; trend: number; cycle: number } | null;
  statistics: Record<string, number | null>;
  warnings: string[];
}
