/** Boards and their panels: the bodies of the Boards routes and what they answer (shared with the client). */
import { z } from 'zod';
import type { Study, StudyResult } from './studies.js';
import type { RangeResult } from './analyses.js';

/** A title and notes, as boards, panels and exhibits take them. */
export const titleSchema = z.string({ error: 'Give it a title.' }).trim().min(1, 'Give it a title.').max(200, 'A title has at most 200 characters.');
export const notesSchema = z.string().max(5000, 'Notes have at most 5000 characters.');
const title = titleSchema;
const notes = notesSchema;

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

/** What a panel shows, computed from the current data, with the vintages it uses. */
export interface PanelData {
  panelId: number;
  kind: 'study' | 'compare';
  compareBy: Panel['compareBy'];
  lines: { label: string; studyId: number; periods: string[]; values: (number | null)[]; vintage: number; methodLine: string }[];
  /** The single study's full result (kind "study"). */
  result?: StudyResult;
  /** A range study's range across its methods (a panel of one range study; `lines` are its methods' cycles). */
  range?: RangeResult;
  unit: string;
  /** Periods at the end that will be revised (the longest of the lines' two-sided estimates), shaded. */
  endOfSamplePeriods: number;
  cautions: string[];
  methodLines: string[];
  vintageStamps: string[];
  series: { id: number; code: string; title: string; unit: string; source: string }[];
  studies: Study[];
  /** For studies that follow "latest": the newest vintage and when it was loaded. */
  freshness: { studyId: number; code: string; vintage: number; asOf: string; loadedAt: string; newSincePanel: boolean }[];
}
