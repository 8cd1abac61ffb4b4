import { useMemo, useState } from 'react';
import { Link, useParams } from 'react-router-dom';
import { RANGE_CAUTION } from '@schemas/cautions';
import { Chart } from '@/components/charts/Chart';
import { compareChart, cycleChart, rangeChart, vintagesChart } from '@/components/charts/options';
import { EmptyState, ErrorNote, formatDate, PageHeader, Spinner } from '@/components/ui';
import { useMe } from '@/features/auth/api';
import { useVintages } from '@/features/catalogue/api';
import { useStudies } from '@/features/studies/api';
import { useBoard, useBoardMutations, usePanelData, type Panel } from './api';
import { API } from '@/lib/api';
import { ACCESS, allows } from '@schemas/access';

const HEIGHTS = { s: 200, m: 290, l: 420 } as const;

export function BoardPage() {
  const id = Number(useParams().id);
  const board = useBoard(id);
  const me = useMe();
  const m = useBoardMutations(id);
  const [adding, setAdding] = useState(false);
  if (board.isPending) return <Spinner />;
  if (board.error) return <ErrorNote error={board.error} />;
  const b = board.data;
  const owner = b.owner.id === me.data?.id && allows(ACCESS.boardsWrite, me.data?.roles);
  const move = (panelId: number, delta: number) => {
    const ids = b.panels.map((p) => p.id);
    const i = ids.indexOf(panelId);
    const j = i + delta;
    if (j < 0 || j >= ids.length) return;
    [ids[i], ids[j]] = [ids[j], ids[i]];
    m.reorder.mutate(ids);
  };
  return (
    <>
      <PageHeader
        kicker={<Link to="/boards" className="hover:underline">Boards</Link>}
        title={b.title}
        actions={
          <>
            <a className="btn-quiet" href={`${API}/boards/${id}/pack.pdf`} download title="One PDF of the board’s published exhibits, numbered in order">
              Publication pack (PDF)
            </a>
            <a className="btn-quiet" href={`${API}/boards/${id}/pack.zip`} download title="The data files of the board’s published exhibits">
              Data files (ZIP)
            </a>
            {owner && (
              <button className="btn" onClick={() => setAdding(!adding)} aria-expanded={adding}>
                {adding ? 'Close' : 'Add a panel'}
              </button>
            )}
          </>
        }
      >
        Composed by {b.owner.name} · {b.visibility === 'team' ? 'shared with the team' : 'private'}
        {b.description && <span className="block">{b.description}</span>}
      </PageHeader>
      <ErrorNote error={m.reorder.error ?? m.updatePanel.error ?? m.removePanel.error} />
      {adding && <PanelForm boardId={id} onDone={() => setAdding(false)} />}
      {b.panels.length === 0 && !adding && <EmptyState title="No panels yet">{owner ? 'Add a panel: one study, or a comparison.' : 'The owner has not added panels yet.'}</EmptyState>}
      <div className="grid gap-4 md:grid-cols-2" data-testid="board-grid">
        {b.panels.map((p, i) => (
          <PanelCard
            key={p.id}
            boardId={id}
            panel={p}
            owner={owner}
            canDraft={allows(ACCESS.exhibitsDraft, me.data?.roles)}
            first={i === 0}
            last={i === b.panels.length - 1}
            onMove={(d) => move(p.id, d)}
            onResize={(change) => m.updatePanel.mutate({ id: p.id, ...change })}
            onRemove={() => confirm(`Remove the panel “${p.title}”?`) && m.removePanel.mutate(p.id)}
          />
        ))}
      </div>
    </>
  );
}

function PanelCard({
  boardId,
  panel,
  owner,
  canDraft,
  first,
  last,
  onMove,
  onResize,
  onRemove,
}: {
  boardId: number;
  panel: Panel;
  owner: boolean;
  canDraft: boolean;
  first: boolean;
  last: boolean;
  onMove: (delta: number) => void;
  onResize: (change: Partial<Pick<Panel, 'width' | 'height'>>) => void;
  onRemove: () => void;
}) {
  const data = usePanelData(boardId, panel);
  const option = useMemo(() => {
    const d = data.data;
    if (!d) return null;
    if (d.range) {
      const r = d.range;
      return rangeChart({ periods: r.periods, unit: r.unitOfCycle, median: r.median, min: r.min, max: r.max, items: r.items.map((it) => ({ name: it.name, values: it.cycle })) });
    }
    if (d.kind === 'study' && d.result) {
      const r = d.result;
      return cycleChart({ periods: r.periods, cycle: r.cycle, unit: r.unitOfCycle, turningPoints: r.turningPoints, shadeLast: r.endOfSamplePeriods });
    }
    const lines = d.lines.map((l) => ({ name: l.label, periods: l.periods, values: l.values }));
    // Vintages keep their violet ramp, oldest lightest and the newest labelled; comparisons shade the end of sample too.
    return d.compareBy === 'vintages' ? vintagesChart({ unit: d.unit, lines, shadeLast: d.endOfSamplePeriods }) : compareChart({ zeroLine: true, unit: d.unit, lines, shadeLast: d.endOfSamplePeriods });
  }, [data.data]);
  return (
    <article className={`card flex min-w-0 flex-col p-3 ${panel.width === 2 ? 'md:col-span-2' : ''}`} data-testid="board-panel" aria-label={panel.title}>
      <header className="flex items-start justify-between gap-2">
        <div>
          <h2 className="font-heading text-base font-bold">{panel.title}</h2>
          {panel.notes && <p className="text-sm text-ink-soft">{panel.notes}</p>}
        </div>
        {owner && (
          <div className="flex shrink-0 items-center gap-1 text-xs">
            <button className="btn-quiet px-2 py-0.5" disabled={first} onClick={() => onMove(-1)} aria-label={`Move “${panel.title}” earlier`} title="Move earlier">
              <span aria-hidden>↑</span>
            </button>
            <button className="btn-quiet px-2 py-0.5" disabled={last} onClick={() => onMove(1)} aria-label={`Move “${panel.title}” later`} title="Move later">
              <span aria-hidden>↓</span>
            </button>
            <button
              className="btn-quiet px-2 py-0.5"
              onClick={() => onResize({ width: panel.width === 2 ? 1 : 2 })}
              aria-label={panel.width === 2 ? `Make “${panel.title}” half width` : `Make “${panel.title}” full width`}
              title={panel.width === 2 ? 'Half width' : 'Full width'}
            >
              <span aria-hidden>{panel.width === 2 ? '½' : '↔'}</span>
            </button>
            <select className="field w-auto px-1 py-0.5 text-xs" value={panel.height} onChange={(e) => onResize({ height: e.target.value as Panel['height'] })} aria-label={`Height of “${panel.title}”`}>
              <option value="s">short</option>
              <option value="m">medium</option>
              <option value="l">tall</option>
            </select>
            <button className="btn-danger px-2 py-0.5" onClick={onRemove} aria-label={`Remove “${panel.title}”`} title="Remove">
              <span aria-hidden>✕</span>
            </button>
          </div>
        )}
      </header>
      {data.isPending && <Spinner />}
      <ErrorNote error={data.error} />
      {option && <Chart option={option} label={panel.title} height={HEIGHTS[panel.height]} testId="panel-chart" />}
      {data.data && (
        <footer className="mt-1 space-y-0.5 text-xs text-ink-soft">
          {data.data.freshness.filter((f, i, all) => all.findIndex((g) => g.code === f.code) === i).map((f) => (
            <p key={f.studyId} className={f.newSincePanel ? 'font-semibold text-above' : ''} data-testid="panel-freshness">
              {f.newSincePanel && 'New: '}
              {f.code}: vintage {f.vintage} loaded on {formatDate(f.loadedAt)} (data as of {f.asOf})
            </p>
          ))}
          <p>{data.data.methodLines.join(' · ')}</p>
          {data.data.endOfSamplePeriods > 0 && <p className="text-alert" data-testid="panel-caution">{data.data.cautions[0]}</p>}
          {data.data.range && <p className="text-alert" data-testid="panel-caution">{RANGE_CAUTION}</p>}
          {panel.compareBy === 'vintages' || !data.data.freshness.length ? <p>{data.data.vintageStamps.join(' · ')}</p> : null}
          {canDraft && (
            <Link className="text-trend underline" to={`/exhibits/new?panelId=${panel.id}&title=${encodeURIComponent(panel.title)}`}>
              Draft an exhibit from this panel
            </Link>
          )}
        </footer>
      )}
    </article>
  );
}

function PanelForm({ boardId, onDone }: { boardId: number; onDone: () => void }) {
  const studies = useStudies({});
  const { addPanel } = useBoardMutations(boardId);
  const [title, setTitle] = useState('');
  const [notes, setNotes] = useState('');
  const [ids, setIds] = useState<number[]>([]);
  const [compareBy, setCompareBy] = useState<'methods' | 'series' | 'vintages'>('methods');
  const [vintages, setVintages] = useState<number[]>([]);
  const [width, setWidth] = useState<1 | 2>(1);
  const first = studies.data?.find((s) => s.id === ids[0]);
  const v = useVintages(first?.seriesId);
  const acrossVintages = ids.length === 1 && compareBy === 'vintages';
  const submit = () =>
    addPanel.mutate(
      {
        title: title || first?.title || 'Panel',
        notes: notes || undefined,
        studyIds: ids,
        compareBy: ids.length > 1 || acrossVintages ? compareBy : undefined,
        vintages: acrossVintages ? vintages : undefined,
        width,
      },
      { onSuccess: onDone },
    );
  return (
    <section className="card mb-4 space-y-3 p-4" aria-label="Add a panel">
      <div className="grid gap-3 md:grid-cols-2">
        <label>
          <span className="label">Panel title</span>
          <input className="field" value={title} onChange={(e) => setTitle(e.target.value)} aria-label="Panel title" />
        </label>
        <label>
          <span className="label">Notes</span>
          <input className="field" value={notes} onChange={(e) => setNotes(e.target.value)} aria-label="Panel notes" />
        </label>
      </div>
      <fieldset>
        <legend className="label">Studies to show (one, or several to compare)</legend>
        {studies.isPending && <Spinner />}
        <div className="flex max-h-48 flex-wrap gap-2 overflow-y-auto">
          {studies.data?.map((s) => (
            <label key={s.id} className={`tag cursor-pointer gap-1 ${ids.includes(s.id) ? 'border-trend bg-trend-light text-ink' : ''}`}>
              <input type="checkbox" className="sr-only" checked={ids.includes(s.id)} onChange={() => setIds(ids.includes(s.id) ? ids.filter((x) => x !== s.id) : [...ids, s.id])} />
              {s.title}
            </label>
          ))}
        </div>
        {studies.data?.length === 0 && <p className="text-sm text-ink-soft">Save a study first.</p>}
      </fieldset>
      {ids.length >= 1 && (
        <div className="flex flex-wrap items-center gap-4 text-sm">
          <span className="label mb-0">Compare</span>
          {ids.length > 1 ? (
            <>
              <label className="flex items-center gap-1">
                <input type="radio" name="panel-compare-by" checked={compareBy === 'methods'} onChange={() => setCompareBy('methods')} /> methods
              </label>
              <label className="flex items-center gap-1">
                <input type="radio" name="panel-compare-by" checked={compareBy === 'series'} onChange={() => setCompareBy('series')} /> series
              </label>
            </>
          ) : (
            <>
              <label className="flex items-center gap-1">
                <input type="radio" name="panel-compare-by" checked={compareBy !== 'vintages'} onChange={() => setCompareBy('methods')} /> nothing: one study
              </label>
              <label className="flex items-center gap-1">
                <input type="radio" name="panel-compare-by" checked={compareBy === 'vintages'} onChange={() => setCompareBy('vintages')} /> its vintages
              </label>
            </>
          )}
          <label className="flex items-center gap-1">
            <input type="checkbox" checked={width === 2} onChange={(e) => setWidth(e.target.checked ? 2 : 1)} /> full width
          </label>
        </div>
      )}
      {acrossVintages && (
        <div className="flex flex-wrap gap-2">
          {v.data?.map((x) => (
            <label key={x.number} className={`tag cursor-pointer gap-1 ${vintages.includes(x.number) ? 'border-trend bg-trend-light text-ink' : ''}`}>
              <input type="checkbox" className="sr-only" checked={vintages.includes(x.number)} onChange={() => setVintages(vintages.includes(x.number) ? vintages.filter((n) => n !== x.number) : [...vintages, x.number].sort((a, b) => a - b))} />
              vintage {x.number} ({x.asOf})
            </label>
          ))}
        </div>
      )}
      <ErrorNote error={addPanel.error} />
      <button className="btn" disabled={!ids.length || addPanel.isPending} onClick={submit}>
        Add the panel
      </button>
    </section>
  );
}
