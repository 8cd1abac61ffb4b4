/**
 * The parameters of a method, rendered from its description in the method catalogue (GET /methods,
 * server/schemas/methods.ts): λ fields with the slider, presets and cut-off; numbers and whole
 * numbers with their bounds; choices; check boxes. A new method needs no code here.
 */
import { PERIOD_WORD, PERIODS_PER_YEAR, type Frequency } from '@schemas/frequency';
import { cutoffPeriod, lambdaPresets, type MethodDescription, type ParamDescription, type ParamValue } from '@schemas/methods';
import { fmt } from '@/components/charts/echarts';
import { lambdaValueText } from './lambda-steps';
import { LambdaSlider } from './LambdaSlider';

type Params = Record<string, unknown>;

interface Props {
  method: MethodDescription;
  frequency: Frequency;
  /** The parameters given so far; the method's starting values fill the rest. */
  params: Params;
  onChange: (params: Params) => void;
  errors?: string | null;
}

/** λ with a logarithmic slider, a number field, the presets and the equivalent cut-off period. */
/** Text for an upper-case label with its Greek letters kept as written (λ would otherwise print as Λ). */
export function keepGreek(text: string) {
  return text.split(/([\u0370-\u03FF\u2113]+)/).map((part, i) => (i % 2 ? <span key={i} className="normal-case">{part}</span> : part));
}

export function LambdaControl({ value, order = 2, frequency, onChange, required, hint, squaredPenalty = true }: { value: number | undefined; order?: number; frequency: Frequency; onChange: (v: number | undefined) => void; required?: boolean; hint?: string; squaredPenalty?: boolean }) {
  // The cut-off period and the presets belong to the Hodrick–Prescott/Whittaker λ only.
  const cutoff = squaredPenalty && value && value > 0 ? cutoffPeriod(value, order) : null;
  const words = PERIOD_WORD[frequency];
  const ppy = PERIODS_PER_YEAR[frequency];
  // ℓ1 trend filtering's λ has no Hodrick–Prescott presets.
  const presets = squaredPenalty ? lambdaPresets(frequency) : [];
  return (
    <div className="space-y-2">
      <div className="flex items-end gap-2">
        <label className="flex-1">
          <span className="label">{keepGreek(`Smoothing parameter λ${required ? ' (required)' : ''}`)}</span>
          <input
            type="number"
            className="field num"
            aria-label="λ"
            min={0}
            step="any"
            value={value ?? ''}
            onChange={(e) => onChange(e.target.value === '' ? undefined : Number(e.target.value))}
          />
        </label>
        {squaredPenalty && (
        <div className="pb-1.5 text-right text-xs text-ink-soft" data-testid="cutoff">
          {cutoff ? (
            <>
              cut-off <span className="num font-semibold text-ink">{fmt(cutoff, 1)}</span> {words[1]}
              <br />({fmt(cutoff / ppy, 1)} years)
            </>
          ) : (
            'no cut-off above 2 periods'
          )}
        </div>
        )}
      </div>
      <LambdaSlider value={value} presets={presets.map((p) => p.lambda)} valueText={lambdaValueText(value, cutoff, words[1], ppy)} onChange={onChange} />
      <div className="flex flex-wrap gap-1">
        {presets.map((p) => (
          <button key={p.id} type="button" className={`tag hover:border-ink ${value === p.lambda ? 'border-trend bg-trend-light text-ink' : ''}`} title={p.source} aria-pressed={value === p.lambda} onClick={() => onChange(p.lambda)}>
            {p.label}: {fmt(p.lambda, p.lambda < 10 ? 2 : 0)}
          </button>
        ))}
      </div>
      {hint && <span className="block text-xs text-ink-faint">{hint}</span>}
    </div>
  );
}

const NUMBER = '__number__';

/** One parameter that is not a λ. */
function ParamField({ spec, value, onChange, frequency }: { spec: ParamDescription; value: unknown; onChange: (v: ParamValue | undefined) => void; frequency: Frequency }) {
  const hint = spec.hint?.replace('{periods}', PERIOD_WORD[frequency][1]);
  if (spec.kind === 'boolean') {
    return (
      <label className="flex items-end gap-2 pb-2 text-sm">
        <input type="checkbox" checked={Boolean(value)} onChange={(e) => onChange(e.target.checked)} /> {spec.label}
      </label>
    );
  }
  if (spec.kind === 'enum') {
    return (
      <label className="block">
        <span className="label">{keepGreek(spec.label)}</span>
        <select className="field" value={String(value)} onChange={(e) => onChange(spec.options.find((o) => String(o.value) === e.target.value)?.value)}>
          {spec.options.map((o) => (
            <option key={String(o.value)} value={String(o.value)}>
              {o.label}
            </option>
          ))}
        </select>
        {hint && <span className="mt-0.5 block text-xs text-ink-faint">{hint}</span>}
      </label>
    );
  }
  if (spec.kind === 'lambda') return null;
  const choices = spec.choices ?? [];
  const named = choices.find((c) => c.value === value);
  return (
    <div className="block">
      <label className="block">
        <span className="label">{keepGreek(spec.label)}</span>
        {choices.length > 0 && (
          <select className="field mb-1" aria-label={`${spec.label}: kind`} value={named ? named.value : NUMBER} onChange={(e) => onChange(e.target.value === NUMBER ? undefined : e.target.value)}>
            <option value={NUMBER}>a number</option>
            {choices.map((c) => (
              <option key={c.value} value={c.value}>
                {c.label}
              </option>
            ))}
          </select>
        )}
      </label>
      {!named && (
        <input
          type="number"
          className="field num"
          aria-label={spec.label}
          step={spec.kind === 'integer' ? 1 : 'any'}
          min={spec.min}
          max={spec.max}
          value={value === undefined || value === null ? '' : String(value)}
          onChange={(e) => onChange(e.target.value === '' ? undefined : Number(e.target.value))}
        />
      )}
      {hint && <span className="mt-0.5 block text-xs text-ink-faint">{hint}</span>}
    </div>
  );
}

export function ParamsEditor({ method, frequency, params, onChange, errors }: Props) {
  const set = (key: string, v: unknown) => {
    const next = { ...params };
    if (v === undefined) delete next[key];
    else next[key] = v;
    onChange(next);
  };
  const initial = method.initial[frequency];
  // A required parameter shows only what is given: a value the request lacks is not shown as set.
  const valueOf = (name: string) => params[name] ?? (method.params.find((p) => p.name === name)?.required ? undefined : initial[name]);
  const lambdas = method.params.filter((p) => p.kind === 'lambda');
  const others = method.params.filter((p) => p.kind !== 'lambda');
  return (
    <div className="space-y-3" data-testid="params-editor">
      {lambdas.map((p) => (
        <LambdaControl
          key={p.name}
          value={valueOf(p.name) as number | undefined}
          order={p.kind === 'lambda' && p.orderParam ? Number(valueOf(p.orderParam) ?? 2) : 2}
          frequency={frequency}
          onChange={(v) => set(p.name, v)}
          required={p.required}
          hint={p.hint}
          squaredPenalty={p.kind === 'lambda' ? p.squaredPenalty !== false : true}
        />
      ))}
      {others.length > 0 && (
        <div className={`grid gap-2 ${others.length >= 3 ? 'grid-cols-3' : others.length === 2 ? 'grid-cols-2' : ''}`}>
          {others.map((p) => (
            <ParamField key={p.name} spec={p} value={valueOf(p.name)} frequency={frequency} onChange={(v) => set(p.name, v)} />
          ))}
        </div>
      )}
      {errors && (
        <p className="text-xs font-semibold text-alert" role="alert">
          {errors}
        </p>
      )}
    </div>
  );
}
