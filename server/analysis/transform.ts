/** Transforms applied before decomposing (server/schemas/decompose.ts names them). */
import type { Transform } from '../schemas/decompose.js';

/** Returns the transformed copy, or the index of the first non-positive value for a log. */
export function applyTransform(values: ArrayLike<number>, transform: Transform): { ok: Float64Array } | { badIndex: number } {
  const n = values.length;
  const out = new Float64Array(n);
  if (transform === 'none') {
    for (let i = 0; i < n; i++) out[i] = values[i];
    return { ok: out };
  }
  const k = transform === 'log100' ? 100 : 1;
  for (let i = 0; i < n; i++) {
    const v = values[i];
    if (Number.isNaN(v)) {
      out[i] = NaN;
      continue;
    }
    if (!(v > 0)) return { badIndex: i };
    out[i] = k * Math.log(v);
  }
  return { ok: out };
}
