import { zodResolver } from '@hookform/resolvers/zod';
import { Controller, useFieldArray, useForm } from 'react-hook-form';
import { createFeedSchema, nextRuns, scheduleInWords, type CreateFeedInput, type Feed } from '@schemas/feeds';
import { ErrorNote, Field, formatDate } from '@/components/ui';
import { SeriesPicker } from '@/features/catalogue/SeriesPicker';
import { useCreateFeed } from './api';

const EMPTY: CreateFeedInput = { name: '', url: '', schedule: '', mappings: [{ key: '', series: '' }], headers: [] };

/** Registering a feed: the SDMX data address, the series it fills, a schedule read back in words, optional headers. */
export function FeedForm({ onCreated }: { onCreated: (feed: Feed) => void }) {
  const create = useCreateFeed();
  const form = useForm<CreateFeedInput>({ resolver: zodResolver(createFeedSchema) as never, defaultValues: EMPTY });
  const mappings = useFieldArray({ control: form.control, name: 'mappings' });
  const headers = useFieldArray({ control: form.control, name: 'headers' });
  const e = form.formState.errors;
  const schedule = form.watch('schedule') ?? '';
  const upcoming = schedule.trim() ? nextRuns(schedule, 3) : [];
  const submit = form.handleSubmit((v) =>
    create.mutate(v, {
      onSuccess: (feed) => {
        form.reset(EMPTY);
        onCreated(feed);
      },
    }),
  );
  return (
    <form noValidate aria-labelledby="feed-form-title" className="card grid gap-4 p-5 md:grid-cols-2" onSubmit={submit}>
      <h2 id="feed-form-title" className="font-heading text-lg font-bold md:col-span-2">
        Register a feed
      </h2>
      <Field label="Name" htmlFor="feed-name" error={e.name?.message}>
        <input id="feed-name" className="field" {...form.register('name')} />
      </Field>
      <Field label="Schedule (cron, UTC)" htmlFor="feed-schedule" error={e.schedule?.message} hint={<ScheduleWords schedule={schedule} upcoming={upcoming} />}>
        <input id="feed-schedule" className="field font-mono" placeholder="30 9 * * 1-5" {...form.register('schedule')} />
      </Field>
      <div className="md:col-span-2">
        <Field label="SDMX data address" htmlFor="feed-url" error={e.url?.message} hint="The source's REST data query: …/data/{flow}/{key}. Answers in SDMX-CSV or SDMX-ML 2.1 are read.">
          <input id="feed-url" className="field font-mono" inputMode="url" placeholder="https://…/rest/data/AGENCY,FLOW,1.0/Q.AREA.INDICATOR" {...form.register('url')} />
        </Field>
      </div>
      <fieldset className="md:col-span-2">
        <legend className="label">Series it fills (series key in the answer → Catalogue series)</legend>
        {e.mappings?.message && <p className="mb-1 text-xs font-semibold text-alert" role="alert">{e.mappings.message}</p>}
        <ul className="space-y-2">
          {mappings.fields.map((m, i) => (
            <li key={m.id} className="grid items-start gap-2 sm:grid-cols-[1fr_1fr_auto]">
              <Field label={`Key ${i + 1}`} htmlFor={`feed-key-${i}`} error={e.mappings?.[i]?.key?.message}>
                <input id={`feed-key-${i}`} className="field font-mono" placeholder="Q.EST.GDP_VOL" {...form.register(`mappings.${i}.key`)} />
              </Field>
              <Field label={`Series ${i + 1}`} htmlFor={`feed-series-${i}`} error={e.mappings?.[i]?.series?.message}>
                <Controller
                  control={form.control}
                  name={`mappings.${i}.series`}
                  render={({ field }) => <SeriesPicker id={`feed-series-${i}`} value={field.value} onChange={(s) => field.onChange(s?.code ?? '')} />}
                />
              </Field>
              <button type="button" className="btn-quiet mt-6" disabled={mappings.fields.length === 1} aria-label={`Remove key ${i + 1}`} onClick={() => mappings.remove(i)}>
                Remove
              </button>
            </li>
          ))}
        </ul>
        <button type="button" className="btn-quiet mt-2" onClick={() => mappings.append({ key: '', series: '' })}>
          Add a series
        </button>
      </fieldset>
      <fieldset className="md:col-span-2">
        <legend className="label">Headers sent with each fetch (optional, for an API key)</legend>
        <p className="mb-2 text-xs text-ink-faint">Values are kept for the fetches and never shown again.</p>
        <ul className="space-y-2">
          {headers.fields.map((h, i) => (
            <li key={h.id} className="grid items-start gap-2 sm:grid-cols-[1fr_1fr_auto]">
              <Field label={`Header ${i + 1} name`} htmlFor={`feed-header-name-${i}`} error={e.headers?.[i]?.name?.message}>
                <input id={`feed-header-name-${i}`} className="field font-mono" placeholder="X-Api-Key" {...form.register(`headers.${i}.name`)} />
              </Field>
              <Field label={`Header ${i + 1} value`} htmlFor={`feed-header-value-${i}`} error={e.headers?.[i]?.value?.message}>
                <input id={`feed-header-value-${i}`} type="password" autoComplete="off" className="field font-mono" {...form.register(`headers.${i}.value`)} />
              </Field>
              <button type="button" className="btn-quiet mt-6" aria-label={`Remove header ${i + 1}`} onClick={() => headers.remove(i)}>
                Remove
              </button>
            </li>
          ))}
        </ul>
        <button type="button" className="btn-quiet mt-2" onClick={() => headers.append({ name: '', value: '' })}>
          Add a header
        </button>
      </fieldset>
      <div className="space-y-3 md:col-span-2">
        <ErrorNote error={create.error} />
        <button className="btn" disabled={create.isPending}>
          Register the feed
        </button>
      </div>
    </form>
  );
}

function ScheduleWords({ schedule, upcoming }: { schedule: string; upcoming: Date[] }) {
  return (
    <span aria-live="polite">
      <span className="font-semibold">{scheduleInWords(schedule)}</span>
      {upcoming.length > 0 && <> · next: {upcoming.map((d) => formatDate(d.toISOString(), true)).join('; ')}</>}
      {!schedule.trim() && <> · empty: the feed runs only when someone presses Run now.</>}
    </span>
  );
}
