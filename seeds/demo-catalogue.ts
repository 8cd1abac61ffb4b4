/** Series and vintages of the demo workspace, loaded from datasets/demo/ the way a steward would. */
import fs from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import type { Db } from '../server/db.js';
import { loadFile } from '../server/services/catalogue/loads.js';
import { createSeries } from '../server/services/catalogue/series.js';
import { loadHistory } from '../server/services/catalogue/history.js';

const dir = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..', 'datasets', 'demo');

interface Manifest {
  series: {
    code: string;
    title: string;
    frequency: 'A' | 'Q' | 'M';
    unit: string;
    seasonalAdjustment: 'sa' | 'nsa' | 'sca';
    source: string;
    notes: string;
    vintages: { number: number; asOf: string; note: string; file: string }[];
  }[];
}

export async function seedDemoCatalogue(db: Db, people: Record<string, number>) {
  const manifest = JSON.parse(fs.readFileSync(path.join(dir, 'manifest.json'), 'utf8')) as Manifest;
  const steward = people['steward@demo.test'];
  for (const s of manifest.series) {
    const series = await createSeries(db, steward, {
      code: s.code,
      title: s.title,
      frequency: s.frequency,
      unit: s.unit,
      seasonalAdjustment: s.seasonalAdjustment,
      source: s.source,
      notes: s.notes,
    });
    for (const v of s.vintages) {
      const buffer = fs.readFileSync(path.join(dir, v.file));
      await loadFile(db, { file: { buffer, filename: v.file }, seriesId: series.id, dryRun: false, fields: { note: v.note, asOf: v.asOf }, actor: { id: steward } });
    }
  }
  // The release histories (invented): every release of a series as one history load.
  const histories = JSON.parse(fs.readFileSync(path.join(dir, 'histories.json'), 'utf8')) as { histories: (Omit<Manifest['series'][number], 'vintages'> & { file: string })[] };
  for (const h of histories.histories) {
    const series = await createSeries(db, steward, { code: h.code, title: h.title, frequency: h.frequency, unit: h.unit, seasonalAdjustment: h.seasonalAdjustment, source: h.source, notes: h.notes });
    const buffer = fs.readFileSync(path.join(dir, h.file));
    await loadHistory(db, { seriesId: series.id, file: { buffer, filename: h.file }, fields: {}, dryRun: false, actor: { id: steward } });
  }
}
