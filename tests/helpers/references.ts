import fs from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

const here = path.dirname(fileURLToPath(import.meta.url));

/** tests/fixtures/references.json, written by scripts/make_references.py (see its header). */
export const references = JSON.parse(fs.readFileSync(path.join(here, '..', 'fixtures', 'references.json'), 'utf8'));

/** max |a − b| over the entries where b has a value, divided by max |b| (NaN must match NaN). */
export function relativeError(actual: ArrayLike<number | null>, expected: ArrayLike<number | null>): number {
  if (actual.length !== expected.length) return Infinity;
  let maxDiff = 0;
  let scale = 0;
  for (let i = 0; i < expected.length; i++) {
    const e = expected[i];
    const a = actual[i];
    const eMissing = e === null || Number.isNaN(e as number);
    const aMissing = a === null || Number.isNaN(a as number);
    if (eMissing || aMissing) {
      if (eMissing !== aMissing) return Infinity;
      continue;
    }
    maxDiff = Math.max(maxDiff, Math.abs((a as number) - (e as number)));
    scale = Math.max(scale, Math.abs(e as number));
  }
  return scale === 0 ? maxDiff : maxDiff / scale;
}
