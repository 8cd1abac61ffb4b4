/** Release alerts: a person's setting (Profile page) and what one alert says, shared with the client. */
import { z } from 'zod';

export const alertSettingsSchema = z.object({
  releaseAlerts: z.boolean({ error: '"releaseAlerts" is true or false.' }),
});
export type AlertSettings = z.infer<typeof alertSettingsSchema>;

/** Where vintages came from: a load of files, a history load, a feed run. */
export type LandedSource = 'load' | 'history' | 'feed';

/** How one study's gap moved with a release. */
export interface StudyMove {
  studyId: number;
  title: string;
  methodLine: string;
  unitOfCycle: string;
  seriesCode: string;
  /** Why the person hears of it: their study follows "latest", or a board or exhibit of theirs shows it. */
  because: ('study' | 'board' | 'exhibit')[];
  before: { vintage: number; period: string | null; gap: number | null };
  after: { vintage: number; period: string | null; gap: number | null };
  /** The largest absolute change of the gap over the last two years of the new sample, on periods both vintages estimate. */
  largestRevision: { period: string; before: number; after: number; change: number } | null;
}
