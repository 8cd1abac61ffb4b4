/**
 * Numbers as people read them, shared by the server and the client: a stored value shown as it
 * was loaded (the shortest decimal that gives back the stored double, which is what the file
 * said for any value written with up to 15 significant digits), revisions rounded to the decimals
 * of the values they compare, and computed numbers in files to a documented precision.
 *
 * Example: decimalsOf(177.93) → 2; revisionOf(177.93, 178.64) → 0.71 (not 0.7099999999999795);
 *          asLoaded(1234.5) → "1,234.5".
 */

/** Significant digits of computed numbers (trend, cycle) in downloads: more than any published figure needs. */
export const COMPUTED_DIGITS = 10;

/** Decimals of the shortest round-trip form of `v` (at most 12). */
export function decimalsOf(v: number): number {
  if (!Number.isFinite(v)) return 0;
  const s = String(Math.abs(v));
  const exp = /e([+-]\d+)$/.exec(s);
  const mantissa = exp ? s.slice(0, exp.index) : s;
  const dot = mantissa.indexOf('.');
  const d = (dot < 0 ? 0 : mantissa.length - dot - 1) - (exp ? Number(exp[1]) : 0);
  return Math.min(12, Math.max(0, d));
}

/** Rounds to `d` decimals through the decimal form (no binary noise left). */
export const roundTo = (v: number, d: number) => Number(v.toFixed(d));

/** The revision `to − from`, with as many decimals as the more precise of the two values. */
export function revisionOf(from: number, to: number): number {
  return roundTo(to - from, Math.max(decimalsOf(from), decimalsOf(to)));
}

/** A stored value as loaded: thousands separated, with exactly its own decimals. */
export function asLoaded(v: number | null | undefined, decimals?: number): string {
  if (v === null || v === undefined || !Number.isFinite(v)) return '—';
  const d = decimals ?? decimalsOf(v);
  return v.toLocaleString('en-US', { minimumFractionDigits: d, maximumFractionDigits: d });
}

/** A computed number for a file: `COMPUTED_DIGITS` significant digits, shortest form. */
export const computedForFile = (v: number) => Number(v.toPrecision(COMPUTED_DIGITS));
