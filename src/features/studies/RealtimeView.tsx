import { useState } from 'react';
import { Chart } from '@/components/charts/Chart';
import { compareChart, fanChart, revisionBandChart } from '@/components/charts/options';
import { REVISION_BAND_CAUTION } from '@schemas/cautions';
import { fmt } from '@/components/charts/echarts';
import { ErrorNote, Progress } from '@/components/ui';
import { apiStream } from '@/lib/ndjson';
import type { RealtimeResult } from './api';

const STAT_ROWS: [string, string, number][] = [
  ['correlation', 'Correlation with the final estimate', 2],
  ['noiseToSignal', 'Noise-to-signal (s.d. of revision / s.d. of final)', 2],
  ['oppositeSign', 'Share of periods where the sign of the gap changes', 2],
  ['meanAbsoluteRevision', 'Mean absolute revision', 3],
  ['meanRevision', 'Mean revision (final − real-time)', 3],
  ['n', 'Periods compared', 0],
];

/** The study's method on every vintage: real-time against final, the fan, and the reliability statistics. */
export function RealtimeView({ studyId }: { studyId: number | undefined }) {
  const [progress, setProgress] = useState<{ phase: string; done: number; total: number } | null>(null);
  const [result, setResult] = useState<RealtimeResult | null>(null);
  const [error, setError] = useState<unknown>(null);
  const [showBand, setShowBand] = useState(false);
  const run = async () => {
    setError(null);
    setProgress({ phase: 'starting', done: 0, total: 1 });
    try {
      setResult(await apiStream<RealtimeResult>(`/studies/${studyId}/realtime`, { method: 'POST' }, setProgress));
    } catch (e) {
      setError(e);
    } finally {
      setProgress(null);
    }
  };
  if (!studyId) return <p className="text-sm text-ink-soft">Save the study first: the revision analysis runs on a saved study.</p>;
  return (
    <div className="space-y-4">
      <p className="max-w-3xl text-sm text-ink-soft">
        The method is applied to every vintage of the series. The <strong>real-time</strong> estimate of a period is the end point of the vintage that first reached it; the <strong>final</strong> estimate is
        that of the latest vintage. The <strong>quasi-real-time</strong> estimate uses the latest data cut at each period, so its distance from the final estimate is the filter’s end-point revision, and
        the rest of the real-time revision comes from revised data (Orphanides and van Norden 2002).
      </p>
      <button className="btn" onClick={run} disabled={!!progress}>
        {result ? 'Run the revision analysis again' : 'Run the revision analysis'}
      </button>
      {progress && <Progress value={progress.total ? progress.done / progress.total : null} label={progress.phase === 'vintages' ? 'Decomposing every vintage' : progress.phase === 'quasi-real-time' ? 'Cutting the latest data at each period' : 'Starting'} />}
      <ErrorNote error={error} />
      {result && (
        <div className="space-y-4" data-testid="realtime-result">
          {result.note && <p className="text-sm text-above">{result.note}</p>}
          <div className="card p-3">
            <h2 className="font-heading text-sm font-bold">Final, quasi-real-time and real-time estimates ({result.unitOfCycle})</h2>
            <Chart
              testId="realtime-chart"
              label="Final against real-time estimates"
              option={(() => {
                const o = compareChart({
                  zeroLine: true,
                  unit: result.unitOfCycle,
                  lines: [
                    { name: `final (vintage ${result.finalVintage})`, periods: result.final.periods, values: result.final.cycle },
                    { name: 'quasi-real-time', periods: result.quasiRealTime.map((q) => q.period), values: result.quasiRealTime.map((q) => q.value) },
                  ],
                });
                const rt = new Map(result.realTime.filter((p) => p.period).map((p) => [p.period!, p.value]));
                (o.series as unknown[]).push({ name: 'real-time end points', type: 'scatter', symbolSize: 9, itemStyle: { color: '#A23B2A' }, data: (o.xAxis as unknown as { data: string[] }).data.map((p) => (rt.has(p) ? rt.get(p) : null)) });
                return o;
              })()}
              height={300}
            />
          </div>
          <div className="card p-3">
            <h2 className="font-heading text-sm font-bold">Fan: the gap as each vintage saw it</h2>
            <Chart
              testId="fan-chart"
              label="The gap from each vintage"
              option={fanChart({
                unit: result.unitOfCycle,
                lines: result.fan.map((f) => ({ name: `vintage ${f.vintage} (${f.asOf})`, periods: f.periods, values: f.cycle })),
                final: { name: `final, vintage ${result.finalVintage}`, periods: result.final.periods, values: result.final.cycle },
                realTime: result.realTime.filter((p) => p.period && p.value !== null).map((p) => ({ period: p.period!, value: p.value! })),
              })}
              height={300}
            />
          </div>
          <div className="card space-y-2 p-3">
            <label className="flex items-center gap-2 text-sm">
              <input type="checkbox" checked={showBand} onChange={(e) => setShowBand(e.target.checked)} /> Show the band of past revisions around the latest estimate
            </label>
            {showBand &&
              (result.revisionBand.length ? (
                <>
                  <Chart
                    testId="study-revision-band"
                    label="The latest estimate with the band of past revisions"
                    option={revisionBandChart({ name: `latest estimate (vintage ${result.finalVintage})`, unit: result.unitOfCycle, periods: result.revisionBand.map((b) => b.period), cycle: result.revisionBand.map((b) => b.value), band: result.revisionBand })}
                    height={260}
                  />
                  <p className="text-sm text-above">{REVISION_BAND_CAUTION}</p>
                </>
              ) : (
                <p className="text-sm text-ink-soft">Too few vintages for a band.</p>
              ))}
          </div>
          <table className="card w-full text-sm" data-testid="reliability-table">
            <caption className="pb-1 text-left text-xs font-semibold uppercase tracking-wide text-ink-soft">Reliability of the estimates (Orphanides and van Norden 2002)</caption>
            <thead className="bg-paper-deep/60 text-xs text-ink-soft">
              <tr>
                <th className="px-2 py-1 text-left">Statistic</th>
                <th className="px-2 py-1 text-right">Real-time vs final</th>
                <th className="px-2 py-1 text-right">Quasi-real-time vs final</th>
                <th className="px-2 py-1 text-right">Real-time vs quasi-real-time</th>
              </tr>
            </thead>
            <tbody>
              {STAT_ROWS.map(([key, label, d]) => (
                <tr key={key} className="border-t border-hairline">
                  <th scope="row" className="px-2 py-1 text-left font-normal text-ink-soft">
                    {label}
                  </th>
                  {(['realTime', 'quasiRealTime', 'dataRevisions'] as const).map((w) => (
                    <td key={w} className="num px-2 py-1">
                      {result.statistics[w][key] === null || result.statistics[w][key] === undefined ? '—' : fmt(result.statistics[w][key] as number, d)}
                    </td>
                  ))}
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      )}
    </div>
  );
}
