import { useMemo, useState } from 'react';
import type { ColumnDef } from '@tanstack/react-table';
import { Chart } from '@/components/charts/Chart';
import { revisionBandChart } from '@/components/charts/options';
import { fmt } from '@/components/charts/echarts';
import { DataTable } from '@/components/DataTable';
import { useAnnounce } from '@/components/Announcer';
import { ErrorNote, Field, Progress } from '@/components/ui';
import { runReliability, type ReliabilityResult } from './api';

interface Props {
  seriesId: number;
  code: string;
  transform: 'none' | 'log' | 'log100';
  methods: { method: string; params: Record<string, unknown> }[];
}

type Item = ReliabilityResult['items'][number];
const num = (v: number | null | undefined, d: number) => (v === null || v === undefined ? '—' : fmt(v, d));

const COLUMNS: ColumnDef<Item>[] = [
  { header: 'Method', accessorKey: 'name', cell: (c) => <span title={c.row.original.methodLine}>{c.row.original.name}</span> },
  { header: 'Correlation with final', id: 'correlation', accessorFn: (i) => i.statistics.correlation, cell: (c) => num(c.getValue() as number | null, 2), meta: { numeric: true } },
  { header: 'Noise-to-signal', id: 'noiseToSignal', accessorFn: (i) => i.statistics.noiseToSignal, cell: (c) => num(c.getValue() as number | null, 2), meta: { numeric: true } },
  { header: 'Sign changes (share)', id: 'signChangeShare', accessorFn: (i) => i.statistics.signChangeShare, cell: (c) => num(c.getValue() as number | null, 2), meta: { numeric: true } },
  { header: 'Mean absolute revision', id: 'meanAbsoluteRevision', accessorFn: (i) => i.statistics.meanAbsoluteRevision, cell: (c) => num(c.getValue() as number | null, 3), meta: { numeric: true } },
  { header: 'Periods', id: 'periods', accessorFn: (i) => i.statistics.periods, cell: (c) => String(c.getValue()), meta: { numeric: true } },
];

/** Which methods' gaps held up in real time over the series' vintages, and the band of past revisions. */
export function ReliabilityView({ seriesId, code, transform, methods }: Props) {
  const [progress, setProgress] = useState<{ done: number; total: number } | null>(null);
  const [result, setResult] = useState<ReliabilityResult | null>(null);
  const [error, setError] = useState<unknown>(null);
  const [bandOf, setBandOf] = useState(0);
  const announce = useAnnounce();
  const run = async () => {
    setError(null);
    setProgress({ done: 0, total: methods.length });
    try {
      const r = await runReliability(seriesId, { transform, methods }, (e) => setProgress({ done: e.done, total: e.total }));
      setResult(r);
      setBandOf(0);
      announce(`Reliability table ready: ${r.items.length} methods over ${r.vintages} vintages.`);
    } catch (e) {
      setError(e);
    } finally {
      setProgress(null);
    }
  };
  const item = result?.items[bandOf];
  const option = useMemo(
    () =>
      result && item && item.revisionBand.length
        ? revisionBandChart({ name: `${item.name}, latest vintage`, unit: result.unitOfCycle, periods: item.revisionBand.map((b) => b.period), cycle: item.revisionBand.map((b) => b.value), band: item.revisionBand.map((b) => ({ period: b.period, lower: b.lower, upper: b.upper })) })
        : null,
    [result, item],
  );
  return (
    <div className="space-y-4">
      <p className="max-w-3xl text-sm text-ink-soft">
        Each method is applied to every vintage of {code}. Its <strong>real-time</strong> estimate of a period is the last estimate of the vintage that ends there; the <strong>final</strong> estimate is the
        latest vintage’s (Orphanides and van Norden 2002).
      </p>
      <button className="btn" onClick={run} disabled={!!progress || methods.length === 0}>
        {result ? 'Build the reliability table again' : 'Build the reliability table'}
      </button>
      {progress && <Progress value={progress.total ? progress.done / progress.total : null} label={`Methods done: ${progress.done} of ${progress.total}`} />}
      <ErrorNote error={error} />
      {result && (
        <div className="space-y-4" data-testid="reliability-result">
          <DataTable label={`Reliability of ${result.items.length} methods over ${result.vintages} vintages of ${code}`} testId="reliability-table" data={result.items} columns={COLUMNS} dense />
          {result.items.filter((i) => i.error).map((i) => (
            <p key={i.method} className="text-sm text-alert">
              {i.name}: {i.error!.message}
            </p>
          ))}
          <div className="card space-y-2 p-3">
            <h2 className="font-heading text-sm font-bold">Revision band: how far past end-of-sample estimates were revised</h2>
            <Field label="Method" htmlFor="band-method">
              <select id="band-method" className="field w-auto" value={bandOf} onChange={(e) => setBandOf(Number(e.target.value))}>
                {result.items.map((i, k) => (
                  <option key={i.method} value={k}>
                    {i.name}
                  </option>
                ))}
              </select>
            </Field>
            {option ? <Chart testId="revision-band-chart" label={`Revision band around the latest estimate by ${item!.name}`} option={option} height={280} /> : <p className="text-sm text-ink-soft">Too few vintages for a band.</p>}
          </div>
          <ul className="list-disc pl-5 text-sm text-ink-soft" data-testid="reliability-notes">
            {result.notes.map((n) => (
              <li key={n}>{n}</li>
            ))}
          </ul>
        </div>
      )}
    </div>
  );
}
