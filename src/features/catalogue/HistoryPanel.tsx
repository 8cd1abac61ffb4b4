/**
 * "Load a history": a whole release table (periods down, one release per column, or long) checked
 * as a dry run, with a sheet picker for workbooks and the reading options; the preview says how
 * the file was read and which vintages it would make, and the steward stores them in one go.
 */
import { useState } from 'react';
import { fmt } from '@/components/charts/echarts';
import { DataTable } from '@/components/DataTable';
import { ScrollRegion } from '@/components/ScrollRegion';
import { ErrorNote, Field, Progress, Stat } from '@/components/ui';
import { useAnnounce } from '@/components/Announcer';
import { useHistoryLoad, type HistoryPreview, type HistoryVintage, type Series } from './api';
import { ProblemsTable } from './LoadPanel';

type Options = { sheet: string; layout: '' | 'wide' | 'long'; headerRow: string; releaseDateRow: string };
const NO_OPTIONS: Options = { sheet: '', layout: '', headerRow: '', releaseDateRow: '' };

export function HistoryPanel({ series, onStored }: { series: Series; onStored: () => void }) {
  const load = useHistoryLoad();
  const announce = useAnnounce();
  const [file, setFile] = useState<File | null>(null);
  const [options, setOptions] = useState<Options>(NO_OPTIONS);
  const [preview, setPreview] = useState<HistoryPreview | null>(null);
  const [stored, setStored] = useState<HistoryVintage[] | null>(null);

  const form = (o: Options) => {
    const f = new FormData();
    f.append('file', file!);
    for (const [k, v] of Object.entries(o)) if (v) f.append(k, v);
    return f;
  };
  const check = (o: Options = options) => {
    setStored(null);
    load.mutate(
      { path: `/series/${series.id}/history?dryRun=1`, form: form(o) },
      {
        onSuccess: (res) => {
          setPreview(res.preview);
          announce(`Checked: ${res.vintages.length} vintages to store, ${res.preview.errors} errors.`);
        },
      },
    );
  };
  const store = () =>
    load.mutate(
      { path: `/series/${series.id}/history`, form: form({ ...options, sheet: preview?.sheet ?? options.sheet }) },
      {
        onSuccess: (res) => {
          setStored(res.vintages);
          setPreview(null);
          announce(`Stored ${res.vintages.length} vintages.`);
          onStored();
        },
      },
    );
  const set = (k: keyof Options) => (e: { target: { value: string } }) => setOptions({ ...options, [k]: e.target.value });
  const first = preview?.vintages[0]?.number;
  const last = preview?.vintages[preview.vintages.length - 1]?.number;
  return (
    <div className="space-y-5">
      <p className="max-w-3xl text-sm text-ink-soft">
        A release table: periods down the first column and one column per release, with the release dates in a row above the header (or headers that are dates or periods), or a long table with the columns period, value and vintage, as_of or release_date. Title and note rows are skipped.
      </p>
      <div className="card grid gap-4 p-4 md:grid-cols-[1fr_auto] md:items-end">
        <Field label="History file (CSV or XLSX)" htmlFor="history-file">
          <input
            id="history-file"
            type="file"
            accept=".csv,.txt,.xlsx,text/csv,application/vnd.openxmlformats-officedocument.spreadsheetml.sheet"
            className="field"
            onChange={(e) => {
              setFile(e.target.files?.[0] ?? null);
              setOptions(NO_OPTIONS);
              setPreview(null);
              setStored(null);
              load.reset();
            }}
          />
        </Field>
        <button className="btn" disabled={!file || !!load.progress} onClick={() => check()}>
          Check the history
        </button>
        <details className="md:col-span-2">
          <summary className="cursor-pointer text-sm font-semibold">Reading options (found from the file when left empty)</summary>
          <div className="mt-3 grid gap-4 sm:grid-cols-3">
            <Field label="Layout" htmlFor="history-layout">
              <select id="history-layout" className="field" value={options.layout} onChange={set('layout')}>
                <option value="">find from the file</option>
                <option value="wide">wide: one column per release</option>
                <option value="long">long: period, value, vintage</option>
              </select>
            </Field>
            <Field label="Header row" htmlFor="history-header" hint="Its row number in the sheet.">
              <input id="history-header" className="field" inputMode="numeric" value={options.headerRow} onChange={set('headerRow')} />
            </Field>
            <Field label="Release-date row" htmlFor="history-dates" hint="The row of release dates, if any.">
              <input id="history-dates" className="field" inputMode="numeric" value={options.releaseDateRow} onChange={set('releaseDateRow')} />
            </Field>
          </div>
        </details>
      </div>
      {load.progress && <Progress value={load.progress.fraction} label={load.progress.phase === 'uploading' ? 'Sending the file' : 'Reading the history'} />}
      <ErrorNote error={load.error} title="The history could not be loaded" />
      {stored && (
        <p role="status" className="rounded border border-ok/40 bg-ok-light px-3 py-2 text-sm text-ok" data-testid="history-stored">
          Stored {stored.length} vintages ({stored[0]?.number} to {stored[stored.length - 1]?.number}, released {stored[0]?.asOf} to {stored[stored.length - 1]?.asOf}).
        </p>
      )}
      {preview && (
        <section className="card space-y-4 p-4" data-testid="history-preview" aria-label="Preview of the history">
          <h2 className="font-heading text-lg font-bold">Preview: nothing is stored until you confirm</h2>
          {preview.sheets.length > 1 && (
            <Field label="Sheet" htmlFor="history-sheet" hint={`The workbook has ${preview.sheets.length} sheets; this one was read.`}>
              <select
                id="history-sheet"
                className="field max-w-xs"
                value={preview.sheet ?? ''}
                onChange={(e) => {
                  const next = { ...options, sheet: e.target.value, headerRow: '', releaseDateRow: '' };
                  setOptions(next);
                  check(next);
                }}
              >
                {preview.sheets.map((s) => (
                  <option key={s}>{s}</option>
                ))}
              </select>
            </Field>
          )}
          <dl className="grid grid-cols-2 gap-3 text-sm md:grid-cols-4" data-testid="history-layout">
            <Stat label="Layout" value={`${preview.layout}${preview.detected.layout ? ' (found)' : ''}`} />
            <Stat label="Header row" value={`${preview.headerRow}${preview.detected.headerRow ? ' (found)' : ''}`} />
            <Stat label="Release-date row" value={preview.releaseDateRow ? `${preview.releaseDateRow}${preview.detected.releaseDateRow ? ' (found)' : ''}` : 'none: dated by the headers'} />
            <Stat label="Vintages to store" value={preview.vintages.length ? `${preview.vintages.length} (${first} to ${last})` : 'none'} />
          </dl>
          <h3 className="font-heading font-bold">How each header was read</h3>
          <ScrollRegion label="How each header was read" className="max-h-64 overflow-y-auto">
            <DataTable dense testId="history-headers" data={preview.headers} columns={[{ accessorKey: 'column', header: 'Column' }, { accessorKey: 'text', header: 'Header' }, { accessorKey: 'readAs', header: 'Read as' }]} />
          </ScrollRegion>
          <h3 className="font-heading font-bold">Vintages it would make, and what each revised</h3>
          <ScrollRegion label="Vintages it would make" className="max-h-80 overflow-y-auto">
            <DataTable
              dense
              testId="history-vintages"
              data={preview.vintages}
              empty="No vintage: every release is empty or unchanged."
              columns={[
                { accessorKey: 'number', header: 'Vintage', meta: { numeric: true } },
                { accessorKey: 'asOf', header: 'Released' },
                { accessorKey: 'label', header: 'Header' },
                { id: 'span', header: 'Periods', accessorFn: (v) => `${v.firstPeriod ?? ''} – ${v.lastPeriod ?? ''}` },
                { accessorKey: 'rowCount', header: 'Rows', meta: { numeric: true } },
                { id: 'revised', header: 'Revised', meta: { numeric: true }, accessorFn: (v) => v.changes?.revised ?? 0 },
                { id: 'new', header: 'New', meta: { numeric: true }, accessorFn: (v) => v.changes?.new ?? 0 },
                { id: 'mar', header: `Mean abs. revision (${series.unit})`, meta: { numeric: true }, accessorFn: (v) => (v.changes?.meanAbsoluteRevision == null ? '—' : fmt(v.changes.meanAbsoluteRevision)) },
              ]}
            />
          </ScrollRegion>
          {preview.skipped.length > 0 && (
            <>
              <h3 className="font-heading font-bold">Skipped</h3>
              <ul className="list-disc pl-5 text-sm" data-testid="history-skipped">
                {preview.skipped.map((s) => (
                  <li key={s.column}>
                    {s.column} ({s.label}): {s.reason}
                  </li>
                ))}
              </ul>
            </>
          )}
          <h3 className="font-heading font-bold">Problems</h3>
          <ProblemsTable problems={preview.problems} />
          {preview.canStore ? (
            <button className="btn" onClick={store} disabled={!!load.progress}>
              Store {preview.vintages.length} vintages ({first} to {last})
            </button>
          ) : (
            <p className="text-sm font-semibold text-alert">{preview.errors ? 'Fix the errors above and check the file again.' : 'Nothing to store.'}</p>
          )}
        </section>
      )}
    </div>
  );
}
