/**
 * What each reader of an exhibit is shown. The review — return comments, who approved, earlier
 * revisions and what changed between them — is for the author, editors and administrators.
 * Everyone else sees the exhibit and its publication record (who published or withdrew it, when,
 * and the reason for a withdrawal). A public link shows only what the published figure shows: no
 * author, study, internal titles, notes or checksums.
 */
import type { Exhibit, ExhibitEvent, PublicExhibit, Snapshot } from '../../schemas/exhibits.js';
import type { PublicUser } from '../../schemas/people.js';

/** Whether `user` sees the review of the exhibit in `row`: its author, editors and administrators. */
export function seesReview(user: PublicUser, row: { author_id: number }): boolean {
  return row.author_id === user.id || user.roles.includes('editor') || user.roles.includes('admin');
}

/** The events that make the publication record; of their comments, only a withdrawal's reason is public. */
const PUBLICATION = new Set<string>(['published', 'withdrawn', 'superseded']);

export function publicationRecord(events: ExhibitEvent[]): ExhibitEvent[] {
  return events.filter((e) => PUBLICATION.has(e.to)).map((e) => ({ ...e, comment: e.to === 'withdrawn' ? e.comment : null }));
}

/** An exhibit as a reader (not its author, an editor or an administrator) sees it: no review, no study's internal title. */
export function readerView(exhibit: Exhibit): Exhibit {
  const snapshot = exhibit.snapshot && { ...exhibit.snapshot, studies: exhibit.snapshot.studies.map((s) => ({ ...s, title: '' })) };
  return { ...exhibit, snapshot, events: publicationRecord(exhibit.events), moves: [], live: null, updatesInProgress: [] };
}

/** The figure's content only: no series or study records (ids, internal titles, checksums) and no notes. */
export function publicSnapshot(s: Snapshot): Snapshot {
  return { ...s, text: { ...s.text, notes: null }, series: [], studies: [] };
}

/** A published exhibit as its public link shows it. */
export function publicCopy(row: { public_slug: string; chart_kind: string; published_at: Date | string | null; status: string }, snapshot: Snapshot, successorSlug: string | null = null): PublicExhibit {
  const s = publicSnapshot(snapshot);
  return {
    slug: row.public_slug,
    title: s.text.title,
    subtitle: s.text.subtitle,
    units: s.text.units,
    sourceLine: s.text.sourceLine,
    chartKind: row.chart_kind === 'trend' ? 'trend' : 'cycle',
    status: row.status === 'superseded' ? 'superseded' : 'published',
    successorSlug,
    publishedAt: row.published_at ? new Date(row.published_at).toISOString() : null,
    snapshot: s,
  };
}
