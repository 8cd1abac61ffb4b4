import { useMemo } from 'react';
import { PERIOD_WORD } from '@schemas/frequency';
import { Chart } from '@/components/charts/Chart';
import { cycleChart, gainChart, trendChart, withExhibitFrame } from '@/components/charts/options';
import { fmt } from '@/components/charts/echarts';
import { downloadChart } from '@/components/charts/render';
import { CAUTION_LINE } from '@schemas/cautions';
import type { StudyResult } from './api';

/** The cautions a result carries (server/schemas/cautions.ts), under every decomposition. */
export function CautionLine({ cautions }: { cautions: string[] }) {
  return (
    <p className="border-t border-hairline pt-2 text-xs text-alert" data-testid="caution-line">
      Caution: {cautions.join(' ')}
    </p>
  );
}

export function StatsTable({ stats, unit }: { stats: Record<string, number | null>; unit: string }) {
  const rows: [string, string][] = [
    ['Standard deviation', `${fmt(stats.sd ?? NaN)} ${unit}`],
    ...(stats.relativeSd !== null && stats.relativeSd !== undefined ? ([['Relative standard deviation', fmt(stats.relativeSd, 2)]] as [string, string][]) : []),
    ['First-order autocorrelation', fmt(stats.autocorrelation1 ?? NaN, 2)],
    ['Fourth-order autocorrelation', fmt(stats.autocorrelation4 ?? NaN, 2)],
    ['Minimum', fmt(stats.min ?? NaN)],
    ['Maximum', fmt(stats.max ?? NaN)],
    ['Last value', stats.last === null ? '—' : fmt(stats.last)],
    ['Share of periods above zero', stats.shareAboveZero === null ? '—' : `${fmt((stats.shareAboveZero ?? 0) * 100, 0)} %`],
    ['Peaks / troughs', `${stats.peaks ?? 0} / ${stats.troughs ?? 0}`],
    ['Periods with a value', String(stats.n ?? 0)],
  ];
  return (
    <table className="w-full text-sm" data-testid="cycle-stats">
      <caption className="pb-1 text-left text-xs font-semibold uppercase tracking-wide text-ink-soft">Cycle statistics ({unit})</caption>
      <tbody>
        {rows.map(([k, v]) => (
          <tr key={k} className="border-t border-hairline">
            <th scope="row" className="py-1 pr-2 text-left font-normal text-ink-soft">
              {k}
            </th>
            <td className="num py-1">{v}</td>
          </tr>
        ))}
      </tbody>
    </table>
  );
}

export function DecompositionView({ result, updating, title }: { result: StudyResult; updating: boolean; title: string }) {
  const word = PERIOD_WORD[result.frequency][1];
  // A method's further series: those named cycle… go on the cycle chart, the others on the trend chart.
  const extra = Object.entries(result.extra ?? {}).map(([name, values]) => ({ name, values }));
  const trendOpt = useMemo(
    () =>
      trendChart({
        periods: result.periods,
        input: result.input,
        trend: result.trend,
        unit: result.transform === 'none' ? result.series.unit : result.transform === 'log100' ? '100 × log' : 'log',
        shadeLast: result.endOfSamplePeriods,
        extra: extra.filter((e) => !e.name.startsWith('cycle')),
        extension: result.extension,
      }),
    [result],
  );
  const cycleOpt = useMemo(
    () => cycleChart({ periods: result.periods, cycle: result.cycle, unit: result.unitOfCycle, turningPoints: result.turningPoints, shadeLast: result.endOfSamplePeriods, extra: extra.filter((e) => e.name.startsWith('cycle')), extension: result.extension }),
    [result],
  );
  const gainOpt = useMemo(() => (result.gain.gain.length ? gainChart({ ...result.gain, word }) : null), [result, word]);
  const frame = (what: string) => ({
    title,
    subtitle: `${result.series.title}: ${what} (${what === 'cycle' ? result.unitOfCycle : result.series.unit})`,
    lines: [`Source: ${result.series.source}`, `${result.vintageStamp} · ${result.methodLine}`, CAUTION_LINE],
  });
  const fileBase = `${result.series.code}-${result.method}-v${result.vintage}`;
  return (
    <div className="space-y-4" aria-busy={updating}>
      <div className="flex flex-wrap items-center gap-2 text-sm">
        <span className="tag" data-testid="method-line">{result.methodLine}</span>
        <span className="tag" data-testid="vintage-stamp">{result.vintageStamp}{result.vintagePin === 'latest' ? ' (follows new loads)' : ' (pinned)'}</span>
        {result.twoSided && (
          <span className="tag border-alert bg-alert-light text-alert" data-testid="end-warning" title="Two-sided filters use future data: the last two years will be revised">
            last two years: estimates will be revised
          </span>
        )}
        {updating && <span className="text-xs text-ink-faint">updating…</span>}
      </div>
      <div className="card p-3">
        <div className="flex items-baseline justify-between">
          <h2 className="font-heading text-sm font-bold">Series and trend</h2>
          <ChartDownloads onDownload={(f) => downloadChart(withExhibitFrame(trendOpt as never, frame('series and trend')), `${fileBase}-trend`, f)} />
        </div>
        <Chart option={trendOpt} label="The series and its trend" testId="trend-chart" height={300} />
      </div>
      <div className="card p-3">
        <div className="flex items-baseline justify-between">
          <h2 className="font-heading text-sm font-bold">Cycle ({result.unitOfCycle}), with peaks ▲ and troughs ▼</h2>
          <ChartDownloads onDownload={(f) => downloadChart(withExhibitFrame(cycleOpt as never, frame('cycle')), `${fileBase}-cycle`, f)} />
        </div>
        <Chart option={cycleOpt} label="The cycle with its turning points" testId="cycle-chart" height={260} />
      </div>
      <div className="grid gap-4 lg:grid-cols-2">
        <div className="card p-3">
          <h2 className="font-heading text-sm font-bold">Gain of the cycle filter</h2>
          {gainOpt ? <Chart option={gainOpt} label="Gain against period" testId="gain-chart" height={230} /> : <p className="py-8 text-center text-sm text-ink-soft">{result.gain.note}</p>}
          {result.gain.note && gainOpt && <p className="text-xs text-ink-faint">{result.gain.note}</p>}
        </div>
        <div className="card p-3">
          <StatsTable stats={result.statistics} unit={result.unitOfCycle} />
          {result.turningPoints.length > 0 && (
            <p className="mt-2 text-xs text-ink-soft" data-testid="turning-points">
              Peaks: {result.turningPoints.filter((t) => t.type === 'peak').map((t) => t.period).join(', ') || '—'} · Troughs:{' '}
              {result.turningPoints.filter((t) => t.type === 'trough').map((t) => t.period).join(', ') || '—'} (Harding–Pagan rules)
            </p>
          )}
        </div>
      </div>
      {result.warnings.length > 0 && (
        <ul className="list-disc space-y-0.5 pl-5 text-xs text-ink-soft" data-testid="warnings">
          {result.warnings.map((w) => (
            <li key={w}>{w}</li>
          ))}
        </ul>
      )}
      <CautionLine cautions={result.cautions} />
    </div>
  );
}

export function ChartDownloads({ onDownload }: { onDownload: (format: 'png' | 'svg') => void }) {
  return (
    <span className="flex gap-2 text-xs">
      <button type="button" className="text-trend underline" onClick={() => onDownload('png')}>
        PNG
      </button>
      <button type="button" className="text-trend underline" onClick={() => onDownload('svg')}>
        SVG
      </button>
    </span>
  );
}
