import { Link, useParams, useSearchParams } from 'react-router-dom';
import { FREQUENCY_LABELS } from '@schemas/frequency';
import { SA_LABELS } from '@schemas/catalogue';
import { Chart } from '@/components/charts/Chart';
import { levelChart } from '@/components/charts/options';
import { asLoaded } from '@schemas/numbers';
import { DataTable } from '@/components/DataTable';
import { ScrollRegion } from '@/components/ScrollRegion';
import { EmptyState, ErrorNote, formatDate, PageHeader, Spinner, Tabs } from '@/components/ui';
import { useMe } from '@/features/auth/api';
import { API } from '@/lib/api';
import { useObservations, useSeries, useVintages } from './api';
import { InventedBadge } from './CataloguePage';
import { LoadPanel } from './LoadPanel';
import { HistoryPanel } from './HistoryPanel';
import { RevisionsPanel } from './RevisionsPanel';
import { ACCESS, allows } from '@schemas/access';

type Tab = 'overview' | 'vintages' | 'revisions' | 'load' | 'history';

export function SeriesPage() {
  const id = Number(useParams().id);
  const series = useSeries(id);
  const me = useMe();
  const [params, setParams] = useSearchParams();
  const tab = (params.get('tab') as Tab) || 'overview';
  const setTab = (t: Tab) => setParams({ tab: t }, { replace: true });
  const canLoad = allows(ACCESS.catalogueWrite, me.data?.roles);
  if (series.isPending) return <Spinner />;
  if (series.error) return <ErrorNote error={series.error} />;
  const s = series.data;
  const tabs: [Tab, string][] = [
    ['overview', 'Latest vintage'],
    ['vintages', `Vintages (${s.vintageCount})`],
    ['revisions', 'Revisions'],
    ...(canLoad ? ([['load', 'Load a release'], ['history', 'Load a history']] as [Tab, string][]) : []),
  ];
  return (
    <>
      <PageHeader
        kicker={<>Catalogue · <span className="font-mono">{s.code}</span></>}
        title={s.title}
        actions={
          <>
            {allows(ACCESS.studiesWrite, me.data?.roles) && s.vintageCount > 0 && (
              <Link to={`/studies/new?seriesId=${s.id}`} className="btn">
                Decompose in a study
              </Link>
            )}
            {canLoad && (
              <Link to={`/catalogue/${s.id}/edit`} className="btn-quiet">
                Edit metadata
              </Link>
            )}
          </>
        }
      >
        <span className="flex flex-wrap items-center gap-2">
          <span className="tag">{FREQUENCY_LABELS[s.frequency]}</span>
          <span className="tag">{s.unit}</span>
          <span className="tag" title={SA_LABELS[s.seasonalAdjustment]}>{s.seasonalAdjustment}</span>
          <span>Source: {s.source || '—'}</span>
          <InventedBadge source={s.source} />
        </span>
      </PageHeader>
      {s.notes && <p className="mb-4 max-w-3xl whitespace-pre-wrap text-sm text-ink-soft">{s.notes}</p>}
      <Tabs tabs={tabs} value={tab} onChange={setTab} label="Views of the series">
        {tab === 'overview' && <Overview id={id} unit={s.unit} hasVintages={s.vintageCount > 0} />}
        {tab === 'vintages' && <VintageHistory id={id} code={s.code} />}
        {tab === 'revisions' && <RevisionsPanel id={id} unit={s.unit} />}
        {tab === 'load' && canLoad && <LoadPanel series={s} onStored={() => setTab('revisions')} />}
        {tab === 'history' && canLoad && <HistoryPanel series={s} onStored={() => series.refetch()} />}
      </Tabs>
    </>
  );
}

function Overview({ id, unit, hasVintages }: { id: number; unit: string; hasVintages: boolean }) {
  const obs = useObservations(id, 'latest', hasVintages);
  if (!hasVintages) return <EmptyState title="No vintage yet">A data steward loads the first release on the “Load a release” tab.</EmptyState>;
  if (obs.isPending) return <Spinner />;
  if (obs.error) return <ErrorNote error={obs.error} />;
  const rows = obs.data.periods.map((p, i) => ({ period: p, value: obs.data.values[i] })).reverse();
  return (
    <div className="grid gap-6 lg:grid-cols-[1fr_20rem]">
      <div className="card p-4">
        <p className="mb-2 text-sm text-ink-soft" data-testid="vintage-stamp">
          Data as of {obs.data.asOf}, vintage {obs.data.vintage}
        </p>
        <Chart option={levelChart({ periods: obs.data.periods, values: obs.data.values, unit })} label={`Latest vintage, ${obs.data.periods.length} periods`} testId="series-chart" />
      </div>
      <ScrollRegion label="Values of the latest vintage" className="max-h-[26rem] overflow-y-auto">
        <DataTable
          dense
          data={rows}
          columns={[
            { accessorKey: 'period', header: 'Period' },
            { accessorKey: 'value', header: unit, meta: { numeric: true }, cell: (c) => asLoaded(c.getValue() as number | null) },
          ]}
        />
      </ScrollRegion>
    </div>
  );
}

function VintageHistory({ id, code }: { id: number; code: string }) {
  const vintages = useVintages(id);
  if (vintages.isPending) return <Spinner />;
  if (vintages.error) return <ErrorNote error={vintages.error} />;
  return (
    <>
      <p className="mb-3 max-w-3xl text-sm text-ink-soft">
        Vintages never change: a correction is loaded as a new vintage. Each is kept with its checksum. The whole release table, one column per vintage:{' '}
        <a className="text-trend underline" href={`${API}/series/${id}/history?format=csv`} download>
          CSV
        </a>{' '}
        or{' '}
        <a className="text-trend underline" href={`${API}/series/${id}/history?format=xlsx`} download>
          XLSX
        </a>
        .
      </p>
      <DataTable
        data={vintages.data}
        testId="vintage-table"
        empty="No vintage has been loaded."
        columns={[
          { accessorKey: 'number', header: 'Vintage', meta: { numeric: true } },
          { accessorKey: 'asOf', header: 'Data as of' },
          { id: 'span', header: 'Periods', accessorFn: (v) => `${v.firstPeriod ?? ''} – ${v.lastPeriod ?? ''}` },
          { accessorKey: 'rowCount', header: 'Rows', meta: { numeric: true } },
          { accessorKey: 'note', header: 'Note' },
          { id: 'by', header: 'Loaded by', accessorFn: (v) => `${v.createdBy?.name ?? '—'}, ${formatDate(v.createdAt, true)}` },
          { accessorKey: 'checksum', header: 'Checksum', cell: (c) => <code className="text-xs" title={c.getValue()}>{String(c.getValue()).slice(0, 10)}…</code> },
          {
            id: 'export',
            header: 'Download',
            enableSorting: false,
            cell: (c) => (
              <span className="flex gap-2 text-sm">
                {(['csv', 'xlsx', 'sdmx-csv'] as const).map((f) => (
                  <a key={f} className="text-trend underline" href={`${API}/series/${id}/vintages/${c.row.original.number}/export?format=${f}`} download aria-label={`Download ${code} vintage ${c.row.original.number} as ${f}`}>
                    {f.toUpperCase()}
                  </a>
                ))}
              </span>
            ),
          },
        ]}
      />
    </>
  );
}
