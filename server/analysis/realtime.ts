/**
 * Real-time reliability of one method across a series' vintages (Orphanides and van Norden 2002,
 * "The unreliability of output-gap estimates in real time", Review of Economics and Statistics
 * 84(4), 569–583), and the empirical spread of revisions by distance from the end of the sample.
 *
 * Input: for each vintage (oldest first) its cycle on its own periods, and the final estimate (the
 * latest vintage's cycle). The real-time estimate of a vintage is its last cycle value; it is
 * compared with the final estimate of the same period: `correlation` (COR), `noiseToSignal` (N/S:
 * sd of the revision over sd of the final), `signChangeShare` (OPSIGN: the share with opposite
 * signs), `meanAbsoluteRevision`, `periods` (pairs used) — by stats.ts `reliability`.
 *
 * Revision spread: for distance d = 0 … D−1 from a vintage's last estimated period, the revisions
 * final − estimate of every vintage at that distance; their count, standard deviation (divisor
 * k − 1) and the 5 % and 95 % empirical quantiles (linear interpolation, numpy's default). The
 * revision band is the latest estimate's last D periods ± what earlier vintages' revisions at that
 * distance were: a record of past revisions, not a forecast of the next ones.
 *
 * Example: vintages whose end points equal the final values give correlation 1, N/S 0, no sign
 * changes, mean absolute revision 0 and a spread of zero width.
 */
import { reliability } from './stats.js';

export interface VintageCycle {
  periods: readonly string[];
  cycle: ArrayLike<number>;
}

export interface RealtimeStatistics {
  correlation: number;
  noiseToSignal: number;
  signChangeShare: number;
  meanAbsoluteRevision: number;
  periods: number;
}

export interface RevisionSpread {
  distance: number;
  count: number;
  sd: number;
  p05: number;
  p95: number;
}

function lastIndex(c: ArrayLike<number>): number {
  let i = c.length - 1;
  while (i >= 0 && !Number.isFinite(c[i])) i--;
  return i;
}

/** Empirical quantile q of sorted values, by linear interpolation between order statistics. */
export function quantile(sorted: ArrayLike<number>, q: number): number {
  const k = sorted.length;
  if (k === 0) return NaN;
  const h = (k - 1) * q;
  const lo = Math.floor(h);
  return lo + 1 < k ? sorted[lo] + (h - lo) * (sorted[lo + 1] - sorted[lo]) : sorted[lo];
}

export function realtimeReliability(vintages: readonly VintageCycle[], final: VintageCycle): RealtimeStatistics {
  const finalAt = new Map(final.periods.map((p, i) => [p, final.cycle[i]]));
  const rt: number[] = [];
  const fi: number[] = [];
  for (const v of vintages) {
    const i = lastIndex(v.cycle);
    if (i < 0) continue;
    rt.push(v.cycle[i]);
    fi.push(finalAt.get(v.periods[i]) ?? NaN);
  }
  const r = reliability(Float64Array.from(rt), Float64Array.from(fi));
  return { correlation: r.correlation, noiseToSignal: r.noiseToSignal, signChangeShare: r.oppositeSign, meanAbsoluteRevision: r.meanAbsoluteRevision, periods: r.n };
}

/** Revisions (final − vintage estimate) by distance from each vintage's last estimated period. */
export function revisionSpread(vintages: readonly VintageCycle[], final: VintageCycle, depth: number): RevisionSpread[] {
  const finalAt = new Map(final.periods.map((p, i) => [p, final.cycle[i]]));
  const byDistance: number[][] = Array.from({ length: depth }, () => []);
  for (const v of vintages) {
    const end = lastIndex(v.cycle);
    for (let d = 0; d < depth && end - d >= 0; d++) {
      const est = v.cycle[end - d];
      const fin = finalAt.get(v.periods[end - d]);
      if (Number.isFinite(est) && fin !== undefined && Number.isFinite(fin)) byDistance[d].push(fin - est);
    }
  }
  return byDistance.map((revs, distance) => {
    const sorted = Float64Array.from(revs).sort();
    const k = revs.length;
    const mean = k ? revs.reduce((a, b) => a + b, 0) / k : NaN;
    const sd = k > 1 ? Math.sqrt(revs.reduce((a, b) => a + (b - mean) ** 2, 0) / (k - 1)) : NaN;
    return { distance, count: k, sd, p05: quantile(sorted, 0.05), p95: quantile(sorted, 0.95) };
  });
}

/** The band around the latest estimate's last periods: value + p05 … value + p95 of the revisions at that distance. */
export function revisionBand(final: VintageCycle, spread: readonly RevisionSpread[]) {
  const end = lastIndex(final.cycle);
  const out: { period: string; distance: number; value: number; lower: number; upper: number }[] = [];
  for (const s of spread) {
    const i = end - s.distance;
    if (i < 0 || s.count < 2) continue;
    const value = final.cycle[i];
    out.push({ period: final.periods[i], distance: s.distance, value, lower: value + s.p05, upper: value + s.p95 });
  }
  return out.reverse();
}
