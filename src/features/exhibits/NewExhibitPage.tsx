import { zodResolver } from '@hookform/resolvers/zod';
import { useForm } from 'react-hook-form';
import { useNavigate, useSearchParams } from 'react-router-dom';
import { z } from 'zod';
import { ErrorNote, Field, PageHeader } from '@/components/ui';
import { useStudy } from '@/features/studies/api';
import { useExhibitMutations } from './api';
import { ChartKindOptions } from './ExhibitPage';

const schema = z.object({ title: z.string().trim().min(1, 'Give it a title.').max(200), subtitle: z.string().max(300).optional(), notes: z.string().max(5000).optional(), chartKind: z.enum(['cycle', 'trend']) });

/** Draft an exhibit from a study (?studyId=) or a board panel (?panelId=). */
export function NewExhibitPage() {
  const [params] = useSearchParams();
  const studyId = Number(params.get('studyId')) || undefined;
  const panelId = Number(params.get('panelId')) || undefined;
  const { create } = useExhibitMutations();
  // A range study draws its range: there is no cycle-or-trend choice to make.
  const study = useStudy(studyId);
  const range = study.data?.kind === 'range';
  const navigate = useNavigate();
  const form = useForm<z.infer<typeof schema>>({ resolver: zodResolver(schema), defaultValues: { title: params.get('title') ?? '', subtitle: '', notes: '', chartKind: 'cycle' } });
  return (
    <>
      <PageHeader title="Draft an exhibit" kicker="Exhibits">
        The units, source line, method line and vintage stamp are filled in from the {studyId ? 'study' : 'panel'}; you can adjust the text before submitting it.
      </PageHeader>
      <form noValidate className="card max-w-2xl space-y-3 p-4" onSubmit={form.handleSubmit((v) => create.mutate({ ...v, studyId, panelId }, { onSuccess: (e) => navigate(`/exhibits/${e.id}`, { replace: true }) }))}>
        <Field label="Title" htmlFor="nx-title" error={form.formState.errors.title?.message}>
          <input id="nx-title" className="field" autoFocus {...form.register('title')} />
        </Field>
        <Field label="Subtitle" htmlFor="nx-subtitle">
          <input id="nx-subtitle" className="field" {...form.register('subtitle')} />
        </Field>
        {range && <p className="text-sm">Chart: the range of gap estimates across the study’s {study.data?.methods?.length ?? ''} methods, with their median.</p>}
        {studyId && !range && (
          <Field label="Chart" htmlFor="nx-kind">
            <select id="nx-kind" className="field" {...form.register('chartKind')}>
              <ChartKindOptions />
            </select>
          </Field>
        )}
        <Field label="Notes" htmlFor="nx-notes">
          <textarea id="nx-notes" rows={3} className="field" {...form.register('notes')} />
        </Field>
        <ErrorNote error={create.error} />
        <button className="btn" disabled={create.isPending || (!studyId && !panelId)}>
          Draft the exhibit
        </button>
      </form>
    </>
  );
}
