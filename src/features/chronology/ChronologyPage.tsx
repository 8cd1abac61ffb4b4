/**
 * The reference chronology: the institution's own dated peaks and troughs per economy or area.
 * Everyone signed in reads it; administrators and editors keep it, and may start from the
 * Harding–Pagan dates of a series. Exhibits and studies shade its contractions.
 */
import { useState } from 'react';
import { ACCESS, allows } from '@schemas/access';
import { checkTurns, contractions, type Turn } from '@schemas/chronology';
import { EmptyState, ErrorNote, Field, PageHeader, Spinner } from '@/components/ui';
import { useMe } from '@/features/auth/api';
import { SeriesPicker } from '@/features/catalogue/SeriesPicker';
import { useChronologies, useChronologyMutations, type Chronology } from './api';

export function ChronologyPage() {
  const list = useChronologies();
  const me = useMe();
  const canEdit = allows(ACCESS.chronologyWrite, me.data?.roles);
  const [selected, setSelected] = useState<number | 'new' | null>(null);
  const current = selected === 'new' ? null : (list.data?.find((c) => c.id === selected) ?? list.data?.[0] ?? null);
  return (
    <>
      <PageHeader title="Reference chronology" actions={canEdit && <button className="btn" onClick={() => setSelected('new')}>New chronology</button>}>
        The institution’s dated peaks and troughs. Exhibits and studies can shade its contractions (peak to trough).
      </PageHeader>
      {list.isPending && <Spinner />}
      <ErrorNote error={list.error} />
      {list.data?.length === 0 && selected !== 'new' && <EmptyState title="No chronology yet">{canEdit ? 'Start one, by hand or from the Harding–Pagan dates of a series.' : 'An editor or administrator keeps it.'}</EmptyState>}
      <div className="grid gap-6 lg:grid-cols-[16rem_minmax(0,1fr)]">
        {!!list.data?.length && (
          <nav aria-label="Chronologies" className="space-y-1">
            {list.data.map((c) => (
              <button key={c.id} className={`block w-full rounded px-3 py-2 text-left text-sm ${current?.id === c.id && selected !== 'new' ? 'bg-ink text-paper' : 'hover:bg-paper-deep'}`} aria-current={current?.id === c.id && selected !== 'new'} onClick={() => setSelected(c.id)}>
                <span className="font-semibold">{c.name}</span>
                <span className="block text-xs opacity-80">
                  {c.area} · {c.turns.length} turning points
                </span>
              </button>
            ))}
          </nav>
        )}
        {(selected === 'new' || current) && <Editor key={selected === 'new' ? 'new' : current!.id} chronology={selected === 'new' ? null : current} canEdit={canEdit} onSaved={(id) => setSelected(id)} />}
      </div>
    </>
  );
}

function Editor({ chronology, canEdit, onSaved }: { chronology: Chronology | null; canEdit: boolean; onSaved: (id: number | null) => void }) {
  const m = useChronologyMutations();
  const [name, setName] = useState(chronology?.name ?? '');
  const [area, setArea] = useState(chronology?.area ?? '');
  const [notes, setNotes] = useState(chronology?.notes ?? '');
  const [turns, setTurns] = useState<Turn[]>(chronology?.turns ?? []);
  const [seriesId, setSeriesId] = useState<number | ''>('');
  const [note, setNote] = useState<string | null>(null);
  const problem = checkTurns(turns.filter((t) => t.period));
  const save = () => {
    const body = { name: name.trim(), area: area.trim(), notes, turns: turns.filter((t) => t.period).sort((a, b) => a.period.localeCompare(b.period)) };
    if (chronology) m.update.mutate({ id: chronology.id, ...body }, { onSuccess: (c) => onSaved(c.id) });
    else m.create.mutate(body, { onSuccess: (c) => onSaved(c.id) });
  };
  const start = () =>
    seriesId &&
    m.fromSeries.mutate(
      { seriesId },
      {
        onSuccess: (r) => {
          setTurns(r.turns);
          setNote(`${r.turns.length} Harding–Pagan turning points of ${r.series.code} (vintage ${r.vintage}). ${r.note}`);
        },
      },
    );
  const spans = contractions(turns.filter((t) => t.period));
  return (
    <section className="card min-w-0 space-y-4 p-4" aria-label={chronology ? chronology.name : 'New chronology'}>
      <div className="grid gap-3 sm:grid-cols-2">
        <Field label="Name" htmlFor="chr-name">
          <input id="chr-name" className="field" value={name} disabled={!canEdit} onChange={(e) => setName(e.target.value)} placeholder="e.g. Staff business-cycle chronology" />
        </Field>
        <Field label="Economy or area" htmlFor="chr-area">
          <input id="chr-area" className="field" value={area} disabled={!canEdit} onChange={(e) => setArea(e.target.value)} />
        </Field>
      </div>
      <Field label="Notes" htmlFor="chr-notes">
        <textarea id="chr-notes" rows={2} className="field" value={notes} disabled={!canEdit} onChange={(e) => setNotes(e.target.value)} />
      </Field>
      {canEdit && (
        <div className="flex flex-wrap items-end gap-2 rounded border border-hairline p-3">
          <Field label="Start from the Harding–Pagan dates of a series" htmlFor="chr-series">
            <SeriesPicker id="chr-series" className="min-w-[16rem] max-w-full" value={seriesId || null} needsVintage onChange={(s) => setSeriesId(s ? s.id : '')} />
          </Field>
          <button type="button" className="btn-quiet" disabled={!seriesId || m.fromSeries.isPending} onClick={start}>
            Use its dates
          </button>
          {note && <p className="w-full text-xs text-ink-soft" role="status">{note}</p>}
          <ErrorNote error={m.fromSeries.error} />
        </div>
      )}
      <div className="max-w-full overflow-x-auto">
        <table className="w-full text-sm" data-testid="chronology-turns">
          <caption className="pb-1 text-left text-xs font-semibold text-ink-soft">Turning points ({turns.length}); {spans.length} contractions shaded</caption>
          <thead className="bg-paper-deep/60 text-xs text-ink-soft">
            <tr>
              <th className="px-2 py-1 text-left">Period</th>
              <th className="px-2 py-1 text-left">Turn</th>
              {canEdit && <th className="px-2 py-1 text-left"><span className="sr-only">Remove</span></th>}
            </tr>
          </thead>
          <tbody>
            {turns.map((t, i) => (
              <tr key={i} className="border-t border-hairline">
                <td className="px-2 py-1">
                  {canEdit ? <input className="field num w-32" aria-label={`Period of turning point ${i + 1}`} value={t.period} onChange={(e) => setTurns(turns.map((x, j) => (j === i ? { ...x, period: e.target.value.trim() } : x)))} placeholder="2008-Q2" /> : t.period}
                </td>
                <td className="px-2 py-1">
                  {canEdit ? (
                    <select className="field w-28" aria-label={`Type of turning point ${i + 1}`} value={t.type} onChange={(e) => setTurns(turns.map((x, j) => (j === i ? { ...x, type: e.target.value as Turn['type'] } : x)))}>
                      <option value="peak">peak</option>
                      <option value="trough">trough</option>
                    </select>
                  ) : (
                    t.type
                  )}
                </td>
                {canEdit && (
                  <td className="px-2 py-1">
                    <button type="button" className="btn-quiet px-2 py-0.5" aria-label={`Remove turning point ${i + 1}`} onClick={() => setTurns(turns.filter((_, j) => j !== i))}>
                      Remove
                    </button>
                  </td>
                )}
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      {canEdit && (
        <div className="flex flex-wrap items-center gap-2">
          <button type="button" className="btn-quiet" onClick={() => setTurns([...turns, { period: '', type: turns[turns.length - 1]?.type === 'peak' ? 'trough' : 'peak' }])}>
            Add a turning point
          </button>
          <button type="button" className="btn" disabled={!name.trim() || !area.trim() || !!problem || m.create.isPending || m.update.isPending} onClick={save}>
            {chronology ? 'Save the chronology' : 'Create the chronology'}
          </button>
          {chronology && (
            <button type="button" className="btn-danger" onClick={() => confirm(`Delete “${chronology.name}”? Submitted exhibits keep what they froze.`) && m.remove.mutate(chronology.id, { onSuccess: () => onSaved(null) })}>
              Delete
            </button>
          )}
        </div>
      )}
      {problem && <p className="text-sm text-alert" role="alert">{problem}</p>}
      <ErrorNote error={m.create.error ?? m.update.error ?? m.remove.error} />
    </section>
  );
}
