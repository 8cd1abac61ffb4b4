/** Small shared pieces of the interface. */
import { cloneElement, isValidElement, useId, useRef, type KeyboardEvent, type ReactNode } from 'react';
import { ApiError } from '@/lib/api';
import { useDocumentTitle } from '@/lib/useDocumentTitle';

export function ErrorNote({ error, title }: { error: unknown; title?: string }) {
  if (!error) return null;
  const message = error instanceof ApiError || error instanceof Error ? error.message : String(error);
  // Details the message already says are not repeated under it.
  const details = error instanceof ApiError && Array.isArray(error.details) ? (error.details as { row?: number; column?: string; path?: string; message: string }[]).filter((d) => !message.includes(d.message)) : [];
  return (
    <div role="alert" className="rounded border border-alert/40 bg-alert-light px-3 py-2 text-sm text-alert">
      {title && <p className="font-semibold">{title}</p>}
      <p>{message}</p>
      {details.length > 0 && (
        <ul className="mt-1 list-disc pl-5">
          {details.slice(0, 8).map((d, i) => (
            <li key={i}>
              {d.row ? `Row ${d.row}${d.column ? `, ${d.column}` : ''}: ` : d.path ? `${d.path}: ` : ''}
              {d.message}
            </li>
          ))}
          {details.length > 8 && <li>…and {details.length - 8} more</li>}
        </ul>
      )}
    </div>
  );
}

export function Spinner({ label = 'Loading…' }: { label?: string }) {
  return (
    <span role="status" className="inline-flex items-center gap-2 text-sm text-ink-soft">
      <span className="h-3.5 w-3.5 animate-spin rounded-full border-2 border-hairline-strong border-t-trend" aria-hidden />
      {label}
    </span>
  );
}

export function EmptyState({ title, children }: { title: string; children?: ReactNode }) {
  return (
    <div className="card px-6 py-10 text-center">
      <p className="font-heading text-lg text-ink">{title}</p>
      {children && <div className="mx-auto mt-2 max-w-md text-sm text-ink-soft">{children}</div>}
    </div>
  );
}

/** A labelled form field; its hint or error is tied to the control (aria-describedby, aria-invalid) when `htmlFor` names it. */
export function Field({ label, error, hint, children, htmlFor }: { label: string; error?: string; hint?: ReactNode; children: ReactNode; htmlFor?: string }) {
  const noteId = htmlFor && (error || hint) ? `${htmlFor}-note` : undefined;
  const control = noteId && isValidElement<Record<string, unknown>>(children) ? cloneElement(children, { 'aria-describedby': noteId, 'aria-invalid': error ? true : undefined }) : children;
  return (
    <div>
      <label className="label" htmlFor={htmlFor}>
        {label}
      </label>
      {control}
      {hint && !error && (
        <p id={noteId} className="mt-1 text-xs text-ink-faint">
          {hint}
        </p>
      )}
      {error && (
        <p id={noteId} className="mt-1 text-xs font-semibold text-alert" role="alert">
          {error}
        </p>
      )}
    </div>
  );
}

/** The page's h1, kicker (where it belongs), actions and a line under the title; it names the browser tab too (`docTitle` where the h1 does not name the page). */
export function PageHeader({ title, kicker, actions, children, docTitle }: { title: string; kicker?: ReactNode; actions?: ReactNode; children?: ReactNode; docTitle?: string }) {
  useDocumentTitle(docTitle ?? title);
  return (
    <div className="mb-6 flex flex-wrap items-end justify-between gap-4 border-b border-hairline pb-4">
      <div>
        {kicker && <p className="text-xs font-semibold uppercase tracking-wide text-ink-faint">{kicker}</p>}
        <h1 className="page-title">{title}</h1>
        {children && <div className="mt-1 text-sm text-ink-soft">{children}</div>}
      </div>
      {actions && <div className="flex flex-wrap gap-2">{actions}</div>}
    </div>
  );
}

export function Progress({ value, label }: { value: number | null; label: string }) {
  const pct = value === null ? null : Math.round(Math.max(0, Math.min(1, value)) * 100);
  return (
    <div className="w-full">
      <div className="mb-1 flex justify-between text-xs text-ink-soft">
        <span>{label}</span>
        {pct !== null && <span className="num">{pct}%</span>}
      </div>
      <div className="h-2 w-full overflow-hidden rounded bg-paper-deep" role="progressbar" aria-label={label} aria-valuemin={0} aria-valuemax={100} aria-valuenow={pct ?? undefined}>
        <div className={`h-full bg-trend transition-all ${pct === null ? 'w-1/3 animate-pulse' : ''}`} style={pct === null ? undefined : { width: `${pct}%` }} />
      </div>
    </div>
  );
}

export function formatDate(iso: string | null | undefined, withTime = false) {
  if (!iso) return '—';
  const d = new Date(iso);
  if (Number.isNaN(d.getTime())) return iso;
  const date = d.toISOString().slice(0, 10);
  return withTime ? `${date} ${d.toISOString().slice(11, 16)} UTC` : date;
}

/**
 * Tabs with the ARIA tabs pattern: a `tablist` of `tab` buttons and the chosen tab's `tabpanel`
 * (the children). Arrow keys move between the tabs and choose them, Home and End go to the first
 * and the last; only the chosen tab is in the Tab order. `tabs` are [id, label] pairs.
 */
export function Tabs<T extends string>({ tabs, value, onChange, label, children }: { tabs: readonly (readonly [T, string])[]; value: T; onChange: (id: T) => void; label: string; children: ReactNode }) {
  const base = useId();
  const refs = useRef(new Map<T, HTMLButtonElement>());
  const tabId = (id: T) => `${base}-tab-${id}`;
  const choose = (id: T) => {
    onChange(id);
    refs.current.get(id)?.focus();
  };
  const onKeyDown = (e: KeyboardEvent<HTMLDivElement>) => {
    const i = tabs.findIndex(([id]) => id === value);
    const next = { ArrowRight: i + 1, ArrowLeft: i - 1, Home: 0, End: tabs.length - 1 }[e.key];
    if (next === undefined) return;
    e.preventDefault();
    choose(tabs[(next + tabs.length) % tabs.length][0]);
  };
  return (
    <>
      <div role="tablist" aria-label={label} className="mb-4 flex gap-1 border-b border-hairline" onKeyDown={onKeyDown}>
        {tabs.map(([id, text]) => (
          <button
            key={id}
            ref={(el) => {
              if (el) refs.current.set(id, el);
              else refs.current.delete(id);
            }}
            type="button"
            role="tab"
            id={tabId(id)}
            aria-selected={value === id}
            aria-controls={`${base}-panel`}
            tabIndex={value === id ? 0 : -1}
            onClick={() => onChange(id)}
            className={`-mb-px border-b-2 px-3 py-2 text-sm font-semibold ${value === id ? 'border-trend text-ink' : 'border-transparent text-ink-soft hover:text-ink'}`}
          >
            {text}
          </button>
        ))}
      </div>
      <div role="tabpanel" id={`${base}-panel`} aria-labelledby={tabId(value)} tabIndex={0} className="focus-visible:outline-offset-4">
        {children}
      </div>
    </>
  );
}

/** One figure of a preview's summary, inside a <dl>: a label and its value (`numeric`: set in tabular figures). */
export function Stat({ label, value, numeric = false }: { label: string; value: ReactNode; numeric?: boolean }) {
  return (
    <div>
      <dt className="label">{label}</dt>
      <dd className={`${numeric ? 'num text-left ' : ''}text-base font-semibold`}>{value}</dd>
    </div>
  );
}
