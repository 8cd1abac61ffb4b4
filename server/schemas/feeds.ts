/**
 * Feeds: scheduled pulls from SDMX REST sources. The body that registers one, the schedule in
 * words, and the answers of the feed routes, shared by the server and the client's form.
 */
import { Cron } from 'croner';
import cronstrue from 'cronstrue';
import { z } from 'zod';
import type { FileProblem } from './catalogue.js';

/** Schedules are read in UTC, whatever the server's or the person's time zone. */
export const SCHEDULE_ZONE = 'UTC';

/** A cron schedule checked as the scheduler reads it: five fields (minute hour day month weekday), in UTC. */
export function checkSchedule(expression: string): string | null {
  const fields = expression.trim().split(/\s+/);
  if (fields.length !== 5) return `A schedule has five fields (minute, hour, day of month, month, day of week), for example "30 9 * * 1-5"; this one has ${fields.length}.`;
  try {
    const next = new Cron(expression, { paused: true, timezone: SCHEDULE_ZONE }).nextRun();
    if (!next) return 'This schedule never runs (no such date); check the day and month.';
  } catch (error) {
    return `The schedule is not a cron expression: ${String((error as Error).message).replace(/^CronPattern: /, '')}.`;
  }
  return null;
}

/** The schedule in words ("At 09:30, Monday through Friday (UTC)"), or why it cannot be read. */
export function scheduleInWords(expression: string | null | undefined): string {
  if (!expression || !expression.trim()) return 'On demand only (Run now)';
  if (checkSchedule(expression)) return 'Not a valid schedule';
  try {
    return `${cronstrue.toString(expression, { use24HourTimeFormat: true, verbose: false })} (${SCHEDULE_ZONE})`;
  } catch {
    return 'Not a valid schedule';
  }
}

/** The latest time the schedule names at or before `now`, or null. */
export function latestSlot(schedule: string, now: Date): Date | null {
  if (checkSchedule(schedule)) return null;
  // croner reads the reference to the second and looks strictly before it: a second on, so that a
  // tick at 09:30:00.004 finds 09:30 itself.
  return new Cron(schedule, { paused: true, timezone: SCHEDULE_ZONE }).previousRuns(1, new Date(Math.floor(now.getTime() / 1000) * 1000 + 1000))[0] ?? null;
}

/** The scheduled times after `from` (at most `count`), for the form's "next runs". */
export function nextRuns(expression: string, count: number, from = new Date()): Date[] {
  if (checkSchedule(expression)) return [];
  return new Cron(expression, { paused: true, timezone: SCHEDULE_ZONE }).nextRuns(count, from);
}

const sdmxKey = z.string().trim().min(1, 'Give the series key in the answer, for example Q.EST.GDP_VOL.').max(200).regex(/^[A-Za-z0-9_@$\-]+(\.[A-Za-z0-9_@$\-]*)*$/, 'A series key is dimension values separated by dots, for example Q.EST.GDP_VOL.');
const seriesCode = z.string().trim().min(1, 'Choose the series this key fills.').max(64);
const headerName = z.string().trim().min(1, 'Name the header.').max(100).regex(/^[A-Za-z0-9!#$%&'*+.^_`|~-]+$/, 'A header name has letters, digits and - only (for example X-Api-Key).');

export const feedMappingSchema = z.object({ key: sdmxKey, series: seriesCode });
export const feedHeaderSchema = z.object({ name: headerName, value: z.string().max(2000).regex(/^[^\r\n]*$/, 'A header value is one line.') });

const RESERVED_HEADERS = new Set(['host', 'content-length', 'connection', 'transfer-encoding', 'accept-encoding']);

const feedName = z.string().trim().min(1, 'Give the feed a name.').max(120);
const feedUrl = z
  .string()
  .trim()
  .max(2000)
  .url('Give the full address, starting with https:// or http://.')
  .refine((u) => /^https?:\/\//i.test(u), 'The address starts with https:// or http://.')
  .refine((u) => /\/data\/[^/?#]+/.test(u), 'An SDMX REST data address has the form …/data/{flow}/{key}.');
const feedMappings = z.array(feedMappingSchema).min(1, 'Say which series the feed fills: at least one key and series.').max(200);
/** A schedule, or null / "" for on demand only. */
const feedSchedule = z
  .string()
  .trim()
  .max(120)
  .nullable()
  .superRefine((s, ctx) => {
    const problem = s ? checkSchedule(s) : null;
    if (problem) ctx.addIssue({ code: 'custom', message: problem });
  });
const feedHeaders = z.array(feedHeaderSchema).max(10);
/** The steward the feed's failures are mailed to. */
const feedSteward = z.number().int().positive();

/** Keys and series each listed once; no header the connection sets itself. */
function checkLists(f: { mappings?: { key: string; series: string }[]; headers?: { name: string }[] }, ctx: z.RefinementCtx) {
  const keys = new Set<string>();
  f.mappings?.forEach((m, i) => {
    const k = m.key.toUpperCase();
    if (keys.has(k)) ctx.addIssue({ code: 'custom', path: ['mappings', i, 'key'], message: `The key ${m.key} is listed twice.` });
    keys.add(k);
  });
  const codes = new Set<string>();
  f.mappings?.forEach((m, i) => {
    const c = m.series.toUpperCase();
    if (codes.has(c)) ctx.addIssue({ code: 'custom', path: ['mappings', i, 'series'], message: `The series ${m.series} is filled by two keys; one key per series.` });
    codes.add(c);
  });
  f.headers?.forEach((h, i) => {
    if (RESERVED_HEADERS.has(h.name.toLowerCase())) ctx.addIssue({ code: 'custom', path: ['headers', i, 'name'], message: `${h.name} is set by the connection itself; leave it out.` });
  });
}

export const createFeedSchema = z
  .object({
    name: feedName,
    url: feedUrl,
    mappings: feedMappings,
    schedule: feedSchedule.optional().transform((s) => (s ? s : null)),
    headers: feedHeaders.default([]),
    /** The steward the feed's failures are mailed to (default: the person registering it). */
    stewardId: feedSteward.optional(),
    enabled: z.boolean().default(true),
  })
  .superRefine(checkLists);

/**
 * PATCH /feeds/:id: what is sent replaces what is stored (`headers` as a whole list, with their
 * values); `enabled: false` pauses the schedule, `schedule: null` leaves "Run now" only.
 */
export const updateFeedSchema = z
  .object({
    name: feedName.optional(),
    url: feedUrl.optional(),
    mappings: feedMappings.optional(),
    schedule: feedSchedule.optional().transform((s) => (s === undefined ? undefined : s || null)),
    headers: feedHeaders.optional(),
    stewardId: feedSteward.optional(),
    enabled: z.boolean().optional(),
  })
  .strict()
  .superRefine(checkLists)
  .refine((f) => Object.values(f).some((v) => v !== undefined), 'Send at least one thing to change: name, url, mappings, schedule, headers, stewardId or enabled.');

export type CreateFeedInput = z.input<typeof createFeedSchema>;
export type CreateFeedBody = z.output<typeof createFeedSchema>;
export type UpdateFeedBody = z.output<typeof updateFeedSchema>;

export const FEED_OUTCOMES = ['running', 'stored', 'unchanged', 'failed', 'abandoned'] as const;
export type FeedOutcome = (typeof FEED_OUTCOMES)[number];

export const FEED_OUTCOME_WORDS: Record<FeedOutcome, string> = {
  running: 'Running',
  stored: 'New vintages stored',
  unchanged: 'Nothing new',
  failed: 'Failed: nothing stored',
  abandoned: 'Abandoned (the run stopped; its lease expired)',
};

export interface FeedRunVintage {
  seriesId: number;
  code: string;
  number: number;
  asOf: string;
}

/** The problems of one series of a run (its key in the answer and the Catalogue series it fills). */
export interface FeedSeriesProblems {
  key: string;
  series: string | null;
  problems: FileProblem[];
}

export interface FeedRun {
  id: number;
  feedId: number;
  trigger: 'schedule' | 'manual';
  outcome: FeedOutcome;
  startedAt: string;
  finishedAt: string | null;
  durationMs: number | null;
  message: string | null;
  loadId: number | null;
  vintages: FeedRunVintage[];
  problems: FeedSeriesProblems[];
  startedBy: string | null;
}

export interface Feed {
  id: number;
  name: string;
  url: string;
  mappings: { key: string; series: string }[];
  /** Header names only: values (API keys) are never shown again. */
  headers: { name: string }[];
  schedule: string | null;
  scheduleWords: string;
  nextRunAt: string | null;
  enabled: boolean;
  steward: { id: number; name: string; email: string };
  createdAt: string;
  lastRun: FeedRun | null;
}

export interface FeedList {
  items: Feed[];
}

export interface FeedRunList {
  items: FeedRun[];
}
