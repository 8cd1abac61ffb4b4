import { useState } from 'react';
import { DataTable } from '@/components/DataTable';
import { ErrorNote, Field, formatDate, PageHeader, Progress } from '@/components/ui';
import type { UploadProgress } from '@/lib/upload';
import { useLoad, useLoads, type LoadPreview } from './api';
import { ProblemsTable } from './LoadPanel';

const PHASES: Record<UploadProgress['phase'], string> = {
  uploading: 'Sending the file',
  reading: 'Reading the file',
  checking: 'Checking each series',
  storing: 'Storing the vintages',
  done: 'Done',
};

/** Loads of files carrying many series (SDMX-CSV), with a progress bar for long ones. */
export function LoadsPage() {
  const loads = useLoads();
  const load = useLoad({ stream: true });
  const [file, setFile] = useState<File | null>(null);
  const [asOf, setAsOf] = useState(new Date().toISOString().slice(0, 10));
  const [note, setNote] = useState('');
  const [preview, setPreview] = useState<LoadPreview | null>(null);
  const [result, setResult] = useState<{ vintages: { code: string; number: number }[]; unchanged: string[] } | null>(null);
  const { progress, error } = load;
  const run = (dryRun: boolean) => {
    const f = new FormData();
    f.append('file', file!);
    if (!dryRun) {
      if (asOf) f.append('asOf', asOf);
      if (note) f.append('note', note);
    }
    load.mutate(
      { path: `/loads${dryRun ? '?dryRun=1' : ''}`, form: f },
      {
        onSuccess: (res) => {
          if (dryRun) {
            setPreview(res.preview);
            setResult(null);
          } else {
            setResult({ vintages: res.vintages ?? [], unchanged: res.unchanged ?? [] });
            setPreview(null);
          }
        },
      },
    );
  };
  return (
    <>
      <PageHeader title="Loads" kicker="Catalogue">
        A file may carry many series (SDMX-CSV with series keys, or a SERIES_CODE column). Each series is matched to the Catalogue by its code or SDMX key;
        every changed series becomes a new vintage, all in one step or not at all.
      </PageHeader>
      <div className="card mb-4 grid gap-4 p-4 md:grid-cols-[1fr_12rem_1fr_auto_auto] md:items-end">
        <Field label="File" htmlFor="bulk-file">
          <input id="bulk-file" type="file" className="field" accept=".csv,.txt" onChange={(e) => { setFile(e.target.files?.[0] ?? null); setPreview(null); setResult(null); }} />
        </Field>
        <Field label="Data as of" htmlFor="bulk-asof">
          <input id="bulk-asof" type="date" className="field" value={asOf} onChange={(e) => setAsOf(e.target.value)} />
        </Field>
        <Field label="Note" htmlFor="bulk-note">
          <input id="bulk-note" className="field" value={note} onChange={(e) => setNote(e.target.value)} />
        </Field>
        <button className="btn-quiet" disabled={!file || !!progress} onClick={() => run(true)}>
          Check
        </button>
        <button className="btn" disabled={!file || !!progress || !preview?.canStore} onClick={() => run(false)}>
          Store
        </button>
      </div>
      {progress && <Progress value={progress.fraction} label={PHASES[progress.phase]} />}
      <ErrorNote error={error} />
      {result && (
        <p role="status" className="mb-4 rounded border border-ok/40 bg-ok-light px-3 py-2 text-sm text-ok">
          Stored {result.vintages.length} vintage{result.vintages.length === 1 ? '' : 's'}
          {result.unchanged.length ? `; ${result.unchanged.length} series unchanged` : ''}.
        </p>
      )}
      {preview && (
        <section className="mb-6 space-y-3">
          <p className="text-sm">
            {preview.series.length} series, {preview.observations.toLocaleString('en-US')} observations · {preview.errors} errors · {preview.warnings} warnings
          </p>
          <DataTable
            dense
            data={preview.series}
            columns={[
              { id: 'code', header: 'Series', accessorFn: (s) => s.series?.code ?? `(${s.key})` },
              { accessorKey: 'rowCount', header: 'Rows', meta: { numeric: true } },
              { id: 'span', header: 'Periods', accessorFn: (s) => (s.firstPeriod ? `${s.firstPeriod} – ${s.lastPeriod}` : '—') },
              { id: 'new', header: 'New', meta: { numeric: true }, accessorFn: (s) => s.changes?.new ?? '—' },
              { id: 'rev', header: 'Revised', meta: { numeric: true }, accessorFn: (s) => s.changes?.revised ?? '—' },
              { id: 'state', header: 'Outcome', accessorFn: (s) => (s.errors ? `${s.errors} errors` : s.identicalToLatest ? 'no change' : `vintage ${(s.latestVintage ?? 0) + 1}`) },
            ]}
          />
          <ProblemsTable problems={[...preview.problems, ...preview.series.flatMap((s) => s.problems.map((p) => ({ ...p, message: `${s.series?.code ?? s.key}: ${p.message}` })))].slice(0, 500)} />
        </section>
      )}
      <h2 className="mb-2 font-heading text-lg font-bold">Recent loads</h2>
      <DataTable
        data={loads.data ?? []}
        empty="No loads yet."
        columns={[
          { accessorKey: 'createdAt', header: 'When', cell: (c) => formatDate(c.getValue(), true) },
          { accessorKey: 'createdBy', header: 'Who' },
          { accessorKey: 'filename', header: 'File' },
          { accessorKey: 'format', header: 'Format' },
          { accessorKey: 'seriesCount', header: 'Series', meta: { numeric: true } },
          { accessorKey: 'observationCount', header: 'Observations', meta: { numeric: true } },
          { accessorKey: 'note', header: 'Note' },
        ]}
      />
    </>
  );
}
