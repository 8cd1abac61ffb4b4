import { useMemo } from 'react';
import { Chart } from '@/components/charts/Chart';
import { exhibitChart, exhibitFigure, figureText } from '@/components/charts/options';
import { downloadChart } from '@/components/charts/render';
import { API } from '@/lib/api';
import type { Snapshot } from './api';

/** A print-resolution PNG (drawn at 3×) or an SVG of the framed exhibit: the same figure as the PDF. */
export function downloadExhibit(s: Snapshot, name: string, format: 'png' | 'svg') {
  const fig = exhibitFigure(s);
  return downloadChart(fig.option, name, format, { width: fig.width, height: fig.height });
}

/** `titleLevel`: the exhibit's title is the page's h1 where the figure is the page (the public link), else an h2 (or h3 under a section's h2). */
export function ExhibitFigure({ snapshot, draft, titleLevel = 2 }: { snapshot: Snapshot; draft?: boolean; titleLevel?: 1 | 2 | 3 }) {
  const option = useMemo(() => exhibitChart(snapshot), [snapshot]);
  const Title = `h${titleLevel}` as const;
  // The same text, in the same order, as the PNG, SVG and PDF (server/schemas/charts/figure.ts).
  const t = figureText(snapshot);
  return (
    <figure className="card min-w-0 space-y-2 bg-white p-4 sm:p-5" data-testid="exhibit-figure">
      {draft && <p className="text-xs font-semibold tracking-wide text-above">DRAFT: live data, not yet frozen</p>}
      {t.number && <p className="text-sm font-bold text-trend" data-testid="exhibit-number">{t.number}</p>}
      <Title className="font-heading text-xl font-bold">{t.title}</Title>
      {t.subtitle && <p className="text-sm text-ink-soft">{t.subtitle}</p>}
      <Chart option={option} label={t.title} testId="exhibit-chart" height={340} />
      <figcaption className="space-y-0.5 text-xs text-ink-soft">
        {t.notes && <p className="whitespace-pre-wrap pb-1 text-sm text-ink">{t.notes}</p>}
        {t.chronology && <p data-testid="exhibit-chronology">{t.chronology}</p>}
        <p data-testid="exhibit-source">{t.source}</p>
        <p data-testid="exhibit-stamp">{t.stamp}</p>
        <p className="text-alert">{t.caution}</p>
        {t.institution && <p className="font-semibold text-ink">{t.institution}</p>}
        {snapshot.frozenAt && (
          <p className="text-ink-faint">
            Frozen {snapshot.frozenAt.slice(0, 16).replace('T', ' ')} UTC · {snapshot.software.name} {snapshot.software.version}
          </p>
        )}
      </figcaption>
    </figure>
  );
}

export function ExhibitDownloads({ snapshot, dataUrl, pdfUrl, name }: { snapshot: Snapshot; dataUrl: string; pdfUrl?: string; name: string }) {
  return (
    <div role="group" className="flex flex-wrap gap-2" aria-label="Downloads">
      <button type="button" className="btn-quiet" onClick={() => downloadExhibit(snapshot, name, 'png')}>
        PNG
      </button>
      <button type="button" className="btn-quiet" onClick={() => downloadExhibit(snapshot, name, 'svg')}>
        SVG
      </button>
      {pdfUrl && (
        <a className="btn-quiet" href={`${API}${pdfUrl}`} download>
          PDF
        </a>
      )}
      <a className="btn-quiet" href={`${API}${dataUrl}?format=csv`} download>
        Data (CSV)
      </a>
      <a className="btn-quiet" href={`${API}${dataUrl}?format=xlsx`} download>
        Data (XLSX)
      </a>
    </div>
  );
}
