/** Bodies of the Boards and Exhibits routes, shared with the client forms. */
import { z } from 'zod';

const title = z.string({ error: 'Give it a title.' }).trim().min(1, 'Give it a title.').max(200, 'A title has at most 200 characters.');
const notes = z.string().max(5000, 'Notes have at most 5000 characters.');

export const createBoardSchema = z.object({
  title,
  description: notes.optional(),
  visibility: z.enum(['private', 'team']).default('team'),
});
export const updateBoardSchema = createBoardSchema.partial().refine((v) => Object.keys(v).length > 0, 'Send at least one field.');

export const COMPARE_BY = ['methods', 'series', 'vintages'] as const;

export const panelSchema = z
  .object({
    title,
    notes: notes.optional(),
    studyIds: z.array(z.number().int().positive()).min(1, 'Choose at least one study.').max(8, 'A panel shows at most 8 studies.'),
    compareBy: z.enum(COMPARE_BY).optional(),
    /** For a comparison across vintages: the vintage numbers to show (of the first study's series). */
    vintages: z.array(z.number().int().positive()).max(12).optional(),
    width: z.union([z.literal(1), z.literal(2)]).default(1),
    height: z.enum(['s', 'm', 'l']).default('m'),
  })
  .refine((v) => v.studyIds.length === 1 || v.compareBy, { message: 'Say what several studies are compared across (methods or series).', path: ['compareBy'] })
  .refine((v) => v.compareBy !== 'vintages' || (v.vintages && v.vintages.length >= 2), { message: 'Choose at least two vintages to compare.', path: ['vintages'] });
export type PanelBody = z.infer<typeof panelSchema>;
export const updatePanelSchema = z.object({
  title: title.optional(),
  notes: notes.optional(),
  studyIds: z.array(z.number().int().positive()).min(1).max(8).optional(),
  compareBy: z.enum(COMPARE_BY).nullable().optional(),
  vintages: z.array(z.number().int().positive()).max(12).nullable().optional(),
  width: z.union([z.literal(1), z.literal(2)]).optional(),
  height: z.enum(['s', 'm', 'l']).optional(),
});
export const reorderSchema = z.object({ panelIds: z.array(z.number().int().positive()).min(1) });

export const EXHIBIT_STATES = ['draft', 'in_review', 'returned', 'approved', 'published', 'withdrawn'] as const;
export type ExhibitState = (typeof EXHIBIT_STATES)[number];

const exhibitText = {
  title,
  subtitle: z.string().trim().max(300, 'A subtitle has at most 300 characters.').optional(),
  notes: notes.optional(),
  units: z.string().trim().max(120, 'Units have at most 120 characters.').optional(),
  sourceLine: z.string().trim().max(300, 'The source line has at most 300 characters.').optional(),
  chartKind: z.enum(['cycle', 'trend']).optional(),
};
export const createExhibitSchema = z
  .object({ studyId: z.number().int().positive().optional(), panelId: z.number().int().positive().optional(), ...exhibitText })
  .refine((v) => (v.studyId === undefined) !== (v.panelId === undefined), { message: 'Draft an exhibit from one study or one panel.', path: ['studyId'] });
export type CreateExhibitBody = z.infer<typeof createExhibitSchema>;
export const updateExhibitSchema = z.object({ ...exhibitText, title: title.optional() }).refine((v) => Object.keys(v).length > 0, 'Send at least one field.');
export const transitionSchema = z.object({
  to: z.enum(EXHIBIT_STATES, { error: `"to" is one of ${EXHIBIT_STATES.join(', ')}.` }),
  comment: z.string().trim().max(5000, 'A comment has at most 5000 characters.').optional(),
});

/** What an exhibit freezes when it is submitted, and renders from afterwards (server and client). */
export interface Snapshot {
  schema: 1;
  kind: 'study' | 'panel';
  chartKind: 'cycle' | 'trend' | 'compare';
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
}

export interface Board {
  id: number;
  title: string;
  description: string | null;
  visibility: 'private' | 'team';
  owner: { id: number; name: string };
  createdAt: string;
  updatedAt: string;
  panelCount?: number;
}

export interface Panel {
  id: number;
  boardId: number;
  position: number;
  width: 1 | 2;
  height: 's' | 'm' | 'l';
  title: string;
  notes: string | null;
  kind: 'study' | 'compare';
  studyIds: number[];
  compareBy: 'methods' | 'series' | 'vintages' | null;
  vintages: number[] | null;
  updatedAt: string;
}
