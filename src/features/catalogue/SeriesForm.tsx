import { zodResolver } from '@hookform/resolvers/zod';
import { useForm } from 'react-hook-form';
import { useNavigate, useParams } from 'react-router-dom';
import { createSeriesSchema, SA_LABELS, SA_VALUES, type CreateSeriesBody } from '@schemas/catalogue';
import { ErrorNote, Field, PageHeader, Spinner } from '@/components/ui';
import { useSaveSeries, useSeries, type Series } from './api';

export function NewSeriesPage() {
  return (
    <>
      <PageHeader title="New series" kicker="Catalogue">
        Define the series; then load its first release as vintage 1.
      </PageHeader>
      <SeriesForm />
    </>
  );
}

export function EditSeriesPage() {
  const id = Number(useParams().id);
  const series = useSeries(id);
  if (!series.data) return <Spinner />;
  return (
    <>
      <PageHeader title={`Edit ${series.data.code}`} kicker="Catalogue">
        Metadata can be corrected at any time; stored vintages stay as they are.
      </PageHeader>
      <SeriesForm series={series.data} hasVintages={series.data.vintageCount > 0} />
    </>
  );
}

function SeriesForm({ series, hasVintages }: { series?: Series; hasVintages?: boolean }) {
  const save = useSaveSeries(series?.id);
  const navigate = useNavigate();
  const form = useForm<CreateSeriesBody>({
    resolver: zodResolver(createSeriesSchema) as never,
    defaultValues: series
      ? { code: series.code, title: series.title, frequency: series.frequency, unit: series.unit, seasonalAdjustment: series.seasonalAdjustment as 'sa', source: series.source, notes: series.notes ?? '', sdmxKey: series.sdmxKey ?? '' }
      : { code: '', title: '', frequency: 'Q', unit: '', seasonalAdjustment: 'sa', source: '', notes: '', sdmxKey: '' },
  });
  const e = form.formState.errors;
  return (
    <form noValidate className="card grid max-w-3xl gap-4 p-5 md:grid-cols-2" onSubmit={form.handleSubmit((v) => save.mutate(v, { onSuccess: (s) => navigate(`/catalogue/${s.id}`) }))}>
      <Field label="Code" htmlFor="code" error={e.code?.message} hint="Capitals, digits and _ — for example NL_GDP_REAL.">
        <input id="code" className="field font-mono" {...form.register('code')} />
      </Field>
      <Field label="Frequency" htmlFor="frequency" error={e.frequency?.message} hint={hasVintages ? 'Fixed once a vintage is stored.' : undefined}>
        <select id="frequency" className="field" disabled={hasVintages} {...form.register('frequency')}>
          <option value="A">annual</option>
          <option value="Q">quarterly</option>
          <option value="M">monthly</option>
        </select>
      </Field>
      <div className="md:col-span-2">
        <Field label="Title" htmlFor="title" error={e.title?.message}>
          <input id="title" className="field" {...form.register('title')} />
        </Field>
      </div>
      <Field label="Unit" htmlFor="unit" error={e.unit?.message} hint="As readers should see it: EUR million, 2015 prices.">
        <input id="unit" className="field" {...form.register('unit')} />
      </Field>
      <Field label="Seasonal adjustment" htmlFor="sa" error={e.seasonalAdjustment?.message}>
        <select id="sa" className="field" {...form.register('seasonalAdjustment')}>
          {SA_VALUES.map((v) => (
            <option key={v} value={v}>
              {v}: {SA_LABELS[v]}
            </option>
          ))}
        </select>
      </Field>
      <Field label="Source" htmlFor="source" error={e.source?.message}>
        <input id="source" className="field" {...form.register('source')} />
      </Field>
      <Field label="SDMX series key (optional)" htmlFor="sdmxKey" error={e.sdmxKey?.message} hint="Matches rows of SDMX-CSV files to this series.">
        <input id="sdmxKey" className="field font-mono" {...form.register('sdmxKey')} />
      </Field>
      <div className="md:col-span-2">
        <Field label="Notes" htmlFor="notes" error={e.notes?.message}>
          <textarea id="notes" rows={3} className="field" {...form.register('notes')} />
        </Field>
      </div>
      <div className="md:col-span-2 space-y-3">
        <ErrorNote error={save.error} />
        <button className="btn" disabled={save.isPending}>
          {series ? 'Save the changes' : 'Create the series'}
        </button>
      </div>
    </form>
  );
}
