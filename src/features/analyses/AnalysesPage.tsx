/**
 * Range and reliability: for one series, the range of gap estimates across methods (a band from
 * the lowest to the highest, the median, each method thin) and, over the series' vintages, which
 * methods' estimates held up in real time (Orphanides–van Norden statistics), with the band of past
 * revisions at the end of the sample. Economists only (ACCESS.analyses).
 */
import { useMemo, useState } from 'react';
import { PERIODS_PER_YEAR } from '@schemas/frequency';
import type { Transform } from '@schemas/decompose';
import { EmptyState, ErrorNote, Field, PageHeader, Spinner, Tabs } from '@/components/ui';
import { SeriesPicker } from '@/features/catalogue/SeriesPicker';
import type { SeriesListItem } from '@schemas/catalogue';
import { useMethods } from '@/features/studies/api';
import { RangeView } from './RangeView';
import { ReliabilityView } from './ReliabilityView';

const DEFAULT_METHODS = ['hp', 'hamilton', 'hamilton-average', 'bn-filter', 'uc', 'hp-forecast'];

export function AnalysesPage() {
  const catalogue = useMethods();
  const [series, setSeries] = useState<SeriesListItem | null>(null);
  const [transform, setTransform] = useState<Transform>('log100');
  const [chosen, setChosen] = useState<string[]>(DEFAULT_METHODS);
  const [tab, setTab] = useState<'range' | 'reliability'>('range');
  const frequency = series?.frequency ?? 'Q';
  const methods = useMemo(
    () => (catalogue.data?.methods ?? []).filter((m) => chosen.includes(m.id)).map((m) => ({ method: m.id, params: { ...m.initial[frequency] } })),
    [catalogue.data, chosen, frequency],
  );
  const toggle = (id: string) => setChosen((c) => (c.includes(id) ? c.filter((x) => x !== id) : [...c, id]));
  return (
    <>
      <PageHeader title="Range and reliability">
        How far the methods’ gap estimates disagree on a series, and which of them held up in real time across its vintages. Neither the range nor the revision band is a forecast.
      </PageHeader>
      {catalogue.isPending && <Spinner />}
      <ErrorNote error={catalogue.error} />
      {catalogue.data && (
        <div className="space-y-4">
          <div className="card grid gap-4 p-4 md:grid-cols-[minmax(0,1fr)_12rem]">
            <Field label="Series" htmlFor="analyses-series">
              <SeriesPicker
                id="analyses-series"
                value={series?.id}
                needsVintage
                onChange={(s) => {
                  setSeries(s);
                  if (s) setTransform(/%|percent|rate/i.test(s.unit) ? 'none' : 'log100');
                }}
              />
            </Field>
            <Field label="Transform" htmlFor="analyses-transform">
              <select id="analyses-transform" className="field w-full" value={transform} onChange={(e) => setTransform(e.target.value as Transform)}>
                <option value="log100">100 × log</option>
                <option value="log">log</option>
                <option value="none">none</option>
              </select>
            </Field>
            <fieldset className="md:col-span-2">
              <legend className="mb-1 text-sm font-semibold">Methods (conventional parameters for {series ? `${PERIODS_PER_YEAR[frequency]} periods a year` : 'the series’ frequency'})</legend>
              <div className="grid gap-1 text-sm sm:grid-cols-2 lg:grid-cols-3">
                {catalogue.data.methods.map((m) => (
                  <label key={m.id} className="flex items-center gap-2">
                    <input type="checkbox" checked={chosen.includes(m.id)} onChange={() => toggle(m.id)} /> {m.name}
                  </label>
                ))}
              </div>
            </fieldset>
          </div>
          {!series ? (
            <EmptyState title="Choose a series">The range and the reliability table are computed on one Catalogue series.</EmptyState>
          ) : (
            <Tabs
              label="Analyses"
              value={tab}
              onChange={setTab}
              tabs={[
                ['range', 'Range of estimates'],
                ['reliability', 'Reliability in real time'],
              ]}
            >
              {tab === 'range' ? (
                <RangeView key={`${series.id}-${transform}`} seriesId={series.id} code={series.code} transform={transform} methods={methods} />
              ) : (
                <ReliabilityView key={`${series.id}-${transform}`} seriesId={series.id} code={series.code} transform={transform} methods={methods} />
              )}
            </Tabs>
          )}
        </div>
      )}
    </>
  );
}
