import { useEffect, useMemo, useState } from 'react';
import { Chart } from '@/components/charts/Chart';
import { revisionBars, vintagesChart } from '@/components/charts/options';
import { fmt, vintageColor } from '@/components/charts/echarts';
import { asLoaded, decimalsOf } from '@schemas/numbers';
import { DataTable } from '@/components/DataTable';
import { ScrollRegion } from '@/components/ScrollRegion';
import { EmptyState, ErrorNote, Spinner } from '@/components/ui';
import { useObservations, useRevisions, useTriangle, useVintages } from './api';

export function RevisionsPanel({ id, unit }: { id: number; unit: string }) {
  const vintages = useVintages(id);
  const numbers = (vintages.data ?? []).map((v) => v.number).sort((a, b) => a - b);
  const [from, setFrom] = useState<number | undefined>();
  const [to, setTo] = useState<number | undefined>();
  useEffect(() => {
    if (numbers.length >= 2 && from === undefined) {
      setFrom(numbers[numbers.length - 2]);
      setTo(numbers[numbers.length - 1]);
    }
  }, [numbers.join(','), from]);
  const rev = useRevisions(id, from, to);
  const a = useObservations(id, from ?? 1, from !== undefined);
  const b = useObservations(id, to ?? 1, to !== undefined);
  const [showAll, setShowAll] = useState(false);
  const [triangle, setTriangle] = useState(false);
  if (vintages.isPending) return <Spinner />;
  if (numbers.length < 2) return <EmptyState title="One vintage so far">Revisions appear once a second release is loaded.</EmptyState>;
  const rows = (rev.data?.items ?? []).filter((r) => showAll || r.status !== 'unchanged').slice().reverse();
  return (
    <div className="space-y-5">
      <div className="flex flex-wrap items-end gap-3">
        <label className="text-sm">
          <span className="label">From vintage</span>
          <select className="field" value={from} onChange={(e) => setFrom(Number(e.target.value))} aria-label="From vintage">
            {numbers.map((n) => (
              <option key={n}>{n}</option>
            ))}
          </select>
        </label>
        <label className="text-sm">
          <span className="label">To vintage</span>
          <select className="field" value={to} onChange={(e) => setTo(Number(e.target.value))} aria-label="To vintage">
            {numbers.map((n) => (
              <option key={n}>{n}</option>
            ))}
          </select>
        </label>
        {rev.data && (
          <p className="text-sm text-ink-soft" data-testid="revision-summary">
            {rev.data.summary.revised} revised, {rev.data.summary.new} new, {rev.data.summary.removed} removed, {rev.data.summary.unchanged} unchanged
            {rev.data.summary.meanAbsoluteRevision !== null && <> · mean absolute revision {fmt(rev.data.summary.meanAbsoluteRevision)} ({unit})</>}
          </p>
        )}
      </div>
      <ErrorNote error={rev.error} />
      {a.data && b.data && rev.data && (
        <div className="grid gap-4 lg:grid-cols-2">
          <div className="card p-3">
            <h2 className="mb-1 font-heading text-sm font-bold">Vintages {from} and {to}</h2>
            <Chart
              testId="revision-levels"
              label={`Vintage ${from} and vintage ${to}`}
              option={vintagesChart({ unit, lines: [{ name: `vintage ${from}`, periods: a.data.periods, values: a.data.values }, { name: `vintage ${to}`, periods: b.data.periods, values: b.data.values }] })}
            />
          </div>
          <div className="card p-3">
            <h2 className="mb-1 font-heading text-sm font-bold">Revision, vintage {to} minus vintage {from}</h2>
            <Chart testId="revision-chart" label="Revisions by period" option={revisionBars({ unit, periods: rev.data.items.map((r) => r.period), revision: rev.data.items.map((r) => r.revision) })} />
          </div>
        </div>
      )}
      <div className="flex items-center gap-4">
        <label className="flex items-center gap-2 text-sm">
          <input type="checkbox" checked={showAll} onChange={(e) => setShowAll(e.target.checked)} /> Show unchanged periods too
        </label>
        <button className="btn-quiet" onClick={() => setTriangle(!triangle)} aria-expanded={triangle}>
          {triangle ? 'Hide' : 'Show'} the revision triangle
        </button>
      </div>
      {triangle && <Triangle id={id} unit={unit} />}
      {rev.data && (
        <DataTable
          dense
          data={rows}
          testId="revision-table"
          empty="No period changed."
          columns={[
            { accessorKey: 'period', header: 'Period' },
            { accessorKey: 'status', header: 'Change' },
            { accessorKey: 'from', header: `Vintage ${from} (${unit})`, meta: { numeric: true }, cell: (c) => asLoaded(c.getValue() as number | null) },
            { accessorKey: 'to', header: `Vintage ${to} (${unit})`, meta: { numeric: true }, cell: (c) => asLoaded(c.getValue() as number | null) },
            { accessorKey: 'revision', header: `Revision (${unit})`, meta: { numeric: true }, cell: (c) => revisionCell(c.row.original) },
            { accessorKey: 'percent', header: 'Revision (%)', meta: { numeric: true }, cell: (c) => num(c.getValue(), 2) },
          ]}
        />
      )}
    </div>
  );
}

const num = (v: unknown, d?: number) => (v === null || v === undefined ? '—' : fmt(v as number, d));

/** A revision with the decimals of the values it compares, so that from + revision = to on screen. */
export function revisionCell(r: { from: number | null; to: number | null; revision: number | null }) {
  if (r.revision === null) return '—';
  return asLoaded(r.revision, Math.max(r.from === null ? 0 : decimalsOf(r.from), r.to === null ? 0 : decimalsOf(r.to)));
}

function Triangle({ id, unit }: { id: number; unit: string }) {
  const tri = useTriangle(id, true);
  const rows = useMemo(() => (tri.data ? tri.data.periods.map((p, i) => ({ period: p, values: tri.data!.values[i] })).reverse() : []), [tri.data]);
  if (tri.isPending) return <Spinner />;
  if (tri.error) return <ErrorNote error={tri.error} />;
  const n = tri.data.vintages.length;
  return (
    <ScrollRegion label="Revision triangle" className="card max-h-[28rem] overflow-auto" testId="revision-triangle">
      <table className="w-full border-collapse text-sm">
        <caption className="px-3 py-2 text-left text-xs text-ink-soft">Periods down, vintages across ({unit}); a value differs from the vintage before it where it is marked.</caption>
        <thead className="sticky top-0 bg-paper-deep">
          <tr>
            <th scope="col" className="px-3 py-1 text-left text-xs font-semibold uppercase text-ink-soft">Period</th>
            {tri.data.vintages.map((v, i) => (
              <th key={v.number} scope="col" className="border-b-4 px-3 py-1 text-right text-xs font-semibold text-ink" style={{ borderBottomColor: vintageColor(i, n) }}>
                v{v.number}
                <span className="block font-normal text-ink-faint">{v.asOf}</span>
              </th>
            ))}
          </tr>
        </thead>
        <tbody>
          {rows.map((r) => (
            <tr key={r.period} className="border-t border-hairline">
              <th scope="row" className="px-3 py-1 text-left font-normal">{r.period}</th>
              {r.values.map((v, i) => {
                const prev = i > 0 ? r.values[i - 1] : null;
                const changed = i > 0 && prev !== null && v !== null && prev !== v;
                return (
                  <td key={i} className={`num px-3 py-1 ${changed ? 'bg-above-light' : ''}`}>
                    {asLoaded(v)}
                  </td>
                );
              })}
            </tr>
          ))}
        </tbody>
      </table>
    </ScrollRegion>
  );
}
