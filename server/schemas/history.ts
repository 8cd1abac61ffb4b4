/** History loads (POST /series/:series/history) and the release table out: fields and answers. */
import { z } from 'zod';
import type { FileProblem, RevisionSummary } from './catalogue.js';

const row = (what: string) =>
  z.coerce
    .number({ error: `The ${what} is a row number (1, 2, …).` })
    .int(`The ${what} is a whole row number.`)
    .min(1, `The ${what} is a row number from 1.`)
    .max(100_000, `The ${what} is at most 100000.`)
    .optional();

/** The multipart fields of a history load; every one is optional (detected when left out). */
export const historyFieldsSchema = z.object({
  sheet: z.string().trim().min(1).max(100, 'A sheet name has at most 100 characters.').optional(),
  headerRow: row('header row'),
  releaseDateRow: row('release-date row'),
  layout: z.enum(['wide', 'long'], { error: 'The layout is wide or long.' }).optional(),
  note: z.string().max(2000, 'The note has at most 2000 characters.').optional(),
});
export type HistoryFields = z.infer<typeof historyFieldsSchema>;

/** GET /series/:series/history?format=csv|xlsx */
export const historyExportQuerySchema = z.object({ format: z.enum(['csv', 'xlsx'], { error: 'The format is csv or xlsx.' }).default('csv') });

/** How one header (wide) or release label (long) was read. */
export interface HistoryHeader {
  column: string;
  text: string;
  readAs: string;
  asOf: string | null;
}

/** A vintage the history load makes (or made), and what it revised against the one before. */
export interface HistoryVintage {
  number: number;
  asOf: string;
  label: string;
  rowCount: number;
  column?: string;
  firstPeriod?: string | null;
  lastPeriod?: string | null;
  changes?: RevisionSummary;
}

/** A column (or group of rows) that makes no vintage, and why. */
export interface HistorySkipped {
  column: string;
  label: string;
  reason: string;
}

export interface HistoryPreview {
  format: 'csv' | 'xlsx';
  filename: string;
  sheets: string[];
  sheet: string | null;
  layout: 'wide' | 'long';
  headerRow: number;
  releaseDateRow: number | null;
  /** Which of layout, headerRow and releaseDateRow were found rather than given. */
  detected: { layout: boolean; headerRow: boolean; releaseDateRow: boolean };
  headers: HistoryHeader[];
  vintages: HistoryVintage[];
  skipped: HistorySkipped[];
  /** The series' latest stored vintage before this load (new vintages follow it). */
  latestVintage: { number: number; asOf: string } | null;
  problems: FileProblem[];
  errors: number;
  warnings: number;
  canStore: boolean;
}

/** The answer of a history load: 201 when stored, 200 for a dry run (numbers as they would be). */
export interface HistoryAnswer {
  vintages: HistoryVintage[];
  skipped: HistorySkipped[];
  loadId?: number;
  preview: HistoryPreview;
}
