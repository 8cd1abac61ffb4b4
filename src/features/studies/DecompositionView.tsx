import { useMemo } from 'react';
import { PERIOD_WORD } from '@schemas/frequency';
import { contractionRanges } from '@schemas/chronology';
import { composeFigure, DEFAULT_SOURCE_WORDING, sourceLine } from '@schemas/charts/figure';
import { Chart } from '@/components/charts/Chart';
import { cycleChart, gainChart, trendChart } from '@/components/charts/options';
import { fmt } from '@/components/charts/echarts';
import { downloadChart } from '@/components/charts/render';
import { CAUTION_LINE } from '@schemas/cautions';
import { useChronologyStamp } from '@/features/chronology/api';
import { ChronologyPicker } from '@/features/chronology/ChronologyPicker';
import type { StudyResult } from './api';

/** The cautions a result carries (server/schemas/cautions.ts), under every decomposition. */
export function CautionLine({ cautions }: { cautions: string[] }) {
  return (
    <p className="border-t border-hairline pt-2 text-xs text-alert" data-testid="caution-line">
      Caution: {cautions.join(' ')}
    </p>
  );
}

export function StatsTable({ stats, unit, lastPeriod }: { stats: Record<string, number | null>; unit: string; lastPeriod?: string | null }) {
  const rows: [string, string][] = [
    ['Standard deviation', `${fmt(stats.sd ?? NaN)} ${unit}`],
    ...(stats.relativeSd !== null && stats.relativeSd !== undefined ? ([['Relative standard deviation', fmt(stats.relativeSd, 2)]] as [string, string][]) : []),
    ['First-order autocorrelation', fmt(stats.autocorrelation1 ?? NaN, 2)],
    ['Fourth-order autocorrelation', fmt(stats.autocorrelation4 ?? NaN, 2)],
    ['Minimum', fmt(stats.min ?? NaN)],
    ['Maximum', fmt(stats.max ?? NaN)],
    [lastPeriod ? `Last value (${lastPeriod})` : 'Last value', stats.last === null || stats.last === undefined ? '—' : fmt(stats.last)],
    ['Share of periods above zero', stats.shareAboveZero === null ? '—' : `${fmt((stats.shareAboveZero ?? 0) * 100, 0)} %`],
    ['Peaks / troughs', `${stats.peaks ?? 0} / ${stats.troughs ?? 0}`],
    ['Periods with a value', String(stats.n ?? 0)],
  ];
  return (
    <table className="w-full text-sm" data-testid="cycle-stats">
      <caption className="pb-1 text-left text-xs font-semibold tracking-wide text-ink-soft">Cycle statistics ({unit})</caption>
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

/** A study's decomposition; the chronology its charts shade is the study's own (saved with it), chosen here. */
export function DecompositionView({ result, updating, title, chronologyId, onChronologyChange }: { result: StudyResult; updating: boolean; title: string; chronologyId: number | null; onChronologyChange: (id: number | null) => void }) {
  const word = PERIOD_WORD[result.frequency][1];
  // A method's further series: those named cycle… go on the cycle chart, the others on the trend chart.
  const extra = Object.entries(result.extra ?? {}).map(([name, values]) => ({ name, values }));
  const stamp = useChronologyStamp(chronologyId);
  const contractions = useMemo(() => (stamp ? { name: stamp.name, ranges: contractionRanges(result.periods, stamp) } : undefined), [stamp, result]);
  // Levels on the series' own scale: a log transform is for the decomposition, not for reading levels.
  const trendOpt = useMemo(
    () =>
      trendChart({
        periods: result.periods,
        input: result.input,
        trend: result.trend,
        transform: result.transform,
        unit: result.series.unit,
        shadeLast: result.endOfSamplePeriods,
        extra: extra.filter((e) => !e.name.startsWith('cycle')),
        extension: result.extension,
        contractions,
      }),
    [result, contractions],
  );
  const cycleOpt = useMemo(
    () => cycleChart({ periods: result.periods, cycle: result.cycle, unit: result.unitOfCycle, turningPoints: result.turningPoints, shadeLast: result.endOfSamplePeriods, extra: extra.filter((e) => e.name.startsWith('cycle')), extension: result.extension, contractions }),
    [result, contractions],
  );
  const gainOpt = useMemo(() => (result.gain.gain.length ? gainChart({ ...result.gain, word }) : null), [result, word]);
  const lastPeriod = [...result.cycle.keys()].reverse().find((i) => result.cycle[i] !== null);
  const frame = (chart: object, what: string) =>
    composeFigure(chart, {
      number: null,
      title,
      subtitle: `${result.series.title}: ${what} (${what === 'cycle' ? result.unitOfCycle : result.series.unit})`,
      notes: null,
      source: sourceLine(DEFAULT_SOURCE_WORDING, result.series.source),
      stamp: `${result.vintageStamp} · ${result.methodLine}`,
      caution: CAUTION_LINE,
      institution: null,
      chronology: stamp ? `Shaded: contractions dated by the ${stamp.name} (${stamp.area}).` : null,
    });
  const download = (chart: object, what: string, name: string) => (f: 'png' | 'svg') => {
    const fig = frame(chart, what);
    return downloadChart(fig.option, name, f, { width: fig.width, height: fig.height });
  };
  const fileBase = `${result.series.code}-${result.method}-v${result.vintage}`;
  return (
    <div className="space-y-4" aria-busy={updating}>
      <div className="flex flex-wrap items-center gap-2 text-sm">
        <ChronologyPicker value={chronologyId} onChange={onChronologyChange} />
        <span className="tag" data-testid="method-line">{result.methodLine}</span>
        <span className="tag" data-testid="vintage-stamp">{result.vintageStamp}{result.vintagePin === 'latest' ? ' (follows new loads)' : ' (pinned)'}</span>
        {result.endNote && (
          <span className="tag border-alert bg-alert-light text-alert" data-testid="end-warning">
            {result.endNote}
          </span>
        )}
      </div>
      {updating && (
        <p role="status" className="rounded border border-above/50 bg-paper-deep px-3 py-1.5 text-sm font-semibold text-ink" data-testid="recomputing">
          Recomputing: the charts below show the previous parameters until the new result arrives.
        </p>
      )}
      <div className={`space-y-4 transition-opacity ${updating ? 'pointer-events-none opacity-40 grayscale' : ''}`} data-testid="decomposition-charts" data-stale={updating ? 'true' : 'false'}>
      <div className="card p-3">
        <div className="flex items-baseline justify-between">
          <h2 className="font-heading text-sm font-bold">Series and trend</h2>
          <ChartDownloads onDownload={download(trendOpt, 'series and trend', `${fileBase}-trend`)} />
        </div>
        <Chart option={trendOpt} label="The series and its trend" testId="trend-chart" height={300} />
      </div>
      <div className="card p-3">
        <div className="flex items-baseline justify-between">
          <h2 className="font-heading text-sm font-bold">Cycle ({result.unitOfCycle}), with peaks ▲ and troughs ▼</h2>
          <ChartDownloads onDownload={download(cycleOpt, 'cycle', `${fileBase}-cycle`)} />
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
          <StatsTable stats={result.statistics} unit={result.unitOfCycle} lastPeriod={lastPeriod === undefined ? null : result.periods[lastPeriod]} />
          {result.turningPoints.length > 0 && (
            <p className="mt-2 text-xs text-ink-soft" data-testid="turning-points">
              Peaks: {result.turningPoints.filter((t) => t.type === 'peak').map((t) => t.period).join(', ') || '—'} · Troughs:{' '}
              {result.turningPoints.filter((t) => t.type === 'trough').map((t) => t.period).join(', ') || '—'} (Harding–Pagan rules)
            </p>
          )}
        </div>
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
