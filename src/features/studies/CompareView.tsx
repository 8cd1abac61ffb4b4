import { useMemo, useState } from 'react';
import { CAUTIONS } from '@schemas/cautions';
import { FREQUENCY_LABELS, PERIODS_PER_YEAR, type Frequency } from '@schemas/frequency';
import type { StudySpec } from '@schemas/studies';
import { Chart } from '@/components/charts/Chart';
import { compareChart } from '@/components/charts/options';
import { fmt } from '@/components/charts/echarts';
import { ScrollRegion } from '@/components/ScrollRegion';
import { ErrorNote, Spinner } from '@/components/ui';
import { useSeriesRef } from '@/features/catalogue/api';
import { SeriesPicker } from '@/features/catalogue/SeriesPicker';
import type { SeriesListItem } from '@schemas/catalogue';
import { useCompare, useMethods } from './api';

/** Overlay the cycles of several methods on one series, or of one method across several series. */
export function CompareView({ spec, frequency }: { spec: StudySpec; frequency: Frequency }) {
  const [mode, setMode] = useState<'methods' | 'series'>('methods');
  const [methods, setMethods] = useState<string[]>(['hp', 'hp-one-sided', 'hamilton', 'christiano-fitzgerald']);
  const catalogue = useMethods().data?.methods ?? [];
  const described = (id: string) => catalogue.find((m) => m.id === id);
  const [others, setOthers] = useState<SeriesListItem[]>([]);
  const [reference, setReference] = useState(0);
  const [common, setCommon] = useState<Frequency | ''>('');
  const base = useSeriesRef(spec.seriesId).data;
  const code = base?.code ?? 'this series';
  /** The study's series first, then those the person added. */
  const lines = useMemo(() => [{ id: spec.seriesId, code: base?.code, frequency: base?.frequency ?? frequency, unit: base?.unit ?? '' }, ...others], [spec.seriesId, base, others, frequency]);
  // Frequencies of the lines: when they differ, the person chooses a common one (or the server refuses).
  const chosen = mode === 'series' ? lines.map((s) => s.frequency) : [frequency];
  const mixed = new Set(chosen).size > 1;
  const lowest = [...chosen].sort((a, b) => PERIODS_PER_YEAR[a] - PERIODS_PER_YEAR[b])[0];
  const target = mixed && common ? common : undefined;
  const items = useMemo(() => {
    if (mode === 'methods') {
      return methods.map((m) => ({ seriesId: spec.seriesId, vintage: spec.vintage, transform: spec.transform, method: m, params: m === spec.method ? spec.params : { ...(described(m)?.initial[frequency] ?? {}) }, label: `${code} · ${described(m)?.name ?? m}` }));
    }
    return lines.map((s) => {
      const id = s.id;
      // Parameters follow the frequency the line is decomposed at: its own, or the common one chosen.
      const at = target ?? s?.frequency ?? frequency;
      return { seriesId: id, vintage: id === spec.seriesId ? spec.vintage : ('latest' as const), transform: /percent|rate/i.test(s?.unit ?? '') ? ('none' as const) : spec.transform, method: spec.method, params: at === frequency && s?.id === spec.seriesId ? spec.params : { ...(described(spec.method)?.initial[at] ?? {}) }, label: `${s?.code ?? id} · ${described(spec.method)?.name ?? spec.method}` };
    });
  }, [mode, methods, lines, spec, frequency, catalogue, target, code]);
  const lagFreq = target ?? frequency;
  // Series of mixed frequencies wait for the person to choose a common one: nothing is asked before.
  const body = items.length && !(mixed && !common) ? { items, reference: Math.min(reference, items.length - 1), maxLag: lagFreq === 'M' ? 12 : lagFreq === 'Q' ? 8 : 3, ...(target ? { frequency: target } : {}) } : null;
  const cmp = useCompare(body);
  const units = [...new Set(cmp.data?.items.map((it) => it.unitOfCycle) ?? [])];
  const option = useMemo(
    () =>
      cmp.data
        ? compareChart({
            zeroLine: true,
            unit: units.length === 1 ? units[0] : 'units in the legend',
            shadeLast: Math.max(0, ...cmp.data.items.map((it) => it.endOfSamplePeriods)),
            lines: cmp.data.items.map((it) => ({ name: units.length === 1 ? it.label : `${it.label} (${it.unitOfCycle})`, periods: cmp.data!.periods, values: it.cycle })),
          })
        : null,
    [cmp.data],
  );
  return (
    <div className="space-y-4">
      <div className="flex gap-4 text-sm" role="radiogroup" aria-label="What to compare">
        <label className="flex items-center gap-2">
          <input type="radio" name="compare-mode" checked={mode === 'methods'} onChange={() => setMode('methods')} /> Methods on this series
        </label>
        <label className="flex items-center gap-2">
          <input type="radio" name="compare-mode" checked={mode === 'series'} onChange={() => setMode('series')} /> This method across series
        </label>
      </div>
      {mode === 'methods' ? (
        <div className="flex flex-wrap gap-2">
          {catalogue.map(({ id, name }) => (
            <label key={id} className={`tag cursor-pointer gap-1 ${methods.includes(id) ? 'border-trend bg-trend-light text-ink' : ''}`}>
              <input type="checkbox" className="sr-only" checked={methods.includes(id)} onChange={() => setMethods(methods.includes(id) ? methods.filter((x) => x !== id) : [...methods, id])} />
              {name}
            </label>
          ))}
        </div>
      ) : (
        <div className="space-y-2">
          <div className="max-w-xl">
            <label className="label" htmlFor="compare-add">
              Add a series
            </label>
            <SeriesPicker id="compare-add" value={null} needsVintage exclude={lines.map((s) => s.id)} onChange={(s) => s && setOthers([...others, s])} />
          </div>
          {others.length > 0 && (
            <ul className="flex flex-wrap gap-2" aria-label="Series compared with this one">
              {others.map((s) => (
                <li key={s.id} className="tag gap-1 border-trend bg-trend-light text-ink">
                  {s.code}
                  <button type="button" className="ml-1 rounded px-1 hover:bg-paper" aria-label={`Remove ${s.code}`} onClick={() => {
                      setOthers(others.filter((x) => x.id !== s.id));
                      // The chip and its button are gone: focus goes back to the box that adds series.
                      document.getElementById('compare-add')?.focus();
                    }}
                  >
                    ×
                  </button>
                </li>
              ))}
            </ul>
          )}
        </div>
      )}
      {mixed && (
        <label className="flex flex-wrap items-center gap-2 text-sm" data-testid="common-frequency">
          These series have different frequencies. Compare them on:
          <select className="field w-auto" value={common} onChange={(e) => setCommon(e.target.value as Frequency | '')} aria-label="Common frequency">
            <option value="">choose a frequency…</option>
            {(['A', 'Q'] as Frequency[])
              .filter((f) => PERIODS_PER_YEAR[f] <= PERIODS_PER_YEAR[lowest])
              .map((f) => (
                <option key={f} value={f}>
                  {FREQUENCY_LABELS[f]} (averages of higher frequencies)
                </option>
              ))}
          </select>
        </label>
      )}
      <label className="flex flex-wrap items-center gap-2 text-sm">
        Reference for cross-correlations:
        <select className="field max-w-xs" value={reference} onChange={(e) => setReference(Number(e.target.value))} aria-label="Reference line">
          {items.map((it, i) => (
            <option key={i} value={i}>
              {it.label}
            </option>
          ))}
        </select>
      </label>
      {cmp.isPending && body && <Spinner />}
      <ErrorNote error={cmp.error} />
      {cmp.data && option && (
        <>
          <div className="card p-3">
            <Chart testId="compare-chart" label="Cycles compared" option={option} height={320} />
            {cmp.data.aggregated.length > 0 && (
              <p className="text-xs text-ink-soft" data-testid="compare-aggregated">
                Compared on {FREQUENCY_LABELS[cmp.data.frequency]} periods: {cmp.data.aggregated.join('; ')}.
              </p>
            )}
          </div>
          <ScrollRegion label="Statistics and cross-correlations" className="card max-w-full overflow-x-auto">
            <table className="w-full text-sm" data-testid="compare-table">
              <thead className="bg-paper-deep/60 text-xs text-ink-soft">
                <tr>
                  <th className="px-2 py-1 text-left">Line</th>
                  <th className="px-2 py-1 text-right">s.d.</th>
                  <th className="px-2 py-1 text-right">relative s.d.</th>
                  <th className="px-2 py-1 text-right">ρ(1)</th>
                  <th className="px-2 py-1 text-right">ρ(4)</th>
                  {cmp.data.items[0]?.crossCorrelations.map((x) => (
                    <th key={x.lag} className="px-2 py-1 text-right">
                      {x.lag > 0 ? `+${x.lag}` : x.lag}
                    </th>
                  ))}
                </tr>
              </thead>
              <tbody>
                {cmp.data.items.map((it, k) => (
                  <tr key={k} className="border-t border-hairline">
                    <td className="px-2 py-1">
                      {it.label}
                      {k === cmp.data!.reference && <span className="ml-1 text-xs text-ink-faint">(reference)</span>}
                    </td>
                    <td className="num px-2 py-1">{fmt(it.statistics.sd ?? NaN)}</td>
                    <td className="num px-2 py-1">{it.statistics.relativeSd == null ? '—' : fmt(it.statistics.relativeSd, 2)}</td>
                    <td className="num px-2 py-1">{fmt(it.statistics.autocorrelation1 ?? NaN, 2)}</td>
                    <td className="num px-2 py-1">{fmt(it.statistics.autocorrelation4 ?? NaN, 2)}</td>
                    {it.crossCorrelations.map((x) => (
                      <td key={x.lag} className={`num px-2 py-1 ${x.r !== null && Math.abs(x.r) >= 0.5 ? 'font-semibold' : ''}`}>
                        {x.r === null ? '—' : fmt(x.r, 2)}
                      </td>
                    ))}
                  </tr>
                ))}
              </tbody>
            </table>
            <p className="px-2 py-1 text-xs text-ink-faint">Cross-correlations corr(cₜ, referenceₜ₊ₖ) at leads and lags k: a peak at k &gt; 0 means the line leads the reference by k periods.</p>
          </ScrollRegion>
          <p className="border-t border-hairline pt-2 text-xs text-alert" data-testid="caution-line">
            Caution: {CAUTIONS.join(' ')}
          </p>
        </>
      )}
    </div>
  );
}
