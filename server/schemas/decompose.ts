/**
 * Bodies and answers of the decomposition routes (POST /decompose, /decompose/batch), and the
 * transforms. The method field is a string here (the client shares these schemas without the
 * method registry); the server's routes pass the registry's list of ids to the schema factory.
 */
import { z } from 'zod';
import { frequencySchema, type Frequency } from './frequency.js';
import type { ParamValue } from './methods.js';

export { frequencySchema };

export const TRANSFORMS = ['none', 'log', 'log100'] as const;
/** Transforms applied before decomposing: none, natural log, or 100 × natural log (cycle in percent). */
export type Transform = (typeof TRANSFORMS)[number];
export const transformSchema = z.enum(TRANSFORMS);
export const TRANSFORM_LABELS: Record<Transform, string> = {
  none: 'levels',
  log: 'natural log',
  log100: '100 × natural log (cycle in % of trend)',
};

/** A method id; the server checks it against the registry (server/analysis/methods/). */
export const methodIdSchema = z.string({ error: 'Choose a method.' }).min(1, 'Choose a method.').max(40, 'Choose a method.');

export const MAX_VALUES = 1_000_000;
export const MAX_BATCH_ITEMS = 20_000;

/** The decomposition bodies, with `method` checked by the schema given (the server passes the registry's ids). */
export function decomposeSchemas(method: z.ZodType<string> = methodIdSchema) {
  const decomposeRequestSchema = z.object({
    frequency: frequencySchema,
    start: z.string().max(10).optional(),
    values: z.array(z.unknown()).max(MAX_VALUES, `Send at most ${MAX_VALUES.toLocaleString('en-US')} values per series.`),
    transform: transformSchema.optional(),
    method,
    params: z.record(z.string(), z.unknown()).optional(),
  });
  /** A decomposition of a stored series (by id and vintage), as boards and batch runs ask for it. */
  const storedDecomposeSchema = z.object({
    seriesId: z.number().int().positive(),
    vintage: z.union([z.number().int().positive(), z.literal('latest')]).default('latest'),
    transform: transformSchema.optional(),
    method,
    params: z.record(z.string(), z.unknown()).optional(),
  });
  const batchRequestSchema = z.object({
    items: z
      .array(z.union([decomposeRequestSchema.extend({ id: z.string().max(100).optional() }), storedDecomposeSchema.extend({ id: z.string().max(100).optional() })]))
      .min(1, 'Send at least one item.')
      .max(MAX_BATCH_ITEMS, `Send at most ${MAX_BATCH_ITEMS} items per batch.`),
    /** `summary` answers only the last values and cycle statistics, for very large batches. */
    output: z.enum(['full', 'summary']).default('full'),
  });
  return { decomposeRequestSchema, storedDecomposeSchema, batchRequestSchema };
}

export const { decomposeRequestSchema, storedDecomposeSchema, batchRequestSchema } = decomposeSchemas();
export type DecomposeRequestBody = z.infer<typeof decomposeRequestSchema>;

/** The answer of POST /decompose (API.md); a method's extra series (cycleLower, cycleUpper…) are further keys. */
export interface DecomposeJson {
  method: string;
  params: Record<string, ParamValue>;
  transform: Transform;
  frequency: Frequency;
  periods?: string[];
  input: (number | null)[];
  trend: (number | null)[];
  cycle: (number | null)[];
  /** Periods past the end of the input (forecasts), from index `from`, and their label on charts. */
  extension?: { from: number; periods: number; label: string };
  warnings: string[];
  diagnostics: Record<string, unknown>;
  [series: string]: unknown;
}

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
