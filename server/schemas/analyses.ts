/**
 * Analyses across methods, shared with the client: the range of gap estimates
 * (POST /studies/range) and the real-time reliability table (POST /series/:series/reliability).
 */
import { z } from 'zod';
import { methodIdSchema, transformSchema } from './decompose.js';
import type { Frequency } from './frequency.js';
import { vintagePinSchema } from './studies.js';

/** The bodies, with `method` checked by the schema given (the server passes the registry's ids). */
export function analysesSchemas(method: z.ZodType<string> = methodIdSchema) {
  const methodItem = z.object({ method, params: z.record(z.string(), z.unknown()).default({}) });
  const methods = z.array(methodItem, { error: 'methods must be a list of {method, params}.' }).min(1, 'Choose at least one method.').max(12, 'Choose at most 12 methods.');
  const rangeSchema = z.object({
    seriesId: z.number({ error: 'Choose a series.' }).int().positive(),
    vintage: vintagePinSchema.default('latest'),
    transform: transformSchema.default('none'),
    methods: methods.refine((m) => m.length >= 2, 'A range needs at least two methods.'),
  });
  const reliabilitySchema = z.object({
    transform: transformSchema.default('none'),
    methods,
    /** How many periods back from the end the revision spread is measured (default two years). */
    depth: z.number().int().min(1, 'depth must be at least 1.').max(60, 'depth must be at most 60.').optional(),
  });
  return { rangeSchema, reliabilitySchema };
}

export const { rangeSchema, reliabilitySchema } = analysesSchemas();
export type RangeBody = z.infer<typeof rangeSchema>;
export type ReliabilityBody = z.infer<typeof reliabilitySchema>;

/** One method's line in a range. */
export interface RangeItem {
  method: string;
  params: Record<string, unknown>;
  /** The method's published name, for the legend. */
  name: string;
  methodLine: string;
  twoSided: boolean;
  cycle: (number | null)[];
}

/** POST /studies/range: each method's cycle on aligned periods, and per period the median, minimum and maximum across methods. */
export interface RangeResult {
  series: { id: number; code: string; title: string; unit: string; frequency: Frequency; source: string };
  vintage: number;
  asOf: string;
  transform: string;
  unitOfCycle: string;
  periods: string[];
  items: RangeItem[];
  median: (number | null)[];
  min: (number | null)[];
  max: (number | null)[];
  /** How many methods have a value at each period. */
  count: number[];
  cautions: string[];
}

export interface ReliabilityStatistics {
  correlation: number | null;
  noiseToSignal: number | null;
  signChangeShare: number | null;
  meanAbsoluteRevision: number | null;
  periods: number;
}

/** POST /series/:series/reliability. */
export interface ReliabilityResult {
  series: { id: number; code: string; title: string; unit: string; frequency: Frequency };
  transform: string;
  unitOfCycle: string;
  vintages: number;
  finalVintage: number;
  items: {
    method: string;
    params: Record<string, unknown>;
    name: string;
    methodLine: string;
    statistics: ReliabilityStatistics;
    /** Revisions (final − estimate) by distance from the end of each vintage's sample. */
    revisionSpread: { distance: number; count: number; sd: number | null; p05: number | null; p95: number | null }[];
    /** The latest estimate's last periods with the band of past revisions at that distance. */
    revisionBand: { period: string; distance: number; value: number; lower: number | null; upper: number | null }[];
    error?: { code: string; message: string };
  }[];
  notes: string[];
}
