import { useMemo } from 'react';
import { Chart } from '@/components/charts/Chart';
import { compareChart, cycleChart, trendChart, withExhibitFrame } from '@/components/charts/options';
import { downloadChart } from '@/components/charts/render';
import { API } from '@/lib/api';
import type { Snapshot } from './api';

/** The chart of an exhibit, drawn only from its snapshot (or a draft's live content). */
export function exhibitChart(s: Snapshot) {
  const line = (role: string) => s.lines.find((l) => l.role === role);
  if (s.chartKind === 'compare') {
    return compareChart({ zeroLine: true, unit: s.text.units ?? undefined, lines: s.lines.map((l) => ({ name: l.label, periods: l.periods, values: l.values })) });
  }
  const cycle = line('cycle')!;
  if (s.chartKind === 'trend') {
    return trendChart({ periods: cycle.periods, input: line('input')!.values, trend: line('trend')!.values, shadeLast: s.endOfSamplePeriods });
  }
  const index = new Map(cycle.periods.map((p, i) => [p, i]));
  return cycleChart({
    periods: cycle.periods,
    cycle: cycle.values,
    unit: s.text.units ?? undefined,
    shadeLast: s.endOfSamplePeriods,
    turningPoints: (s.turningPoints ?? []).filter((t) => index.has(t.period)).map((t) => ({ index: index.get(t.period)!, type: t.type })),
  });
}

export function footerLines(s: Snapshot) {
  return [s.text.sourceLine ? `Source: ${s.text.sourceLine}` : '', `${s.vintageStamp} · ${s.methodLine}`, s.caution];
}

/** A print-resolution PNG (1200 × 675 drawn at 3×) or an SVG of the framed exhibit. */
export function downloadExhibit(s: Snapshot, name: string, format: 'png' | 'svg') {
  const option = withExhibitFrame(exhibitChart(s) as never, { title: s.text.title, subtitle: [s.text.subtitle, s.text.units ? `(${s.text.units})` : ''].filter(Boolean).join(' '), lines: footerLines(s) });
  return downloadChart(option, name, format, { width: 1200, height: 675 });
}

/** `titleLevel`: the exhibit's title is the page's h1 where the figure is the page (the public link), else an h2 (or h3 under a section's h2). */
export function ExhibitFigure({ snapshot, draft, titleLevel = 2 }: { snapshot: Snapshot; draft?: boolean; titleLevel?: 1 | 2 | 3 }) {
  const option = useMemo(() => exhibitChart(snapshot), [snapshot]);
  const Title = `h${titleLevel}` as const;
  return (
    <figure className="card space-y-2 bg-white p-5" data-testid="exhibit-figure">
      {draft && <p className="text-xs font-semibold uppercase tracking-wide text-above">Draft: live data, not yet frozen</p>}
      <Title className="font-heading text-xl font-bold">{snapshot.text.title}</Title>
      {(snapshot.text.subtitle || snapshot.text.units) && (
        <p className="text-sm text-ink-soft">
          {snapshot.text.subtitle}
          {snapshot.text.units && <span className="ml-1">({snapshot.text.units})</span>}
        </p>
      )}
      <Chart option={option} label={snapshot.text.title} testId="exhibit-chart" height={340} />
      <figcaption className="space-y-0.5 text-xs text-ink-soft">
        {snapshot.text.sourceLine && <p>Source: {snapshot.text.sourceLine}</p>}
        <p data-testid="exhibit-stamp">
          {snapshot.vintageStamp} · {snapshot.methodLine}
        </p>
        <p className="text-alert">{snapshot.caution}</p>
        {snapshot.frozenAt && (
          <p className="text-ink-faint">
            Frozen {snapshot.frozenAt.slice(0, 16).replace('T', ' ')} UTC · {snapshot.software.name} {snapshot.software.version}
          </p>
        )}
      </figcaption>
      {snapshot.text.notes && <p className="whitespace-pre-wrap border-t border-hairline pt-2 text-sm">{snapshot.text.notes}</p>}
    </figure>
  );
}

export function ExhibitDownloads({ snapshot, dataUrl, name }: { snapshot: Snapshot; dataUrl: string; name: string }) {
  return (
    <div role="group" className="flex flex-wrap gap-2" aria-label="Downloads">
      <button type="button" className="btn-quiet" onClick={() => downloadExhibit(snapshot, name, 'png')}>
        PNG
      </button>
      <button type="button" className="btn-quiet" onClick={() => downloadExhibit(snapshot, name, 'svg')}>
        SVG
      </button>
      <a className="btn-quiet" href={`${API}${dataUrl}?format=csv`} download>
        Data (CSV)
      </a>
      <a className="btn-quiet" href={`${API}${dataUrl}?format=xlsx`} download>
        Data (XLSX)
      </a>
    </div>
  );
}
