/** Numbers as the API answers them: NaN and infinities become null (API.md: never NaN). */

export const finiteOrNull = (v: number | null | undefined): number | null => (v === null || v === undefined || !Number.isFinite(v) ? null : v);

/** A flat record of numbers with every non-finite value as null. */
export function finiteRecord(record: object): Record<string, number | null> {
  const out: Record<string, number | null> = {};
  for (const [k, v] of Object.entries(record)) out[k] = typeof v === 'number' ? finiteOrNull(v) : null;
  return out;
}
