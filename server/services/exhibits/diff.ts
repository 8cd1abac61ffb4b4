/** What changed between two revisions (snapshots) of an exhibit: text, study settings and data. */
import { conflict, forbidden, notFound } from '../../lib/errors.js';
import type { PublicUser } from '../../schemas/people.js';
import type { ExhibitDiff, ExhibitDiffAnswer, Snapshot } from '../../schemas/exhibits.js';
import { canSee, exhibitRow, latestRevision, type ExhibitDeps } from './read.js';
import { seesReview } from './views.js';

export function diffSnapshots(a: Snapshot | null, b: Snapshot, numbers: [number | null, number]): ExhibitDiff {
  const text: ExhibitDiff['text'] = [];
  for (const field of ['title', 'subtitle', 'units', 'sourceLine', 'notes'] as const) {
    const before = a ? a.text[field] : null;
    if (!a || before !== b.text[field]) text.push({ field, before, after: b.text[field] });
  }
  // What the printed figure adds: its number and the chronology it shades.
  const printed: [string, string | null, string | null][] = [
    ['number', a?.publication?.number ?? null, b.publication?.number ?? null],
    ['chronology', a?.chronology?.name ?? null, b.chronology?.name ?? null],
  ];
  for (const [field, before, after] of printed) if (before !== after) text.push({ field, before, after });
  const studies: ExhibitDiff['studies'] = [];
  for (const s of b.studies) {
    const old = a?.studies.find((x) => x.id === s.id);
    for (const what of ['method', 'params', 'transform', 'vintage'] as const) {
      if (!old || JSON.stringify(old[what]) !== JSON.stringify(s[what])) studies.push({ id: s.id, what, before: old ? old[what] : null, after: s[what] });
    }
  }
  const data: ExhibitDiff['data'] = [];
  for (const line of b.lines) {
    const old = a?.lines.find((l) => l.label === line.label && l.role === line.role);
    const before = new Map(old ? old.periods.map((p, i) => [p, old.values[i]]) : []);
    let changed = 0;
    let added = 0;
    let max: number | null = null;
    line.periods.forEach((p, i) => {
      if (!before.has(p)) {
        added++;
        return;
      }
      const x = before.get(p);
      const y = line.values[i];
      if (x !== y) {
        changed++;
        if (x !== null && x !== undefined && y !== null) max = Math.max(max ?? 0, Math.abs(y - x));
      }
    });
    data.push({ line: `${line.label}${line.role !== 'cycle' && line.label !== line.role ? ` (${line.role})` : ''}`, changedPeriods: changed, newPeriods: a ? added : 0, maxAbsChange: max });
  }
  return { from: numbers[0], to: numbers[1], text, studies, data };
}

/** What changed between the exhibit's latest revision and the one before it. */
export async function exhibitDiff(deps: ExhibitDeps, user: PublicUser, id: number): Promise<ExhibitDiffAnswer> {
  const row = await exhibitRow(deps.db, id);
  if (!canSee(user, row)) throw notFound('The exhibit');
  // Earlier revisions may have been returned and never published: they are part of the review.
  if (!seesReview(user, row)) throw forbidden('review_only', 'What changed between revisions is part of the review: its author, editors and administrators see it.');
  const current = await latestRevision(deps.db, id);
  if (!current) throw conflict('not_submitted', 'The exhibit has not been submitted yet, so there is no revision to compare.');
  const previous = current.number > 1 ? await latestRevision(deps.db, id, current.number - 1) : null;
  // An update is also compared with the published exhibit it would supersede.
  let published: ExhibitDiffAnswer['published'] = null;
  if (row.update_of) {
    const old = await exhibitRow(deps.db, row.update_of);
    const frozen = await latestRevision(deps.db, old.id);
    if (frozen) published = { exhibitId: old.id, title: old.title, snapshot: frozen.snapshot, diff: diffSnapshots(frozen.snapshot, current.snapshot, [frozen.number, current.number]) };
  }
  return { previous: previous?.snapshot ?? null, current: current.snapshot, diff: diffSnapshots(previous?.snapshot ?? null, current.snapshot, [previous?.number ?? null, current.number]), published };
}
