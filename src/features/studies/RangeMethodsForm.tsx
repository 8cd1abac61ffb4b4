/**
 * The owner's editor of a range study's methods: tick the methods (a method kept keeps its saved
 * parameters, one added starts from the conventional parameters of the series' frequency) and save
 * them through PATCH /studies/:id; the range is recomputed.
 */
import { useMutation, useQueryClient } from '@tanstack/react-query';
import { useState } from 'react';
import { ErrorNote } from '@/components/ui';
import { api } from '@/lib/api';
import { useMethods, type Study } from './api';

export function RangeMethodsForm({ study }: { study: Study }) {
  const catalogue = useMethods();
  const qc = useQueryClient();
  const saved = study.methods ?? [];
  const [chosen, setChosen] = useState<string[]>(saved.map((m) => m.method));
  const save = useMutation({
    mutationFn: (methods: { method: string; params: Record<string, unknown> }[]) => api<Study>(`/studies/${study.id}`, { method: 'PATCH', json: { methods } }),
    onSuccess: (s) => {
      qc.setQueryData(['study', s.id], s);
      qc.invalidateQueries({ queryKey: ['studies'] });
    },
  });
  const all = catalogue.data?.methods ?? [];
  const toggle = (id: string) => setChosen((c) => (c.includes(id) ? c.filter((x) => x !== id) : [...c, id]));
  const changed = JSON.stringify([...chosen].sort()) !== JSON.stringify(saved.map((m) => m.method).sort());
  return (
    <form
      className="card space-y-2 p-3"
      aria-label="Methods of the range"
      onSubmit={(e) => {
        e.preventDefault();
        save.mutate(all.filter((m) => chosen.includes(m.id)).map((m) => ({ method: m.id, params: saved.find((x) => x.method === m.id)?.params ?? { ...m.initial[study.series.frequency] } })));
      }}
    >
      <fieldset>
        <legend className="mb-1 text-sm font-semibold">Methods in the range</legend>
        <div className="grid gap-1 text-sm sm:grid-cols-2 lg:grid-cols-3">
          {all.map((m) => (
            <label key={m.id} className="flex items-center gap-2">
              <input type="checkbox" checked={chosen.includes(m.id)} onChange={() => toggle(m.id)} /> {m.name}
            </label>
          ))}
        </div>
      </fieldset>
      {chosen.length < 2 && <p className="text-sm text-ink-soft">Choose at least two methods.</p>}
      <ErrorNote error={save.error} />
      <button className="btn" disabled={!changed || chosen.length < 2 || save.isPending}>
        {changed ? 'Save the methods' : 'Methods saved'}
      </button>
    </form>
  );
}
