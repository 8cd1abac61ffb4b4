import { useMemo, useState } from 'react';
import type { Frequency } from '@schemas/frequency';
import type { StudySpec } from '@schemas/studies';
import { Chart } from '@/components/charts/Chart';
import { compareChart } from '@/components/charts/options';
import { fmt } from '@/components/charts/echarts';
import { ScrollRegion } from '@/components/ScrollRegion';
import { ErrorNote, Spinner } from '@/components/ui';
import { useSeriesList } from '@/features/catalogue/api';
import { useCompare, useMethods } from './api';

/** Overlay the cycles of several methods on one series, or of one method across several series. */
export function CompareView({ spec, frequency }: { spec: StudySpec; frequency: Frequency }) {
  const [mode, setMode] = useState<'methods' | 'series'>('methods');
  const [methods, setMethods] = useState<string[]>(['hp', 'hp-one-sided', 'hamilton', 'christiano-fitzgerald']);
  const catalogue = useMethods().data?.methods ?? [];
  const described = (id: string) => catalogue.find((m) => m.id === id);
  const [others, setOthers] = useState<number[]>([]);
  const [reference, setReference] = useState(0);
  const list = useSeriesList();
  const items = useMemo(() => {
    if (mode === 'methods') {
      return methods.map((m) => ({ seriesId: spec.seriesId, vintage: spec.vintage, transform: spec.transform, method: m, params: m === spec.method ? spec.params : { ...(described(m)?.initial[frequency] ?? {}) }, label: described(m)?.name ?? m }));
    }
    return [spec.seriesId, ...others].map((id) => {
      const s = list.data?.find((x) => x.id === id);
      const sameFreq = s?.frequency === frequency;
      return { seriesId: id, vintage: id === spec.seriesId ? spec.vintage : ('latest' as const), transform: /percent|rate/i.test(s?.unit ?? '') ? ('none' as const) : spec.transform, method: spec.method, params: sameFreq ? spec.params : { ...(described(spec.method)?.initial[s?.frequency ?? frequency] ?? {}) }, label: s?.code ?? String(id) };
    });
  }, [mode, methods, others, spec, list.data, frequency, catalogue]);
  const body = items.length ? { items, reference: Math.min(reference, items.length - 1), maxLag: frequency === 'M' ? 12 : frequency === 'Q' ? 8 : 3 } : null;
  const cmp = useCompare(body);
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
        <div className="flex flex-wrap gap-2">
          {(list.data ?? [])
            .filter((s) => s.id !== spec.seriesId && s.latestVintage)
            .map((s) => (
              <label key={s.id} className={`tag cursor-pointer gap-1 ${others.includes(s.id) ? 'border-trend bg-trend-light text-ink' : ''}`}>
                <input type="checkbox" className="sr-only" checked={others.includes(s.id)} onChange={() => setOthers(others.includes(s.id) ? others.filter((x) => x !== s.id) : [...others, s.id])} />
                {s.code}
              </label>
            ))}
        </div>
      )}
      <label className="flex items-center gap-2 text-sm">
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
      {cmp.data && (
        <>
          <div className="card p-3">
            <Chart
              testId="compare-chart"
              label="Cycles compared"
              option={compareChart({ zeroLine: true, unit: cmp.data.items[0]?.unitOfCycle, lines: cmp.data.items.map((it) => ({ name: it.label, periods: cmp.data!.periods, values: it.cycle })) })}
              height={320}
            />
          </div>
          {cmp.data.mixedFrequencies && <p className="text-sm text-alert">The lines have different frequencies, so cross-correlations are not computed.</p>}
          <ScrollRegion label="Statistics and cross-correlations" className="card overflow-x-auto">
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
        </>
      )}
    </div>
  );
}
