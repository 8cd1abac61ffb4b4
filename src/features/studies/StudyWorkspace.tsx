import { zodResolver } from '@hookform/resolvers/zod';
import { useEffect, useRef, useState } from 'react';
import { Controller, useForm, useWatch } from 'react-hook-form';
import { Link, useBlocker, useNavigate, useParams, useSearchParams } from 'react-router-dom';
import { TRANSFORM_LABELS, TRANSFORMS } from '@schemas/decompose';
import { createStudySchema, type CreateStudyBody, type StudySpec } from '@schemas/studies';
import { EmptyState, ErrorNote, Field, PageHeader, Spinner, Tabs } from '@/components/ui';
import { useMe } from '@/features/auth/api';
import { useSeriesRef, useVintages } from '@/features/catalogue/api';
import { SeriesPicker } from '@/features/catalogue/SeriesPicker';
import { API } from '@/lib/api';
import { useDebounced } from '@/lib/useDebounced';
import { useMethods, usePreview, useSaveStudy, useStudy, useStudyAction, type Study } from './api';
import { CompareView } from './CompareView';
import { DecompositionView } from './DecompositionView';
import { ParamsEditor } from './ParamsEditor';
import { RangeStudyView } from './RangeStudyView';
import { RealtimeView } from './RealtimeView';
import { ACCESS, allows } from '@schemas/access';

export function StudyPage() {
  const { id } = useParams();
  const study = useStudy(id ? Number(id) : undefined);
  const [params] = useSearchParams();
  if (id && study.isPending) return <Spinner />;
  if (id && study.error) return <ErrorNote error={study.error} />;
  if (study.data?.kind === 'range') return <RangeStudyView key={id} study={study.data} />;
  return <Workspace key={id ?? 'new'} study={study.data} seriesId={Number(params.get('seriesId')) || undefined} />;
}

function Workspace({ study, seriesId }: { study?: Study; seriesId?: number }) {
  const me = useMe();
  const navigate = useNavigate();
  const save = useSaveStudy(study?.id);
  const action = useStudyAction();
  const [tab, setTab] = useState<'decomposition' | 'compare' | 'realtime'>('decomposition');
  const isOwner = !study || study.owner.id === me.data?.id;
  const canEdit = allows(ACCESS.studiesWrite, me.data?.roles) && isOwner;
  const form = useForm<CreateStudyBody>({
    resolver: zodResolver(createStudySchema) as never,
    defaultValues: study
      ? { title: study.title, notes: study.notes ?? '', seriesId: study.seriesId, vintage: study.vintage, asOf: study.asOf, transform: study.transform, method: study.method, params: study.params, chronologyId: study.chronologyId }
      : { title: '', notes: '', seriesId: seriesId ?? (undefined as unknown as number), vintage: 'latest', asOf: null, transform: 'log100', method: 'hp', params: {}, chronologyId: null },
  });
  const values = useWatch({ control: form.control });
  const series = useSeriesRef(values.seriesId).data;
  const frequency = series?.frequency ?? study?.series.frequency ?? 'Q';
  const vintages = useVintages(values.seriesId);
  const methods = useMethods();
  const method = methods.data?.methods.find((m) => m.id === (values.method ?? 'hp'));

  // New studies start from the conventional parameters of the series' frequency; levels in
  // percent (rates, ratios) are decomposed without a log.
  useEffect(() => {
    if (!study && series && !form.getValues('title')) {
      form.setValue('title', `${series.code}: ${methods.data?.methods.find((m) => m.id === form.getValues('method'))?.name ?? form.getValues('method')}`);
      if (/percent|rate/i.test(series.unit)) form.setValue('transform', 'none');
    }
  }, [series?.id]);

  const spec: StudySpec | null = values.seriesId ? { seriesId: values.seriesId, vintage: values.vintage ?? 'latest', asOf: values.asOf ?? null, transform: values.transform ?? 'none', method: values.method ?? 'hp', params: (values.params ?? {}) as Record<string, unknown> } : null;
  // Recompute after the controls have been still for a moment: dragging λ sends no request per pixel.
  const debounced = useDebounced(spec, 350);
  const preview = usePreview(debounced);
  const changed =
    !!study &&
    JSON.stringify({ ...spec, title: values.title, notes: values.notes ?? '', chronologyId: values.chronologyId ?? null }) !==
      JSON.stringify({ seriesId: study.seriesId, vintage: study.vintage, asOf: study.asOf, transform: study.transform, method: study.method, params: study.params, title: study.title, notes: study.notes ?? '', chronologyId: study.chronologyId });

  // Leaving with unsaved changes asks first (links inside the app, and closing or reloading the tab).
  const unsaved = canEdit && (study ? changed : !!values.seriesId);
  const leaving = useRef(false);
  const go = (to: string, replace = false) => {
    leaving.current = true;
    navigate(to, { replace });
  };
  const blocker = useBlocker(({ currentLocation, nextLocation }) => unsaved && !leaving.current && currentLocation.pathname !== nextLocation.pathname);
  useEffect(() => {
    if (blocker.state !== 'blocked') return;
    if (window.confirm('This study has changes that are not saved. Leave and lose them?')) blocker.proceed();
    else blocker.reset();
  }, [blocker]);
  useEffect(() => {
    if (!unsaved) return;
    const warn = (e: BeforeUnloadEvent) => e.preventDefault();
    window.addEventListener('beforeunload', warn);
    return () => window.removeEventListener('beforeunload', warn);
  }, [unsaved]);

  const submit = form.handleSubmit((v) => save.mutate({ ...v, params: preview.data && preview.data.method === v.method ? (preview.data.params as Record<string, unknown>) : v.params }, { onSuccess: (s) => go(`/studies/${s.id}`, true) }));
  const paramError = preview.error && !preview.isFetching ? (preview.error as Error).message : null;

  return (
    <>
      <PageHeader
        kicker={<Link to="/studies" className="hover:underline">Studies</Link>}
        title={values.title || 'New study'}
        actions={
          <>
            {study && (
              <>
                <a className="btn-quiet" href={`${API}/studies/${study.id}/export?format=csv`} download>
                  CSV
                </a>
                <a className="btn-quiet" href={`${API}/studies/${study.id}/export?format=xlsx`} download>
                  XLSX
                </a>
                <a className="btn-quiet" href={`${API}/studies/${study.id}/script`} download data-testid="rerun-script" title="A Python script that fetches this study’s vintage with your API token (TIDEGAUGE_TOKEN), recomputes it with statsmodels or Tidegauge’s API and prints the largest difference from the saved numbers">
                  Rerun as a script
                </a>
              </>
            )}
            {study && allows(ACCESS.exhibitsDraft, me.data?.roles) && (
              <Link className="btn" to={`/exhibits/new?studyId=${study.id}&title=${encodeURIComponent(study.title)}`}>
                Draft an exhibit
              </Link>
            )}
            {study && allows(ACCESS.studiesWrite, me.data?.roles) && (
              <button className="btn-quiet" onClick={() => action.mutate({ id: study.id, action: 'duplicate' }, { onSuccess: (s) => { if (s) go(`/studies/${s.id}`); } })}>
                Duplicate
              </button>
            )}
            {study && canEdit && (
              <button className="btn-danger" onClick={() => confirm('Delete this study? Exhibits already submitted keep their own frozen copy.') && action.mutate({ id: study.id, action: 'delete' }, { onSuccess: () => go('/studies') })}>
                Delete
              </button>
            )}
          </>
        }
      >
        {study ? <>Owned by {study.owner.name}{!isOwner && ' — duplicate it to change it'}</> : 'Choose a series and a method; the charts follow your changes.'}
        {unsaved && study && <span className="ml-2 tag border-above text-above" data-testid="unsaved">unsaved changes</span>}
      </PageHeader>
      <ErrorNote error={action.error} />
      <div className="grid gap-6 lg:grid-cols-[22rem_minmax(0,1fr)]">
        <form noValidate className="card h-fit space-y-4 p-4" onSubmit={submit} aria-label="Study parameters">
          <Field label="Series" htmlFor="series" error={form.formState.errors.seriesId?.message}>
            <Controller
              control={form.control}
              name="seriesId"
              render={({ field }) => (
                <SeriesPicker
                  id="series"
                  value={field.value}
                  disabled={!canEdit}
                  needsVintage
                  onChange={(next) => {
                    if (!next) return;
                    field.onChange(next.id);
                    form.setValue('vintage', 'latest');
                    form.setValue('asOf', null);
                    form.setValue('params', {});
                  }}
                />
              )}
            />
          </Field>
          <div className="grid grid-cols-2 gap-2">
            <Field label="Vintage" htmlFor="vintage">
              <Controller
                control={form.control}
                name="vintage"
                render={({ field }) => (
                  <select
                    id="vintage"
                    className="field"
                    disabled={!canEdit}
                    value={values.asOf ? 'date' : String(field.value)}
                    onChange={(e) => {
                      // A date pin reads the vintage in force on that date; a number or "latest" drops it.
                      const v = e.target.value;
                      form.setValue('asOf', v === 'date' ? (vintages.data?.[0]?.asOf ?? new Date().toISOString().slice(0, 10)) : null);
                      field.onChange(v === 'latest' || v === 'date' ? 'latest' : Number(v));
                    }}
                  >
                    <option value="latest">latest (follows loads)</option>
                    <option value="date">in force on a date…</option>
                    {vintages.data?.map((v) => (
                      <option key={v.number} value={v.number}>
                        {v.number} — {v.asOf}
                      </option>
                    ))}
                  </select>
                )}
              />
            </Field>
            {values.asOf && (
              <Field label="Data as of" htmlFor="vintage-as-of" hint="The vintage in force on this date: the latest released on or before it.">
                <input id="vintage-as-of" type="date" className="field" disabled={!canEdit} value={values.asOf} onChange={(e) => e.target.value && form.setValue('asOf', e.target.value, { shouldDirty: true })} />
              </Field>
            )}
            <Field label="Transform" htmlFor="transform">
              <select id="transform" className="field" disabled={!canEdit} {...form.register('transform')}>
                {TRANSFORMS.map((t) => (
                  <option key={t} value={t}>
                    {TRANSFORM_LABELS[t]}
                  </option>
                ))}
              </select>
            </Field>
          </div>
          <Field label="Method" htmlFor="method">
            <Controller
              control={form.control}
              name="method"
              render={({ field }) => (
                <select
                  id="method"
                  className="field"
                  disabled={!canEdit}
                  value={field.value}
                  onChange={(e) => {
                    const m = methods.data?.methods.find((x) => x.id === e.target.value);
                    field.onChange(e.target.value);
                    form.setValue('params', { ...(m?.initial[frequency] ?? {}) });
                  }}
                >
                  {(methods.data?.methods ?? []).map((m) => (
                    <option key={m.id} value={m.id}>
                      {m.name}
                    </option>
                  ))}
                </select>
              )}
            />
          </Field>
          <fieldset disabled={!canEdit}>
            <Controller
              control={form.control}
              name="params"
              render={({ field }) => (method ? <ParamsEditor method={method} frequency={frequency} params={field.value ?? {}} onChange={field.onChange} errors={paramError} /> : <Spinner />)}
            />
          </fieldset>
          <Field label="Title" htmlFor="title" error={form.formState.errors.title?.message}>
            <input id="title" className="field" disabled={!canEdit} {...form.register('title')} />
          </Field>
          <Field label="Notes" htmlFor="notes">
            <textarea id="notes" rows={3} className="field" disabled={!canEdit} {...form.register('notes')} />
          </Field>
          <ErrorNote error={save.error} />
          {canEdit && (
            <button className="btn w-full justify-center" disabled={save.isPending || (!!study && !changed)}>
              {study ? (changed ? 'Save the changes' : 'Saved') : 'Save the study'}
            </button>
          )}
        </form>
        <section aria-label="Results">
          <Tabs
            tabs={[
              ['decomposition', 'Decomposition'],
              ['compare', 'Compare'],
              ['realtime', 'Real-time revisions'],
            ]}
            value={tab}
            onChange={setTab}
            label="Views of the study"
          >
            {!spec && <EmptyState title="Choose a series">Only series with at least one vintage can be decomposed.</EmptyState>}
            {tab === 'decomposition' && spec && (
              <>
                {preview.isPending && <Spinner label="Decomposing…" />}
                {preview.error && !preview.data && <ErrorNote error={preview.error} />}
                {preview.data && <DecompositionView
                    result={preview.data}
                    updating={preview.isFetching || JSON.stringify(debounced) !== JSON.stringify(spec)}
                    title={values.title || 'Study'}
                    chronologyId={values.chronologyId ?? null}
                    onChronologyChange={(id) => form.setValue('chronologyId', id, { shouldDirty: true })}
                  />}
              </>
            )}
            {tab === 'compare' && spec && <CompareView spec={spec} frequency={frequency} />}
            {tab === 'realtime' && <RealtimeView studyId={study?.id} />}
          </Tabs>
        </section>
      </div>
    </>
  );
}
