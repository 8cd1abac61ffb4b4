/** Exhibits (charts prepared for publication) and their review: bodies, states, snapshots and answers, shared with the client. */
import { z } from 'zod';
import { notesSchema, titleSchema } from './boards.js';
import type { ChronologyStamp } from './chronology.js';

/** `superseded`: a published exhibit whose update was published (it stays readable and points to its successor). */
export const EXHIBIT_STATES = ['draft', 'in_review', 'returned', 'approved', 'published', 'withdrawn', 'superseded'] as const;
export type ExhibitState = (typeof EXHIBIT_STATES)[number];

const exhibitText = {
  title: titleSchema,
  subtitle: z.string().trim().max(300, 'A subtitle has at most 300 characters.').optional(),
  notes: notesSchema.optional(),
  units: z.string().trim().max(120, 'Units have at most 120 characters.').optional(),
  sourceLine: z.string().trim().max(300, 'The source line has at most 300 characters.').optional(),
  chartKind: z.enum(['cycle', 'trend']).optional(),
  /** The exhibit's number as the report prints it ("Chart 3"). */
  number: z.string().trim().max(40, 'A number has at most 40 characters.').optional(),
  /** The reference chronology whose contractions the chart shades (null: none). */
  chronologyId: z.number().int().positive().nullable().optional(),
  /** Draw the band of past revisions around the latest end-of-sample estimates (a single-method study's cycle chart), with its note. */
  revisionBand: z.boolean({ error: 'revisionBand is true or false.' }).optional(),
};
export const createExhibitSchema = z
  .object({ studyId: z.number().int().positive().optional(), panelId: z.number().int().positive().optional(), ...exhibitText })
  .refine((v) => (v.studyId === undefined) !== (v.panelId === undefined), { message: 'Draft an exhibit from one study or one panel.', path: ['studyId'] });
export type CreateExhibitBody = z.infer<typeof createExhibitSchema>;
export const updateExhibitSchema = z.object({ ...exhibitText, title: titleSchema.optional() }).refine((v) => Object.keys(v).length > 0, 'Send at least one field.');
export type UpdateExhibitBody = z.infer<typeof updateExhibitSchema>;
export const transitionSchema = z.object({
  to: z.enum(EXHIBIT_STATES, { error: `"to" is one of ${EXHIBIT_STATES.join(', ')}.` }),
  comment: z.string().trim().max(5000, 'A comment has at most 5000 characters.').optional(),
});

/** What an exhibit freezes when it is submitted, and renders from afterwards (server and client). */
export interface Snapshot {
  schema: 1;
  kind: 'study' | 'panel';
  /** "range": a range study's range of gap estimates across methods (`lines` are the methods' cycles, `range` the band and median). */
  chartKind: 'cycle' | 'trend' | 'compare' | 'range';
  text: { title: string; subtitle: string | null; units: string | null; sourceLine: string | null; notes: string | null };
  series: { id: number; code: string; title: string; unit: string; source: string }[];
  lines: { label: string; role: 'input' | 'trend' | 'cycle'; periods: string[]; values: (number | null)[] }[];
  studies: { id: number; title: string; method: string; params: Record<string, unknown>; transform: string; vintage: number; asOf: string; vintageChecksum: string; methodLine: string }[];
  turningPoints?: { period: string; type: 'peak' | 'trough' }[];
  endOfSamplePeriods: number;
  methodLine: string;
  vintageStamp: string;
  caution: string;
  software: { name: string; version: string };
  frozenAt: string | null;
  /** Contractions of the reference chronology the chart shades, as frozen (issue 14). */
  chronology?: ChronologyStamp | null;
  /** The printed frame as frozen: number, institution and the source line in the institution's wording. */
  publication?: { number: string | null; institution: string; sourceLine: string };
  /** The transform of a single study's data (trend charts show levels on the series' scale). */
  transform?: string;
  /** A range study's median, lowest and highest estimate per period across its methods, on the lines' periods (chartKind "range"). */
  range?: { periods: string[]; median: (number | null)[]; min: (number | null)[]; max: (number | null)[] };
  /** The band of past revisions at the latest estimate's last periods, by distance from the end (the exhibit option; not a forecast). */
  revisionBand?: { period: string; distance: number; value: number; lower: number | null; upper: number | null }[];
}

/** One recorded state change of an exhibit. */
export interface ExhibitEvent {
  id: number;
  at: string;
  actor: { id: number; name: string } | null;
  from: ExhibitState | null;
  to: ExhibitState;
  comment: string | null;
  revision: number | null;
}

/** An exhibit in lists (the Review desk adds `own`). */
export interface ExhibitSummary {
  id: number;
  title: string;
  subtitle: string | null;
  units: string | null;
  sourceLine: string | null;
  notes: string | null;
  chartKind: 'cycle' | 'trend';
  number: string | null;
  chronologyId: number | null;
  /** The band of past revisions is drawn (an exhibit option). */
  revisionBand: boolean;
  status: ExhibitState;
  revision: number;
  studyId: number | null;
  panelId: number | null;
  /** The published exhibit this one updates (issue 15). */
  updateOf: number | null;
  author: { id: number; name: string };
  submittedAt: string | null;
  publishedAt: string | null;
  createdAt: string;
  updatedAt: string;
}

/** One exhibit as GET /exhibits/:id answers it. */
export interface Exhibit extends ExhibitSummary {
  snapshot: Snapshot | null;
  snapshotChecksum: string | null;
  /** A draft's content computed from the current data (the author's view before submission). */
  live: Snapshot | null;
  events: ExhibitEvent[];
  /** The moves the person asking may make now. */
  moves: { to: ExhibitState; comment: 'required' | 'optional' }[];
  editable: boolean;
  publicUrl: string | null;
  /** The exhibit this one updates, as readable to the person asking. */
  predecessor: { id: number; title: string; status: ExhibitState; publishedAt: string | null } | null;
  /** The published update that superseded this exhibit. */
  successor: { id: number; title: string; publishedAt: string | null } | null;
  /** The vintage an update draws on when its study pins an older one. */
  vintagePin: number | null;
  /** Updates of this published exhibit being prepared that the person asking may see (never shown to readers). */
  updatesInProgress: { id: number; status: ExhibitState; author: { id: number; name: string } }[];
}

/** A published exhibit by its public link: what the published figure shows, nothing of its making (services/exhibits/views.ts). */
export interface PublicExhibit {
  slug: string;
  title: string;
  subtitle: string | null;
  units: string | null;
  sourceLine: string | null;
  chartKind: 'cycle' | 'trend';
  status: 'published' | 'superseded';
  publishedAt: string | null;
  snapshot: Snapshot;
  /** The public link of the update that superseded it. */
  successorSlug: string | null;
}

/** What changed between two revisions. */
export interface ExhibitDiff {
  from: number | null;
  to: number;
  text: { field: string; before: string | null; after: string | null }[];
  studies: { id: number; what: string; before: unknown; after: unknown }[];
  data: { line: string; changedPeriods: number; newPeriods: number; maxAbsChange: number | null }[];
}

/** GET /exhibits/:id/diff. */
export interface ExhibitDiffAnswer {
  previous: Snapshot | null;
  current: Snapshot;
  diff: ExhibitDiff;
  /** For an update: the published exhibit it would supersede, and what changed against it. */
  published: { exhibitId: number; title: string; snapshot: Snapshot; diff: ExhibitDiff } | null;
}
