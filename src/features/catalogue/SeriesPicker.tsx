import { useEffect, useId, useRef, useState, type KeyboardEvent } from 'react';
import { FREQUENCY_LABELS } from '@schemas/frequency';
import type { SeriesListItem } from '@schemas/catalogue';
import { useDebounced } from '@/lib/useDebounced';
import { useSeriesPage, useSeriesRef } from './api';

/** How many series the picker asks for at a time: the person narrows by typing. */
const PICKER_LIMIT = 20;

export interface SeriesPickerProps {
  /** The input's id: a `<label htmlFor>` names the picker. */
  id: string;
  /** The chosen series by id or by code (forms that keep a code); empty when none is chosen. */
  value: number | string | null | undefined;
  /** The series chosen from the list, or null when the person clears the box. */
  onChange: (series: SeriesListItem | null) => void;
  /** Only series with at least one vintage can be chosen (the others are listed, marked, not chosen). */
  needsVintage?: boolean;
  /** Series that cannot be chosen here (already in use), by id. */
  exclude?: number[];
  disabled?: boolean;
  placeholder?: string;
  className?: string;
  'aria-describedby'?: string;
  'aria-invalid'?: boolean;
}

const describe = (s: { code: string; title: string }) => `${s.code} — ${s.title}`;

/**
 * The series picker: a combobox (WAI-ARIA 1.2, list autocomplete) that searches the Catalogue on
 * the server as the person types (`GET /series?q=&limit=20`) and shows code, title and frequency.
 * Arrow keys move through the list, Enter chooses, Escape closes it (a second Escape restores the
 * chosen series' name). When a value is set, the box shows that series (`GET /series/:id`).
 */
export function SeriesPicker({ id, value, onChange, needsVintage, exclude = [], disabled, placeholder = 'Type a code or title…', className, ...aria }: SeriesPickerProps) {
  const listId = `${id}-list`;
  const statusId = useId();
  const chosen = useSeriesRef(value);
  const chosenText = value && chosen.data ? describe(chosen.data) : '';
  const [text, setText] = useState(chosenText);
  const [editing, setEditing] = useState(false);
  const [open, setOpen] = useState(false);
  /** Said once when Enter meets an option that cannot be chosen. */
  const [refusal, setRefusal] = useState('');
  const [active, setActive] = useState(-1);
  const q = useDebounced(editing ? text.trim() : '', 200);
  const page = useSeriesPage({ q: q || undefined, limit: PICKER_LIMIT }, open);
  const items = page.data?.items ?? [];
  // The list answers what is in the box (not an earlier text still shown while the next comes).
  const fresh = !!page.data && !page.isPlaceholderData && q === (editing ? text.trim() : '');
  const listRef = useRef<HTMLUListElement>(null);

  // The box follows the chosen series while the person is not typing in it.
  useEffect(() => {
    if (!editing) setText(chosenText);
  }, [chosenText, editing]);
  useEffect(() => setActive(-1), [q]);
  useEffect(() => setRefusal(''), [q, active]);
  useEffect(() => {
    if (active >= 0) listRef.current?.querySelector(`#${CSS.escape(`${id}-opt-${active}`)}`)?.scrollIntoView({ block: 'nearest' });
  }, [active, id]);

  const blocked = (s: SeriesListItem) => (needsVintage && !s.latestVintage) || exclude.includes(s.id);
  const choose = (s: SeriesListItem) => {
    if (blocked(s)) {
      setRefusal(`${s.code} cannot be chosen: ${exclude.includes(s.id) ? 'it is chosen already' : 'no release of it is loaded yet'}.`);
      return;
    }
    setRefusal('');
    onChange(s);
    setText(describe(s));
    setEditing(false);
    setOpen(false);
  };
  const move = (step: 1 | -1) => {
    if (!open) setOpen(true);
    if (!fresh || items.length === 0) return;
    setActive((a) => (a < 0 ? (step > 0 ? 0 : items.length - 1) : (a + step + items.length) % items.length));
  };
  const onKeyDown = (e: KeyboardEvent<HTMLInputElement>) => {
    if (e.key === 'ArrowDown') {
      e.preventDefault();
      if (e.altKey) setOpen(true);
      else move(1);
    } else if (e.key === 'ArrowUp') {
      e.preventDefault();
      move(-1);
    } else if (e.key === 'Enter') {
      // Enter chooses; it never submits the form the picker stands in.
      if (open) e.preventDefault();
      if (open && fresh && active >= 0 && items[active]) choose(items[active]);
    } else if (e.key === 'Escape') {
      if (open) {
        e.preventDefault();
        setOpen(false);
        setActive(-1);
      } else if (editing) {
        setEditing(false);
        setText(chosenText);
      }
    }
  };
  const status = !open ? '' : refusal ? refusal : !fresh ? 'Searching…' : `${page.data!.total} series match${page.data!.total > items.length ? `; the first ${items.length} are listed, type more to narrow` : ''}.`;

  return (
    <div className={`relative ${className ?? ''}`}>
      <input
        id={id}
        type="text"
        role="combobox"
        className="field"
        autoComplete="off"
        spellCheck={false}
        aria-autocomplete="list"
        aria-expanded={open}
        aria-controls={listId}
        aria-activedescendant={open && active >= 0 ? `${id}-opt-${active}` : undefined}
        aria-describedby={[aria['aria-describedby'], statusId].filter(Boolean).join(' ')}
        aria-invalid={aria['aria-invalid']}
        placeholder={placeholder}
        disabled={disabled}
        value={text}
        onChange={(e) => {
          setText(e.target.value);
          setEditing(true);
          setOpen(true);
          if (e.target.value === '' && value) onChange(null);
        }}
        onKeyDown={onKeyDown}
        onClick={() => !disabled && setOpen(true)}
        onBlur={() => {
          setOpen(false);
          setActive(-1);
          if (editing) {
            setEditing(false);
            setText(chosenText);
          }
        }}
      />
      <div hidden={!open} className="absolute left-0 right-0 z-30 mt-1 max-h-72 overflow-y-auto rounded border border-hairline-strong bg-paper-card py-1 text-sm shadow-lg">
        <ul id={listId} ref={listRef} role="listbox" aria-label="Matches" aria-busy={open && !fresh}>
          {items.map((s, i) => (
            <li
              key={s.id}
              id={`${id}-opt-${i}`}
              role="option"
              aria-selected={i === active}
              aria-disabled={blocked(s) || undefined}
              className={`px-2.5 py-1.5 ${i === active ? 'bg-trend-light' : ''} ${blocked(s) ? 'cursor-not-allowed text-ink-soft' : 'cursor-pointer hover:bg-paper'} ${fresh ? '' : 'opacity-60'}`}
              // Chosen on mouse down, before the box loses the focus and closes the list.
              onMouseDown={(e) => {
                e.preventDefault();
                choose(s);
              }}
            >
              <span className="font-semibold">{s.code}</span> <span className="break-words">{s.title}</span>{' '}
              <span className="text-xs text-ink-soft">
                · {FREQUENCY_LABELS[s.frequency]}
                {needsVintage && !s.latestVintage ? ' · no release loaded yet' : ''}
                {exclude.includes(s.id) ? ' · already chosen' : ''}
              </span>
            </li>
          ))}
        </ul>
        {fresh && items.length === 0 && <p className="px-2.5 py-1.5 text-ink-soft">No series match “{q}”.</p>}
        {!page.data && <p className="px-2.5 py-1.5 text-ink-soft">Searching…</p>}
        {fresh && page.data!.total > items.length && (
          <p className="border-t border-hairline px-2.5 py-1.5 text-xs text-ink-soft">
            {items.length} of {page.data!.total} listed: type more of a code or title to narrow.
          </p>
        )}
      </div>
      <span id={statusId} role="status" aria-live="polite" className="sr-only">
        {status}
      </span>
    </div>
  );
}
