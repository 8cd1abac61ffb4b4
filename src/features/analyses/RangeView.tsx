import { useState } from 'react';
import { useNavigate } from 'react-router-dom';
import { ACCESS, allows } from '@schemas/access';
import { ErrorNote, Field, Progress } from '@/components/ui';
import { useMe } from '@/features/auth/api';
import { useSaveStudy } from '@/features/studies/api';
import { useRange } from './api';
import { RangeResultView } from './RangeResultView';

interface Props {
  seriesId: number;
  code: string;
  transform: 'none' | 'log' | 'log100';
  methods: { method: string; params: Record<string, unknown> }[];
}

/** The range of gap estimates across the chosen methods on the series' latest vintage; saved as a study of kind "range". */
export function RangeView({ seriesId, code, transform, methods }: Props) {
  const range = useRange();
  const me = useMe();
  const save = useSaveStudy();
  const navigate = useNavigate();
  const [title, setTitle] = useState(`${code}: range across methods`);
  const r = range.data;
  const shown = range.variables;
  return (
    <div className="space-y-4">
      <button className="btn" disabled={methods.length < 2 || range.isPending} onClick={() => range.mutate({ seriesId, vintage: 'latest', transform, methods })}>
        {r ? 'Show the range again' : 'Show the range'}
      </button>
      {methods.length < 2 && <p className="text-sm text-ink-soft">Choose at least two methods.</p>}
      {range.isPending && <Progress value={null} label="Decomposing with each method" />}
      <ErrorNote error={range.error} />
      {r && <RangeResultView r={r} code={code} />}
      {r && shown && allows(ACCESS.studiesWrite, me.data?.roles) && (
        <form
          className="card flex flex-wrap items-end gap-3 p-3"
          onSubmit={(e) => {
            e.preventDefault();
            save.mutate(
              { kind: 'range', title, seriesId, vintage: 'latest', transform: shown.transform, methods: shown.methods, params: {} },
              { onSuccess: (s) => navigate(`/studies/${s.id}`) },
            );
          }}
        >
          <Field label="Study title" htmlFor="range-study-title">
            <input id="range-study-title" className="field w-72 max-w-full" value={title} onChange={(e) => setTitle(e.target.value)} />
          </Field>
          <button className="btn" disabled={save.isPending}>
            Save as study
          </button>
          <p className="w-full text-xs text-ink-soft">Saves these methods on the latest vintage as a range study: it opens on the study page and can go on a board or into an exhibit.</p>
          <ErrorNote error={save.error} />
        </form>
      )}
    </div>
  );
}
