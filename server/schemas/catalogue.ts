/** Bodies of the Catalogue routes (series metadata and loads), shared with the client forms. */
import { z } from 'zod';

export const SA_VALUES = ['sa', 'nsa', 'sca'] as const;
export const SA_LABELS: Record<(typeof SA_VALUES)[number], string> = {
  sa: 'seasonally adjusted',
  nsa: 'not seasonally adjusted',
  sca: 'seasonally and calendar adjusted',
};

const text = (what: string, max: number) => z.string({ error: `Enter the ${what}.` }).trim().min(1, `Enter the ${what}.`).max(max, `The ${what} has at most ${max} characters.`);

export const seriesCodeSchema = z
  .string({ error: 'Enter a code.' })
  .trim()
  .min(2, 'A code has at least 2 characters.')
  .max(64, 'A code has at most 64 characters.')
  .regex(/^[A-Z][A-Z0-9_.]*$/, 'Use capital letters, digits, "_" and "." only, starting with a letter (for example NL_GDP_REAL).');

export const createSeriesSchema = z.object({
  code: seriesCodeSchema,
  title: text('title', 300),
  frequency: z.enum(['A', 'Q', 'M'], { error: 'Choose the frequency: A, Q or M.' }),
  unit: text('unit', 120),
  seasonalAdjustment: z.enum(SA_VALUES, { error: 'Choose sa, nsa or sca.' }),
  source: z.string().trim().max(300, 'The source has at most 300 characters.').default(''),
  notes: z.string().max(5000, 'Notes have at most 5000 characters.').optional(),
  sdmxKey: z.string().trim().max(200).regex(/^[A-Za-z0-9_.@-]*$/, 'An SDMX key has letters, digits and . _ @ - only.').optional(),
});
export type CreateSeriesBody = z.infer<typeof createSeriesSchema>;

/** Metadata can be corrected, except the frequency once a vintage exists (the checks depend on it). */
// No defaults here: a field left out stays as it is (the create schema's default source of '' would
// otherwise wipe the source at every correction).
export const updateSeriesSchema = createSeriesSchema
  .extend({ source: z.string().trim().max(300, 'The source has at most 300 characters.') })
  .partial()
  .refine((v) => Object.keys(v).length > 0, 'Send at least one field to change.');

/** A calendar date written YYYY-MM-DD (an as-of date, a release date). */
export const isoDateSchema = z
  .string({ error: 'Write the as-of date as YYYY-MM-DD.' })
  .regex(/^\d{4}-\d{2}-\d{2}$/, 'Write the as-of date as YYYY-MM-DD.')
  .refine((d) => !Number.isNaN(Date.parse(d + 'T00:00:00Z')) && new Date(d + 'T00:00:00Z').toISOString().slice(0, 10) === d, 'The as-of date is not a real date.');

export const loadFieldsSchema = z.object({
  note: z.string().max(2000, 'The note has at most 2000 characters.').optional(),
  asOf: isoDateSchema.optional(),
  format: z.enum(['csv', 'sdmx-csv', 'xlsx']).optional(),
  expectChecksum: z.string().regex(/^[0-9a-f]{64}$/).optional(),
});
export type LoadFields = z.infer<typeof loadFieldsSchema>;

/** GET /series/:series/observations?asOf=YYYY-MM-DD: the vintage in force on that date. */
export const asOfQuerySchema = z.object({ asOf: isoDateSchema });

/** The answer of GET /series/:series/observations?asOf=…: the vintage in force and its rows. */
export interface ObservationsAsOf {
  vintage: { number: number; asOf: string };
  periods: string[];
  values: (number | null)[];
}

/** Revisions between two vintages, as the API answers them. */
export type RevisionStatus = 'revised' | 'new' | 'removed' | 'unchanged';

export interface RevisionRow {
  period: string;
  from: number | null;
  to: number | null;
  revision: number | null;
  percent: number | null;
  status: RevisionStatus;
}

export interface RevisionSummary {
  revised: number;
  new: number;
  removed: number;
  unchanged: number;
  meanRevision: number | null;
  meanAbsoluteRevision: number | null;
  maxAbsoluteRevision: number | null;
}

/** One problem in an uploaded file, by row and column (1-based rows, as a spreadsheet counts them). */
export interface FileProblem {
  row: number | null;
  column: string | null;
  message: string;
  severity: 'error' | 'warning';
}

/** What a load would do to one series (the preview), as the API answers it. */
export interface SeriesPreview {
  series: { id: number; code: string; title: string; frequency: 'A' | 'Q' | 'M'; unit: string } | null;
  key: string | null;
  rowCount: number;
  firstPeriod: string | null;
  lastPeriod: string | null;
  missingValues: number;
  checksum: string | null;
  latestVintage: number | null;
  identicalToLatest: boolean;
  changes: RevisionSummary | null;
  /** Up to 500 changed periods, for the preview table. */
  changedPeriods: RevisionRow[];
  problems: FileProblem[];
  errors: number;
  warnings: number;
  /** The file's observations, in previews of small loads into one series (for the chart). */
  observations?: { periods: string[]; values: (number | null)[] };
}

/** The preview of a load: every series in the file, checked. */
export interface LoadPreview {
  /** The file's format; `sdmx-ml` for an SDMX-ML data message a feed fetched. */
  format: 'csv' | 'sdmx-csv' | 'xlsx' | 'sdmx-ml';
  filename: string;
  series: SeriesPreview[];
  /** Problems of the file as a whole (per-series problems are in `series`). */
  problems: FileProblem[];
  errors: number;
  warnings: number;
  observations: number;
  canStore: boolean;
}

/** A vintage a load stored. */
export interface StoredLoadVintage {
  seriesId: number;
  code: string;
  number: number;
  asOf: string;
  rowCount: number;
  checksum: string;
}

/**
 * The answer of both load routes. A dry run answers `preview` alone. A stored load into one series
 * (POST /series/:id/vintages) adds `vintage` and `loadId`; a stored load of many series
 * (POST /loads) adds `load`, `vintages` and the codes of the `unchanged` series.
 */
export interface LoadAnswer {
  preview: LoadPreview;
  vintage?: { number: number; asOf: string; rowCount: number; checksum: string };
  loadId?: number;
  load?: { id: number };
  vintages?: StoredLoadVintage[];
  unchanged?: string[];
}

/** A past load, as GET /loads lists it. */
export interface LoadSummary {
  id: number;
  filename: string;
  format: string;
  seriesCount: number;
  observationCount: number;
  note: string | null;
  createdAt: string;
  createdBy: string;
}

/** A series of the Catalogue, as the API answers it. */
export interface Series {
  id: number;
  code: string;
  title: string;
  frequency: 'A' | 'Q' | 'M';
  unit: string;
  seasonalAdjustment: (typeof SA_VALUES)[number];
  source: string;
  notes: string | null;
  sdmxKey: string | null;
  createdAt: string;
  updatedAt: string;
}

/** A vintage (one stored release of a series), as the API answers it. */
export interface Vintage {
  number: number;
  asOf: string;
  note: string | null;
  rowCount: number;
  checksum: string;
  firstPeriod: string | null;
  lastPeriod: string | null;
  createdAt: string;
  createdBy: { id: number; name: string } | null;
  loadId: number | null;
}

/** A series in the Catalogue's list, with its latest vintage. */
export interface SeriesListItem extends Series {
  latestVintage: { number: number; asOf: string; loadedAt: string; lastPeriod: string | null; rowCount: number } | null;
}

/** The most series one page of the Catalogue's list holds (`?limit=`). */
export const SERIES_PAGE_MAX = 500;

/**
 * `GET /series` query: a search text over code and title, filters, and an optional page
 * (`limit`, `offset`). Without `limit` every matching series is answered, as before.
 */
export const SERIES_SORTS = ['code', 'title', 'frequency', 'unit'] as const;

export const seriesListQuerySchema = z.object({
  q: z.string().max(100, 'The search text has at most 100 characters.').optional(),
  frequency: z.enum(['A', 'Q', 'M'], { error: 'The frequency is A, Q or M.' }).optional(),
  unit: z.string().max(120, 'The unit has at most 120 characters.').optional(),
  limit: z.coerce
    .number({ error: 'The limit is a whole number of series from 1 to 500.' })
    .int('The limit is a whole number of series from 1 to 500.')
    .min(1, 'The limit is at least 1.')
    .max(SERIES_PAGE_MAX, `The limit is at most ${SERIES_PAGE_MAX}: ask for the next page with offset.`)
    .optional(),
  offset: z.coerce
    .number({ error: 'The offset is a whole number of series to skip, from 0.' })
    .int('The offset is a whole number of series to skip, from 0.')
    .min(0, 'The offset is at least 0.')
    .max(2 ** 31, 'The offset is too large.')
    .optional(),
  /** The order of the list (then by code): code (the default), title, frequency or unit. */
  sort: z.enum(SERIES_SORTS, { error: `Sort by ${SERIES_SORTS.join(', ')}.` }).optional(),
  order: z.enum(['asc', 'desc'], { error: 'The order is asc or desc.' }).optional(),
});
export type SeriesListQuery = z.infer<typeof seriesListQuerySchema>;

/** `GET /catalogue/units`: the units series are kept in, with how many series each. */
export interface CatalogueUnits {
  items: { unit: string; series: number }[];
}

/** `GET /series`: the matching series in code order (one page when `limit` is given) and how many match in all. */
export interface SeriesListAnswer {
  items: SeriesListItem[];
  total: number;
}
