import { useState } from 'react';
import { Chart } from '@/components/charts/Chart';
import { vintagesChart } from '@/components/charts/options';
import { fmt } from '@/components/charts/echarts';
import { asLoaded } from '@schemas/numbers';
import { revisionCell } from './RevisionsPanel';
import { DataTable, hiddenHeader } from '@/components/DataTable';
import { ErrorNote, Field, Progress, Stat } from '@/components/ui';
import type { UploadProgress } from '@/lib/upload';
import { useLoad, useObservations, type LoadPreview, type Problem, type Series } from './api';

const PHASES: Record<UploadProgress['phase'], string> = {
  uploading: 'Sending the file',
  reading: 'Reading the file',
  checking: 'Checking the observations',
  storing: 'Storing the vintage',
  done: 'Done',
};

export function ProblemsTable({ problems }: { problems: Problem[] }) {
  if (!problems.length) return <p className="text-sm text-ok">No problems found.</p>;
  return (
    <DataTable
      dense
      testId="problems-table"
      data={problems}
      columns={[
        { accessorKey: 'severity', header: hiddenHeader('Severity'), cell: (c) => <span className={`tag ${c.getValue() === 'error' ? 'border-alert text-alert' : 'border-above text-above'}`}>{c.getValue()}</span> },
        { accessorKey: 'row', header: 'Row', meta: { numeric: true }, cell: (c) => c.getValue() ?? '—' },
        { accessorKey: 'column', header: 'Column', cell: (c) => c.getValue() ?? '—' },
        { accessorKey: 'message', header: 'Problem' },
      ]}
    />
  );
}

export function LoadPanel({ series, onStored }: { series: Series & { vintageCount: number }; onStored: () => void }) {
  const load = useLoad();
  const [file, setFile] = useState<File | null>(null);
  const [note, setNote] = useState('');
  const [asOf, setAsOf] = useState(new Date().toISOString().slice(0, 10));
  const [preview, setPreview] = useState<LoadPreview | null>(null);
  const [stored, setStored] = useState<{ number: number; asOf: string; rowCount: number } | null>(null);
  const progress = load.progress;
  const error = load.error;
  const latest = useObservations(series.id, 'latest', series.vintageCount > 0);

  const form = (withFields: boolean) => {
    const f = new FormData();
    f.append('file', file!);
    if (withFields) {
      if (note) f.append('note', note);
      if (asOf) f.append('asOf', asOf);
      if (preview?.series[0]?.checksum) f.append('expectChecksum', preview.series[0].checksum);
    }
    return f;
  };
  const check = () => {
    setPreview(null);
    setStored(null);
    load.mutate({ path: `/series/${series.id}/vintages?dryRun=1`, form: form(false) }, { onSuccess: (res) => setPreview(res.preview) });
  };
  const store = () =>
    load.mutate(
      { path: `/series/${series.id}/vintages`, form: form(true) },
      {
        onSuccess: (res) => {
          setStored(res.vintage!);
          setPreview(null);
          setFile(null);
          onStored();
        },
      },
    );
  const p = preview?.series[0];
  const nextNumber = (p?.latestVintage ?? 0) + 1;
  return (
    <div className="space-y-5">
      <div className="card grid gap-4 p-4 md:grid-cols-[1fr_12rem_1fr_auto] md:items-end">
        <Field label="File (CSV, XLSX or SDMX-CSV)" htmlFor="load-file" hint="CSV and XLSX: a header row with period and value. SDMX-CSV: TIME_PERIOD and OBS_VALUE.">
          <input
            id="load-file"
            type="file"
            accept=".csv,.txt,.xlsx,text/csv,application/vnd.openxmlformats-officedocument.spreadsheetml.sheet"
            className="field"
            onChange={(e) => {
              setFile(e.target.files?.[0] ?? null);
              setPreview(null);
              setStored(null);
              load.reset();
            }}
          />
        </Field>
        <Field label="Data as of" htmlFor="load-asof" hint="The release date.">
          <input id="load-asof" type="date" className="field" value={asOf} max={new Date().toISOString().slice(0, 10)} onChange={(e) => setAsOf(e.target.value)} />
        </Field>
        <Field label="Note" htmlFor="load-note">
          <input id="load-note" className="field" value={note} onChange={(e) => setNote(e.target.value)} placeholder="for example: second estimate, benchmark revision" />
        </Field>
        <button className="btn" disabled={!file || !!progress} onClick={check}>
          Check the file
        </button>
      </div>
      {progress && <Progress value={progress.fraction} label={PHASES[progress.phase]} />}
      <ErrorNote error={error} title="The file could not be loaded" />
      {stored && (
        <p role="status" className="rounded border border-ok/40 bg-ok-light px-3 py-2 text-sm text-ok" data-testid="load-stored">
          Stored as vintage {stored.number} (data as of {stored.asOf}, {stored.rowCount} rows).
        </p>
      )}
      {preview && p && (
        <section className="card space-y-4 p-4" data-testid="load-preview" aria-label="Preview of the load">
          <h2 className="font-heading text-lg font-bold">Preview: nothing is stored until you confirm</h2>
          <dl className="grid grid-cols-2 gap-3 text-sm md:grid-cols-6">
            <Stat numeric label="Rows" value={p.rowCount} />
            <Stat numeric label="Periods" value={p.firstPeriod ? `${p.firstPeriod} – ${p.lastPeriod}` : '—'} />
            <Stat numeric label="New periods" value={p.changes?.new ?? '—'} />
            <Stat numeric label="Revised" value={p.changes?.revised ?? '—'} />
            <Stat numeric label="Removed" value={p.changes?.removed ?? '—'} />
            <Stat numeric label="Mean abs. revision" value={p.changes?.meanAbsoluteRevision != null ? fmt(p.changes.meanAbsoluteRevision) : '—'} />
          </dl>
          <ProblemsTable problems={[...preview.problems, ...p.problems]} />
          {p.observations && latest.data && (
            <Chart
              label="The latest vintage and the file"
              option={vintagesChart({ unit: series.unit, lines: [{ name: `vintage ${latest.data.vintage}`, periods: latest.data.periods, values: latest.data.values }, { name: 'this file', periods: p.observations.periods, values: p.observations.values }] })}
              height={260}
            />
          )}
          {p.changedPeriods.length > 0 && (
            <details>
              <summary className="cursor-pointer text-sm font-semibold">Changed periods ({p.changedPeriods.length}{p.changedPeriods.length === 500 ? '+' : ''})</summary>
              <div className="mt-2 max-h-72 overflow-y-auto">
                <DataTable
                  dense
                  data={p.changedPeriods}
                  columns={[
                    { accessorKey: 'period', header: 'Period' },
                    { accessorKey: 'status', header: 'Change' },
                    { accessorKey: 'from', header: `Now (${series.unit})`, meta: { numeric: true }, cell: (c) => asLoaded(c.getValue() as number | null) },
                    { accessorKey: 'to', header: `File (${series.unit})`, meta: { numeric: true }, cell: (c) => asLoaded(c.getValue() as number | null) },
                    { accessorKey: 'revision', header: `Revision (${series.unit})`, meta: { numeric: true }, cell: (c) => revisionCell(c.row.original) },
                  ]}
                />
              </div>
            </details>
          )}
          {preview.canStore ? (
            <button className="btn" onClick={store} disabled={!!progress}>
              Store as vintage {nextNumber}
            </button>
          ) : (
            <p className="text-sm font-semibold text-alert">{p.identicalToLatest ? 'Nothing to store: the file matches the latest vintage.' : 'Fix the errors above and check the file again.'}</p>
          )}
        </section>
      )}
    </div>
  );
}
