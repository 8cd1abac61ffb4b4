import { useChronologies } from './api';

/** "Shade contractions: none / a chronology", for study pages. */
export function ChronologyPicker({ value, onChange }: { value: number | null; onChange: (id: number | null) => void }) {
  const list = useChronologies();
  if (!list.data?.length) return null;
  return (
    <label className="flex items-center gap-1 text-xs text-ink-soft">
      Shade contractions:
      <select className="field w-auto py-0.5 text-xs" value={value ?? ''} onChange={(e) => onChange(e.target.value ? Number(e.target.value) : null)} aria-label="Shade contractions of a reference chronology">
        <option value="">none</option>
        {list.data.map((c) => (
          <option key={c.id} value={c.id}>
            {c.name} ({c.area})
          </option>
        ))}
      </select>
    </label>
  );
}
