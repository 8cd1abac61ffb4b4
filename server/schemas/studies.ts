/** Bodies of the Studies routes, shared with the study form. */
import { z } from 'zod';
import { methodIdSchema, transformSchema, type Transform } from './decompose.js';
import type { Frequency } from './frequency.js';
import { isoDateSchema } from './catalogue.js';

/** "single": one method and its parameters; "range": the range of gap estimates across several methods. */
export const studyKindSchema = z.enum(['single', 'range'], { error: 'kind is "single" or "range".' });
export type StudyKind = z.infer<typeof studyKindSchema>;

export const vintagePinSchema = z.union([z.number().int().positive(), z.literal('latest')], { error: 'The vintage is a number (1, 2, …) or "latest".' });

/** The study bodies, with `method` checked by the schema given (the server passes the registry's ids). */
export function studySchemas(method: z.ZodType<string> = methodIdSchema) {
  const fields = {
    seriesId: z.number({ error: 'Choose a series.' }).int().positive(),
    vintage: vintagePinSchema,
    transform: transformSchema,
    method,
    params: z.record(z.string(), z.unknown()),
    /** A date pin: the vintage in force on that date (the latest released on or before it); null clears it. */
    asOf: isoDateSchema.nullable(),
  };
  const text = {
    title: z.string({ error: 'Give the study a title.' }).trim().min(1, 'Give the study a title.').max(200, 'A title has at most 200 characters.'),
    notes: z.string().max(10_000, 'Notes have at most 10 000 characters.').optional(),
    /** The reference chronology whose contractions the study's charts shade (null: none). */
    chronologyId: z.number().int().positive().nullable().optional(),
  };
  const studySpecSchema = z.object({ ...fields, asOf: fields.asOf.optional(), vintage: fields.vintage.default('latest'), transform: fields.transform.default('none'), params: fields.params.default({}) });
  /** A range study's methods: the range of gap estimates across them (at least two). */
  const methods = z
    .array(z.object({ method, params: z.record(z.string(), z.unknown()).default({}) }), { error: 'methods must be a list of {method, params}.' })
    .min(2, 'A range study needs at least two methods.')
    .max(12, 'A range study has at most 12 methods.');
  const createStudySchema = studySpecSchema
    .extend({ ...text, method: method.optional(), kind: studyKindSchema.default('single'), methods: methods.optional() })
    .superRefine((v, ctx) => {
      if (v.kind === 'single' && !v.method) ctx.addIssue({ code: 'custom', path: ['method'], message: 'Choose a method (or send kind "range" with a list of methods).' });
      if (v.kind === 'range' && !v.methods) ctx.addIssue({ code: 'custom', path: ['methods'], message: 'A range study needs its methods: a list of {method, params}.' });
      if (v.kind === 'range' && v.method) ctx.addIssue({ code: 'custom', path: ['method'], message: 'A range study has a list of methods, not one method: send methods instead.' });
      if (v.kind === 'single' && v.methods) ctx.addIssue({ code: 'custom', path: ['methods'], message: 'A list of methods makes a range study: send kind "range" with it.' });
    });
  // No defaults in a change: a field left out keeps its saved value (a default would reset it).
  const updateStudySchema = z
    .object({ ...fields, ...text, methods })
    .partial()
    .refine((v) => Object.keys(v).length > 0, 'Send at least one field to change.');
  const compareSchema = z.object({
    items: z
      .array(studySpecSchema.extend({ label: z.string().max(100).optional() }))
      .min(1, 'Add at least one line to compare.')
      .max(12, 'Compare at most 12 lines at once.'),
    /** Index of the item the cross-correlations are measured against. */
    reference: z.number().int().min(0).default(0),
    maxLag: z.number().int().min(0).max(24).default(8),
    /** A common frequency for series of different frequencies (higher ones are averaged into it). */
    frequency: z.enum(['A', 'Q', 'M']).optional(),
  });
  return { studySpecSchema, createStudySchema, updateStudySchema, compareSchema };
}

export const { studySpecSchema, createStudySchema, updateStudySchema, compareSchema } = studySchemas();
export type StudySpec = z.infer<typeof studySpecSchema>;
export type CreateStudyBody = z.infer<typeof createStudySchema>;
export type UpdateStudyBody = z.infer<typeof updateStudySchema>;
/** One method of a range study. */
export interface MethodChoice {
  method: string;
  params: Record<string, unknown>;
}
export type CompareBody = z.infer<typeof compareSchema>;

/** A saved study as the API answers it. */
export interface Study {
  id: number;
  title: string;
  notes: string | null;
  seriesId: number;
  series: { code: string; title: string; frequency: 'A' | 'Q' | 'M'; unit: string };
  vintage: number | 'latest';
  /** Set when the study pins a date rather than a number: it reads the vintage in force then. */
  asOf: string | null;
  transform: 'none' | 'log' | 'log100';
  /** "range" studies have `method` "range", empty `params`, and their methods in `methods`. */
  kind: StudyKind;
  method: string;
  params: Record<string, unknown>;
  /** A range study's methods (null for a single-method study). */
  methods: MethodChoice[] | null;
  /** The reference chronology its charts shade, or null. */
  chronologyId: number | null;
  owner: { id: number; name: string };
  createdAt: string;
  updatedAt: string;
}

/** A study's decomposition as POST /studies/preview and GET /studies/:id/result answer it (the latter adds `study`). */
export interface StudyResult {
  method: string;
  params: Record<string, unknown>;
  transform: Transform;
  frequency: Frequency;
  periods: string[];
  input: (number | null)[];
  trend: (number | null)[];
  cycle: (number | null)[];
  /** A method's extra output series (for example cycleLower, cycleUpper), on `periods`. */
  extra?: Record<string, (number | null)[]>;
  /** Periods past the last observation (forecasts), from index `from`, and their label on charts. */
  extension?: { from: number; periods: number; label: string };
  warnings: string[];
  diagnostics: Record<string, unknown>;
  vintage: number;
  asOf: string;
  vintagePin: number | 'latest';
  series: { id: number; code: string; title: string; unit: string; frequency: 'A' | 'Q' | 'M'; source: string };
  statistics: Record<string, number | null>;
  turningPoints: { index: number; period: string; type: 'peak' | 'trough'; value: number }[];
  gain: { periods: number[]; gain: number[]; cutoff: number | null; band?: [number, number]; note?: string };
  methodLine: string;
  vintageStamp: string;
  twoSided: boolean;
  /** Periods at the end of a two-sided estimate that will be revised (two years; none where the filter gives no end values). */
  endOfSamplePeriods: number;
  /** What the end of the sample means for this method, in words ("no estimate for the first 12 and the last 12 quarters…"). */
  endNote: string | null;
  cautions: string[];
  unitOfCycle: string;
  /** Set when the data were averaged into a lower frequency before decomposing (comparisons). */
  aggregated?: { from: Frequency; to: Frequency; how: 'average' };
}

/** POST /studies/compare: cycles on aligned periods, with statistics and cross-correlations against the reference. */
export interface CompareResult {
  periods: string[];
  reference: number;
  mixedFrequencies: boolean;
  /** The frequency the lines are compared on. */
  frequency: Frequency;
  /** What was averaged into the common frequency, said on the chart ("X: monthly values averaged into quarterly periods"). */
  aggregated: string[];
  items: {
    label: string;
    seriesId: number;
    code: string;
    method: string;
    params: Record<string, unknown>;
    transform: string;
    vintage: number;
    methodLine: string;
    vintageStamp: string;
    unitOfCycle: string;
    twoSided: boolean;
    endOfSamplePeriods: number;
    cycle: (number | null)[];
    statistics: Record<string, number | null>;
    crossCorrelations: { lag: number; r: number | null; n: number }[];
  }[];
}

/** POST /studies/:id/realtime: real-time against final estimates, and the quasi-real-time variant. */
export interface RealtimeResult {
  study: { id: number; title: string; method: string; params: Record<string, unknown>; transform: string };
  series: { id: number; code: string; unit: string; frequency: 'A' | 'Q' | 'M' };
  unitOfCycle: string;
  methodLine: string;
  finalVintage: number;
  fan: { vintage: number; asOf: string; periods: string[]; cycle: (number | null)[] }[];
  final: { vintage: number; periods: string[]; cycle: (number | null)[] };
  realTime: { vintage: number; asOf: string; period: string | null; value: number | null; final: number | null }[];
  quasiRealTime: { period: string; value: number | null; final: number | null }[];
  statistics: Record<'realTime' | 'quasiRealTime' | 'dataRevisions', Record<string, number | null>>;
  note: string | null;
  /** The plural word for the frequency's periods ("quarters"). */
  word: string;
  /** The latest estimate's last two years with the 5–95 % range of past revisions at each distance from the end (not a forecast). */
  revisionBand: { period: string; distance: number; value: number; lower: number | null; upper: number | null }[];
}
