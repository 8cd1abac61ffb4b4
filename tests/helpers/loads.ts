/** Large invented loads for the fault, drain and cluster tests. */
import type { Db } from '../../server/db.js';

const code = (prefix: string, s: number) => `${prefix}_${String(s).padStart(3, '0')}`;

/** Defines `count` monthly series `<prefix>_000`, `<prefix>_001`, … (invented, for tests). */
export async function insertMonthlySeries(db: Db, prefix: string, count: number) {
  const rows = Array.from({ length: count }, (_, i) => ({ code: code(prefix, i), title: `Test series ${prefix} ${i} (invented)`, frequency: 'M', unit: 'index', seasonal_adjustment: 'sa', source: 'test' }));
  await db('series').insert(rows);
}

/** One SDMX-CSV file with `months` monthly observations for each of the `count` series. */
export function bigSdmxLoad({ prefix, count, months, shift = 0 }: { prefix: string; count: number; months: number; shift?: number }) {
  const lines = ['STRUCTURE,STRUCTURE_ID,ACTION,FREQ,SERIES_CODE,TIME_PERIOD,OBS_VALUE'];
  for (let s = 0; s < count; s++) {
    for (let m = 0; m < months; m++) lines.push(`df,F:DF(1.0),I,M,${code(prefix, s)},${1980 + Math.floor(m / 12)}-${String((m % 12) + 1).padStart(2, '0')},${(100 + s + m / 10 + shift).toFixed(2)}`);
  }
  return Buffer.from(lines.join('\n') + '\n');
}

/** Reads an NDJSON answer until `until` matches the text so far (then calls `onMatch` once) and to its end. */
export async function readNdjson(res: Response, until?: RegExp, onMatch?: () => void | Promise<void>) {
  const reader = res.body!.getReader();
  const decoder = new TextDecoder();
  let text = '';
  let matched = false;
  for (;;) {
    const { value, done } = await reader.read();
    if (value) text += decoder.decode(value, { stream: true });
    if (until && !matched && until.test(text)) {
      matched = true;
      await onMatch?.();
    }
    if (done) break;
  }
  const events = text.trim().split('\n').filter(Boolean).map((l) => JSON.parse(l) as Record<string, any>);
  return { events, last: events[events.length - 1], matched };
}
