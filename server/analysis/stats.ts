/**
 * Statistics of cycles: dispersion, persistence, co-movement, turning points, and the reliability
 * of real-time estimates. NaN marks a missing value everywhere; statistics use the periods where
 * every series involved has a value.
 */
import type { Frequency } from '../schemas/frequency.js';

function pairs(a: ArrayLike<number>, b: ArrayLike<number>, lag = 0): [number[], number[]] {
  // Pairs (a_t, b_{t+lag}).
  const xs: number[] = [];
  const ys: number[] = [];
  for (let t = 0; t < a.length; t++) {
    const u = t + lag;
    if (u < 0 || u >= b.length) continue;
    if (Number.isFinite(a[t]) && Number.isFinite(b[u])) {
      xs.push(a[t]);
      ys.push(b[u]);
    }
  }
  return [xs, ys];
}

export function finite(values: ArrayLike<number>): number[] {
  const out: number[] = [];
  for (let i = 0; i < values.length; i++) if (Number.isFinite(values[i])) out.push(values[i]);
  return out;
}

export function mean(xs: ArrayLike<number>): number {
  let s = 0;
  for (let i = 0; i < xs.length; i++) s += xs[i];
  return xs.length ? s / xs.length : NaN;
}

/** Sample standard deviation (n − 1 in the denominator). */
export function sd(xs: ArrayLike<number>): number {
  const n = xs.length;
  if (n < 2) return NaN;
  const m = mean(xs);
  let s = 0;
  for (let i = 0; i < n; i++) s += (xs[i] - m) ** 2;
  return Math.sqrt(s / (n - 1));
}

/** Pearson correlation of paired samples. */
export function correlation(xs: ArrayLike<number>, ys: ArrayLike<number>): number {
  const n = xs.length;
  if (n < 3) return NaN;
  const mx = mean(xs);
  const my = mean(ys);
  let sxy = 0;
  let sxx = 0;
  let syy = 0;
  for (let i = 0; i < n; i++) {
    const dx = xs[i] - mx;
    const dy = ys[i] - my;
    sxy += dx * dy;
    sxx += dx * dx;
    syy += dy * dy;
  }
  return sxx > 0 && syy > 0 ? sxy / Math.sqrt(sxx * syy) : NaN;
}

/** Autocorrelation at `lag`: the correlation of (c_t, c_{t−lag}) over the periods where both exist. */
export function autocorrelation(c: ArrayLike<number>, lag: number): number {
  const [xs, ys] = pairs(c, c, -lag);
  return correlation(xs, ys);
}

/** corr(c_t, r_{t+k}) for k = −K..K: positive k means the reference lags the cycle (the cycle leads). */
export function crossCorrelations(c: ArrayLike<number>, ref: ArrayLike<number>, maxLag: number): { lag: number; r: number; n: number }[] {
  const out: { lag: number; r: number; n: number }[] = [];
  for (let k = -maxLag; k <= maxLag; k++) {
    const [xs, ys] = pairs(c, ref, k);
    out.push({ lag: k, r: correlation(xs, ys), n: xs.length });
  }
  return out;
}

export interface TurningPoint {
  index: number;
  type: 'peak' | 'trough';
  value: number;
}

/**
 * Censoring rules of Harding and Pagan (2002), "Dissecting the cycle: a methodological
 * investigation", Journal of Monetary Economics 49(2) — the quarterly BBQ rules: a local extreme
 * within ±2 quarters, peaks and troughs alternating, each phase at least 2 quarters and each full
 * cycle at least 5. Monthly equivalents follow Bry and Boschan (1971): ±5 months, phases of at
 * least 5 months, cycles of at least 15. Annual: ±1 year, phase 1, cycle 2.
 * Order of censoring (ours): alternation, then short phases, then short cycles, repeated until
 * nothing changes.
 */
export const TURNING_RULES: Record<Frequency, { window: number; minPhase: number; minCycle: number }> = {
  Q: { window: 2, minPhase: 2, minCycle: 5 },
  M: { window: 5, minPhase: 5, minCycle: 15 },
  A: { window: 1, minPhase: 1, minCycle: 2 },
};

export function turningPoints(c: ArrayLike<number>, frequency: Frequency): TurningPoint[] {
  const { window, minPhase, minCycle } = TURNING_RULES[frequency];
  const n = c.length;
  let points: TurningPoint[] = [];
  for (let t = window; t < n - window; t++) {
    const v = c[t];
    if (!Number.isFinite(v)) continue;
    let isPeak = true;
    let isTrough = true;
    for (let j = 1; j <= window; j++) {
      const a = c[t - j];
      const b = c[t + j];
      if (!Number.isFinite(a) || !Number.isFinite(b)) {
        isPeak = isTrough = false;
        break;
      }
      if (!(v > a && v >= b)) isPeak = false;
      if (!(v < a && v <= b)) isTrough = false;
    }
    if (isPeak) points.push({ index: t, type: 'peak', value: v });
    else if (isTrough) points.push({ index: t, type: 'trough', value: v });
  }
  const alternate = (ps: TurningPoint[]) => {
    const out: TurningPoint[] = [];
    for (const p of ps) {
      const last = out[out.length - 1];
      if (last && last.type === p.type) {
        const keepNew = p.type === 'peak' ? p.value > last.value : p.value < last.value;
        if (keepNew) out[out.length - 1] = p;
      } else out.push(p);
    }
    return out;
  };
  for (let guard = 0; guard < 1000; guard++) {
    const before = points.length;
    points = alternate(points);
    // Shortest phase below the minimum: drop its pair of turning points.
    let worst = -1;
    let worstLen = Infinity;
    for (let i = 0; i + 1 < points.length; i++) {
      const len = points[i + 1].index - points[i].index;
      if (len < minPhase && len < worstLen) {
        worst = i;
        worstLen = len;
      }
    }
    if (worst >= 0) {
      points.splice(worst, 2);
      continue;
    }
    // Cycles (same type to same type) below the minimum: drop the smaller-amplitude inner pair.
    let cut = -1;
    for (let i = 0; i + 2 < points.length; i++) {
      if (points[i + 2].index - points[i].index < minCycle) {
        cut = i;
        break;
      }
    }
    if (cut >= 0) {
      const ampA = Math.abs(points[cut].value - points[cut + 1].value);
      const ampB = Math.abs(points[cut + 1].value - points[cut + 2].value);
      points.splice(ampA <= ampB ? cut : cut + 1, 2);
      continue;
    }
    if (points.length === before) break;
  }
  return points;
}

export interface CycleStatistics {
  n: number;
  sd: number;
  relativeSd: number | null;
  autocorrelation1: number;
  autocorrelation4: number;
  min: number;
  max: number;
  last: number | null;
  shareAboveZero: number;
  peaks: number;
  troughs: number;
}

export function cycleStatistics(c: ArrayLike<number>, frequency: Frequency, reference?: ArrayLike<number>): CycleStatistics {
  const xs = finite(c);
  const tps = turningPoints(c, frequency);
  let relativeSd: number | null = null;
  if (reference) {
    const [a, b] = pairs(c, reference);
    relativeSd = sd(b) > 0 ? sd(a) / sd(b) : null;
  }
  let last: number | null = null;
  for (let i = c.length - 1; i >= 0; i--) if (Number.isFinite(c[i])) {
    last = c[i];
    break;
  }
  return {
    n: xs.length,
    sd: sd(xs),
    relativeSd,
    autocorrelation1: autocorrelation(c, 1),
    autocorrelation4: autocorrelation(c, 4),
    min: xs.length ? Math.min(...xs) : NaN,
    max: xs.length ? Math.max(...xs) : NaN,
    last,
    shareAboveZero: xs.length ? xs.filter((x) => x > 0).length / xs.length : NaN,
    peaks: tps.filter((p) => p.type === 'peak').length,
    troughs: tps.filter((p) => p.type === 'trough').length,
  };
}

export interface Reliability {
  n: number;
  /** corr(real-time, final). */
  correlation: number;
  /** sd(real-time − final) / sd(final). */
  noiseToSignal: number;
  /** Share of periods where real-time and final gaps have opposite signs. */
  oppositeSign: number;
  /** mean |real-time − final|. */
  meanAbsoluteRevision: number;
  /** mean (final − real-time). */
  meanRevision: number;
  /** sqrt(mean (real-time − final)²) / sd(final). */
  rmseToSd: number;
}

/**
 * Reliability of real-time gap estimates in the manner of Orphanides and van Norden (2002), "The
 * unreliability of output-gap estimates in real time", Review of Economics and Statistics 84(4):
 * COR, N/S (the standard deviation of the revision over that of the final estimate), OPSIGN (the
 * share of opposite signs), plus the mean absolute revision. Periods where either is missing are
 * left out.
 */
export function reliability(realTime: ArrayLike<number>, final: ArrayLike<number>): Reliability {
  const [r, f] = pairs(realTime, final);
  const n = r.length;
  const rev = r.map((v, i) => v - f[i]);
  const sdF = sd(f);
  let opp = 0;
  let mabs = 0;
  let msq = 0;
  for (let i = 0; i < n; i++) {
    if (Math.sign(r[i]) !== Math.sign(f[i]) && r[i] !== 0 && f[i] !== 0) opp++;
    mabs += Math.abs(rev[i]);
    msq += rev[i] * rev[i];
  }
  return {
    n,
    correlation: correlation(r, f),
    noiseToSignal: sd(rev) / sdF,
    oppositeSign: n ? opp / n : NaN,
    meanAbsoluteRevision: n ? mabs / n : NaN,
    meanRevision: n ? -mean(rev) : NaN,
    rmseToSd: n ? Math.sqrt(msq / n) / sdF : NaN,
  };
}
