import { zodResolver } from '@hookform/resolvers/zod';
import { useRef, useState } from 'react';
import { useForm } from 'react-hook-form';
import { Link, useNavigate, useParams } from 'react-router-dom';
import { z } from 'zod';
import { ACCESS, allows } from '@schemas/access';
import { useAnnounce } from '@/components/Announcer';
import { ErrorNote, Field, formatDate, PageHeader, Spinner } from '@/components/ui';
import { useMe } from '@/features/auth/api';
import { MOVE_LABELS, STATE_LABELS, useExhibit, useExhibitMutations, type Exhibit, type ExhibitState } from './api';
import { Lineage, PrepareUpdate } from './Lineage';
import { ReviewPanel } from './ReviewPanel';
import { ExhibitDownloads, ExhibitFigure } from './ExhibitFigure';
import { useChronologies } from '@/features/chronology/api';

/** What a study's exhibit draws, for the draft and text forms' Chart field. */
export function ChartKindOptions() {
  return (
    <>
      <option value="cycle">the cycle (gap)</option>
      <option value="trend">the series and its trend</option>
    </>
  );
}

export function StateBadge({ state }: { state: ExhibitState }) {
  const tone: Record<ExhibitState, string> = {
    draft: 'border-hairline-strong text-ink-soft',
    in_review: 'border-above text-above',
    returned: 'border-alert text-alert',
    approved: 'border-trend text-trend',
    published: 'border-ok bg-ok-light text-ok',
    withdrawn: 'border-ink-faint text-ink-faint line-through',
    superseded: 'border-ink-faint text-ink-soft',
  };
  return (
    <span className={`tag ${tone[state]}`} data-testid="exhibit-state">
      {STATE_LABELS[state]}
    </span>
  );
}

const textSchema = z.object({
  title: z.string().trim().min(1, 'Give it a title.').max(200),
  subtitle: z.string().max(300).optional(),
  units: z.string().max(120).optional(),
  sourceLine: z.string().max(300).optional(),
  notes: z.string().max(5000).optional(),
  chartKind: z.enum(['cycle', 'trend']),
  number: z.string().max(40).optional(),
  chronologyId: z.string().optional(),
  revisionBand: z.boolean(),
});

function TextForm({ exhibit }: { exhibit: Exhibit }) {
  const { update } = useExhibitMutations(exhibit.id);
  const chronologies = useChronologies();
  const values = (e: Exhibit) => ({ title: e.title, subtitle: e.subtitle ?? '', units: e.units ?? '', sourceLine: e.sourceLine ?? '', notes: e.notes ?? '', chartKind: e.chartKind, number: e.number ?? '', chronologyId: e.chronologyId ? String(e.chronologyId) : '', revisionBand: e.revisionBand });
  // The band of past revisions goes on the cycle chart of an exhibit from one study of one method.
  const bandFits = !!exhibit.studyId && exhibit.live?.chartKind !== 'range';
  const form = useForm<z.infer<typeof textSchema>>({ resolver: zodResolver(textSchema), defaultValues: values(exhibit) });
  return (
    <form
      noValidate
      className="card space-y-3 p-4"
      aria-label="Exhibit text"
      onSubmit={form.handleSubmit((v) => update.mutate({ ...v, chronologyId: v.chronologyId ? Number(v.chronologyId) : null }, { onSuccess: (e) => form.reset(values(e)) }))}
    >
      <h2 className="font-heading text-base font-bold">Text of the exhibit</h2>
      <Field label="Title" htmlFor="ex-title" error={form.formState.errors.title?.message}>
        <input id="ex-title" className="field" {...form.register('title')} />
      </Field>
      <Field label="Subtitle" htmlFor="ex-subtitle">
        <input id="ex-subtitle" className="field" {...form.register('subtitle')} />
      </Field>
      <div className="grid grid-cols-2 gap-2">
        <Field label="Units" htmlFor="ex-units">
          <input id="ex-units" className="field" {...form.register('units')} />
        </Field>
        {exhibit.live?.chartKind === 'range' || exhibit.live?.chartKind === 'compare' ? (
          <div>
            <span className="label">Chart</span>
            <p className="text-sm">{exhibit.live.chartKind === 'range' ? 'the range across methods, with their median' : 'the cycles compared'}</p>
          </div>
        ) : (
          <Field label="Chart" htmlFor="ex-kind">
            <select id="ex-kind" className="field" {...form.register('chartKind')}>
              <ChartKindOptions />
            </select>
          </Field>
        )}
      </div>
      <div className="grid grid-cols-2 gap-2">
        <Field label="Number" htmlFor="ex-number">
          <input id="ex-number" className="field" placeholder="Chart 3" {...form.register('number')} />
        </Field>
        <Field label="Shade contractions" htmlFor="ex-chronology">
          <select id="ex-chronology" className="field" {...form.register('chronologyId')}>
            <option value="">none</option>
            {chronologies.data?.map((c) => (
              <option key={c.id} value={String(c.id)}>
                {c.name} ({c.area})
              </option>
            ))}
          </select>
        </Field>
      </div>
      {bandFits && (
        <div className="text-sm">
          <label className="flex items-center gap-2">
            <input type="checkbox" {...form.register('revisionBand')} /> Draw the band of past revisions at the end of the cycle
          </label>
          <p className="text-xs text-ink-faint">How far earlier end-of-sample estimates were revised at each distance from the end, from the series’ vintages: a record of past revisions, not a forecast. Its note is printed under the chart. Cycle chart only.</p>
        </div>
      )}
      <Field label="Sources" htmlFor="ex-source">
        <input id="ex-source" className="field" {...form.register('sourceLine')} />
      </Field>
      <Field label="Notes" htmlFor="ex-notes">
        <textarea id="ex-notes" rows={3} className="field" {...form.register('notes')} />
      </Field>
      <p className="text-xs text-ink-faint">The source line is printed in the institution’s wording; the method line and the vintage stamp are written by Tidegauge from the data.</p>
      <ErrorNote error={update.error} />
      <button className="btn" disabled={update.isPending || !form.formState.isDirty}>
        {form.formState.isDirty ? 'Save the text' : 'Text saved'}
      </button>
    </form>
  );
}

function Moves({ exhibit, onMoved }: { exhibit: Exhibit; onMoved: (e: Exhibit) => void }) {
  const { move } = useExhibitMutations(exhibit.id);
  const [comment, setComment] = useState('');
  if (!exhibit.moves.length) return null;
  const needsComment = exhibit.moves.some((m) => m.comment === 'required');
  return (
    <section className="card space-y-3 p-4" aria-labelledby="moves-heading">
      <h2 id="moves-heading" className="font-heading text-base font-bold">Next step</h2>
      {(needsComment || exhibit.moves.some((m) => m.to !== 'in_review')) && (
        <Field label={exhibit.moves.some((m) => m.to === 'withdrawn') ? 'Reason (required to withdraw)' : 'Comment (required to return)'} htmlFor="move-comment">
          <textarea id="move-comment" rows={3} className="field" value={comment} onChange={(e) => setComment(e.target.value)} />
        </Field>
      )}
      <div className="flex flex-wrap gap-2">
        {exhibit.moves.map((m) => (
          <button
            key={m.to}
            className={m.to === 'returned' || m.to === 'withdrawn' ? 'btn-danger' : 'btn'}
            disabled={move.isPending || (m.comment === 'required' && !comment.trim())}
            onClick={() =>
              move.mutate(
                { to: m.to, comment: comment.trim() || undefined },
                {
                  onSuccess: (next) => {
                    setComment('');
                    onMoved(next);
                  },
                },
              )
            }
          >
            {MOVE_LABELS[m.to]}
          </button>
        ))}
      </div>
      {exhibit.moves.some((m) => m.to === 'in_review') && <p className="text-xs text-ink-faint">Submitting freezes the data, vintages, method and parameters as they are now.</p>}
      {exhibit.moves.some((m) => m.to === 'approved' || m.to === 'published') && (
        <p className="text-xs text-ink-faint">Check the exhibit against your institution’s own publication and methodology rules before approving or publishing it.</p>
      )}
      <ErrorNote error={move.error} />
    </section>
  );
}

function History({ exhibit }: { exhibit: Exhibit }) {
  return (
    <ol className="space-y-2" aria-label="History" data-testid="exhibit-history">
      {exhibit.events.map((e) => (
        <li key={e.id} className="border-l-2 border-hairline-strong pl-3 text-sm">
          <span className="font-semibold">{e.actor?.name ?? 'someone'}</span> {e.from ? <>moved it to <strong>{STATE_LABELS[e.to]}</strong></> : 'drafted it'}
          {e.revision ? <span className="text-ink-faint"> (revision {e.revision})</span> : null}
          <span className="block text-xs text-ink-faint">{formatDate(e.at, true)}</span>
          {e.comment && <blockquote className="mt-1 whitespace-pre-wrap rounded bg-paper-deep px-2 py-1 text-sm">{e.comment}</blockquote>}
        </li>
      ))}
    </ol>
  );
}

/** What screen readers hear after a review move. */
function moveAnnouncement(e: Exhibit): string {
  const more: Partial<Record<ExhibitState, string>> = {
    in_review: ` (revision ${e.revision}): its data, vintages, method and parameters are frozen`,
    returned: ' to the author',
    approved: ': it can now be published',
  };
  return `“${e.title}” is now ${STATE_LABELS[e.status]}${more[e.status] ?? ''}.`;
}

export function ExhibitPage() {
  const id = Number(useParams().id);
  const ex = useExhibit(id);
  const me = useMe();
  const { remove } = useExhibitMutations(id);
  // The text form's chronology choice needs the list before it shows the saved choice.
  const chronologies = useChronologies();
  const navigate = useNavigate();
  const announce = useAnnounce();
  const stateRef = useRef<HTMLSpanElement>(null);
  if (ex.isPending) return <Spinner />;
  if (ex.error) return <ErrorNote error={ex.error} />;
  const e = ex.data;
  const shown = e.editable ? e.live : (e.snapshot ?? e.live);
  const reviewing = e.status === 'in_review' && e.moves.some((m) => m.to === 'approved');
  const lastReturn = [...e.events].reverse().find((ev) => ev.to === 'returned');
  return (
    <>
      <PageHeader
        kicker={<Link to="/exhibits" className="hover:underline">Exhibits</Link>}
        title={e.title}
        actions={
          e.status === 'draft' && e.editable ? (
            <button className="btn-danger" onClick={() => confirm('Delete this draft?') && remove.mutate(undefined, { onSuccess: () => navigate('/exhibits') })}>
              Delete the draft
            </button>
          ) : (
            <PrepareUpdate exhibit={e} />
          )
        }
      >
        <span className="flex flex-wrap items-center gap-2">
          <span ref={stateRef} tabIndex={-1} data-testid="exhibit-state-line" className="rounded">
            <span className="sr-only">State: </span>
            <StateBadge state={e.status} />
          </span>{' '}
          by {e.author.name} · revision {e.revision}
          {e.studyId && allows(ACCESS.studiesRead, me.data?.roles) && (
            <Link to={`/studies/${e.studyId}`} className="text-trend underline">
              study
            </Link>
          )}
        </span>
      </PageHeader>
      {e.status === 'withdrawn' && (
        <p role="alert" className="mb-4 rounded border border-alert bg-alert-light px-3 py-2 text-sm text-alert">
          Withdrawn: {[...e.events].reverse().find((ev) => ev.to === 'withdrawn')?.comment}
        </p>
      )}
      <Lineage exhibit={e} />
      {e.status === 'returned' && lastReturn?.comment && e.editable && (
        <p className="mb-4 rounded border border-alert/40 bg-alert-light px-3 py-2 text-sm">
          Returned by {lastReturn.actor?.name}: “{lastReturn.comment}”
        </p>
      )}
      <div className="grid gap-6 xl:grid-cols-[1fr_22rem]">
        <div className="min-w-0 space-y-4">
          {shown ? <ExhibitFigure snapshot={shown} draft={!e.snapshot || e.editable} /> : <ErrorNote error={new Error('The study or panel this exhibit came from is gone.')} />}
          {shown && <ExhibitDownloads snapshot={shown} dataUrl={`/exhibits/${e.id}/data`} pdfUrl={`/exhibits/${e.id}/pdf`} name={`exhibit-${e.id}-r${e.revision}`} />}
          {e.publicUrl && (
            <p className="text-sm">
              Public link: <a className="text-trend underline" href={e.publicUrl}>{e.publicUrl}</a>
            </p>
          )}
          {reviewing && <ReviewPanel exhibit={e} />}
        </div>
        <aside className="space-y-4">
          <Moves
            exhibit={e}
            onMoved={(next) => {
              // Focus goes to the new state (the button pressed may be gone) and the live region says it.
              stateRef.current?.focus();
              announce(moveAnnouncement(next));
            }}
          />
          {e.editable && (chronologies.isPending ? <Spinner /> : <TextForm exhibit={e} />)}
          <div className="card p-4">
            <h2 className="mb-2 font-heading text-base font-bold">History</h2>
            <History exhibit={e} />
          </div>
        </aside>
      </div>
    </>
  );
}
