import { cutoffPeriod, defaultParams, lambdaPresets, PERIOD_WORD, PERIODS_PER_YEAR, type Frequency, type Method } from '@analysis/frequency';
import { fmt } from '@/components/charts/echarts';

type Params = Record<string, unknown>;

interface Props {
  method: Method;
  frequency: Frequency;
  params: Params;
  onChange: (params: Params) => void;
  errors?: string | null;
}

const LOG_MIN = -1;
const LOG_MAX = 7;

/** λ with a logarithmic slider, a number field, the presets and the equivalent cut-off period. */
export function LambdaControl({ value, order = 2, frequency, onChange, required }: { value: number | undefined; order?: number; frequency: Frequency; onChange: (v: number | undefined) => void; required?: boolean }) {
  const cutoff = value && value > 0 ? cutoffPeriod(value, order) : null;
  const words = PERIOD_WORD[frequency];
  const ppy = PERIODS_PER_YEAR[frequency];
  const slider = value && value > 0 ? Math.min(LOG_MAX, Math.max(LOG_MIN, Math.log10(value))) : 3;
  return (
    <div className="space-y-2">
      <div className="flex items-end gap-2">
        <label className="flex-1">
          <span className="label">Smoothing parameter λ{required ? ' (required)' : ''}</span>
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
      </div>
      <input
        type="range"
        aria-label="λ (logarithmic scale)"
        className="w-full accent-[#0E6E68]"
        min={LOG_MIN}
        max={LOG_MAX}
        step={0.01}
        value={slider}
        onChange={(e) => onChange(Number(Number(Math.pow(10, Number(e.target.value))).toPrecision(3)))}
      />
      <div className="flex flex-wrap gap-1">
        {lambdaPresets(frequency).map((p) => (
          <button key={p.id} type="button" className={`tag hover:border-ink ${value === p.lambda ? 'border-trend bg-trend-light text-ink' : ''}`} title={p.source} onClick={() => onChange(p.lambda)}>
            {p.label}: {fmt(p.lambda, p.lambda < 10 ? 2 : 0)}
          </button>
        ))}
      </div>
    </div>
  );
}

function NumberField({ label, value, onChange, step = 1, min, hint }: { label: string; value: unknown; onChange: (v: number | undefined) => void; step?: number | 'any'; min?: number; hint?: string }) {
  return (
    <label className="block">
      <span className="label">{label}</span>
      <input type="number" className="field num" step={step} min={min} value={value === undefined || value === null ? '' : String(value)} onChange={(e) => onChange(e.target.value === '' ? undefined : Number(e.target.value))} aria-label={label} />
      {hint && <span className="mt-0.5 block text-xs text-ink-faint">{hint}</span>}
    </label>
  );
}

export function ParamsEditor({ method, frequency, params, onChange, errors }: Props) {
  const set = (key: string, v: unknown) => {
    const next = { ...params };
    if (v === undefined) delete next[key];
    else next[key] = v;
    onChange(next);
  };
  const d = defaultParams(method, frequency);
  const words = PERIOD_WORD[frequency][1];
  return (
    <div className="space-y-3" data-testid="params-editor">
      {(method === 'hp' || method === 'hp-one-sided' || method === 'whittaker' || method === 'boosted-hp' || method === 'l1-trend') && (
        <LambdaControl value={params.lambda as number | undefined} order={method === 'whittaker' ? Number(params.order ?? 2) : 2} frequency={frequency} onChange={(v) => set('lambda', v)} required={method === 'l1-trend'} />
      )}
      {method === 'whittaker' && (
        <label className="block">
          <span className="label">Order of the difference penalty</span>
          <select className="field" value={String(params.order ?? 2)} onChange={(e) => set('order', Number(e.target.value))} aria-label="Order">
            <option value="1">1: first differences (level)</option>
            <option value="2">2: second differences (Hodrick–Prescott)</option>
            <option value="3">3: third differences</option>
          </select>
        </label>
      )}
      {method === 'boosted-hp' && (
        <div className="grid grid-cols-2 gap-2">
          <label className="block">
            <span className="label">Stopping</span>
            <select className="field" value={String(params.stopping ?? 'bic')} onChange={(e) => set('stopping', e.target.value)} aria-label="Stopping">
              <option value="bic">BIC (Phillips–Shi)</option>
              <option value="fixed">fixed number</option>
            </select>
          </label>
          <NumberField label={params.stopping === 'fixed' ? 'Iterations' : 'At most, iterations'} value={params.iterations ?? d.iterations} min={1} onChange={(v) => set('iterations', v)} />
        </div>
      )}
      {method === 'hamilton' && (
        <div className="grid grid-cols-2 gap-2">
          <NumberField label="h (horizon)" value={params.h ?? d.h} min={1} onChange={(v) => set('h', v)} hint={`${words} ahead`} />
          <NumberField label="p (lags)" value={params.p ?? d.p} min={1} onChange={(v) => set('p', v)} />
        </div>
      )}
      {(method === 'baxter-king' || method === 'christiano-fitzgerald') && (
        <div className="grid grid-cols-3 gap-2">
          <NumberField label="Shortest period" value={params.low ?? d.low} min={2} step="any" onChange={(v) => set('low', v)} hint={words} />
          <NumberField label="Longest period" value={params.high ?? d.high} min={2} step="any" onChange={(v) => set('high', v)} hint={words} />
          {method === 'baxter-king' ? (
            <NumberField label="K (lags)" value={params.k ?? d.k} min={1} onChange={(v) => set('k', v)} />
          ) : (
            <label className="flex items-end gap-2 pb-2 text-sm">
              <input type="checkbox" checked={params.drift === undefined ? true : Boolean(params.drift)} onChange={(e) => set('drift', e.target.checked)} /> remove drift
            </label>
          )}
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
