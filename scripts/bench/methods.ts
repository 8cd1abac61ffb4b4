/**
 * Bench of the methods of issue 13, with statsmodels timed in the same run. Targets (2-core machine):
 *   uc fit at n = 200: at least 10× faster than statsmodels' UnobservedComponents fit of the same model
 *   reliability table, 8 methods × 100 vintages: under 1 s (decompositions on one thread here; the
 *     server spreads them over its worker threads)
 *   range of 8 methods at n = 200: under 50 ms
 * Figures are medians.
 */
import { spawnSync } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { decompose } from '../../server/analysis/index.js';
import { rangeAcross } from '../../server/analysis/range.js';
import { realtimeReliability, revisionSpread } from '../../server/analysis/realtime.js';
import { time } from './timing.js';

const csv = fs.readFileSync(path.join(import.meta.dirname, '..', '..', 'datasets/reference/us-macrodata-1959q1-2009q3.csv'), 'utf8').trim().split('\n').slice(1);
const logGdp = Float64Array.from(csv.map((l) => 100 * Math.log(Number(l.split(',')[2]))));
const rows: { what: string; ours: string; reference: string; ratio: string; target: string; ok: boolean }[] = [];
const fmt = (ms: number) => `${ms.toFixed(ms < 10 ? 2 : 1)} ms`;
console.log(`\nTidegauge methods bench — ${new Date().toISOString()} — node ${process.version}, ${os.cpus().length} cores, load average ${os.loadavg()[0].toFixed(1)}\n`);

// 1. uc fit at n = 200 against statsmodels.
const y200 = logGdp.subarray(0, 200);
for (const trend of ['local-linear', 'random-walk-drift']) {
  let loglike = 0;
  const ours = time(() => (loglike = decompose({ frequency: 'Q', values: y200, method: 'uc', params: { trend } }).diagnostics.loglike as number), 9);
  const tmp = path.join(os.tmpdir(), `tidegauge-uc-${process.pid}.f64`);
  fs.writeFileSync(tmp, Buffer.from(Float64Array.from(y200).buffer));
  const out = spawnSync('/usr/bin/python3', [path.join(import.meta.dirname, 'uc_reference.py'), tmp, '9', trend], { encoding: 'utf8' });
  fs.rmSync(tmp, { force: true });
  if (out.status === 0) {
    const ref = JSON.parse(out.stdout);
    const ratio = ref.fit_ms / ours;
    rows.push({ what: `uc fit (${trend}), n = 200`, ours: fmt(ours), reference: `UnobservedComponents.fit ${fmt(ref.fit_ms)} (statsmodels ${ref.statsmodels})`, ratio: `${ratio.toFixed(1)}×`, target: '≥ 10×', ok: ratio >= 10 });
    console.log(`(uc ${trend}: our log-likelihood ${loglike.toFixed(6)}, statsmodels' ${ref.loglike.toFixed(6)})`);
  } else rows.push({ what: `uc fit (${trend}), n = 200`, ours: fmt(ours), reference: `skipped: ${out.stderr.trim().split('\n').pop()}`, ratio: '—', target: 'needs python3-statsmodels', ok: true });
}

// 2. The reliability table: 8 methods on 100 vintages (the quarterly series growing from 100 to 199 periods).
const METHODS: { method: string; params?: Record<string, unknown> }[] = [
  { method: 'hp' },
  { method: 'hp-one-sided' },
  { method: 'hamilton' },
  { method: 'baxter-king' },
  { method: 'christiano-fitzgerald' },
  { method: 'hamilton-average' },
  { method: 'hp-forecast' },
  { method: 'bn-filter' },
];
const periods = Array.from({ length: 200 }, (_, i) => `${1959 + Math.floor(i / 4)}-Q${(i % 4) + 1}`);
const reliabilityMs = time(() => {
  for (const m of METHODS) {
    const vintages = Array.from({ length: 100 }, (_, v) => ({ periods: periods.slice(0, 100 + v), cycle: decompose({ frequency: 'Q', values: logGdp.subarray(0, 100 + v), ...m }).cycle }));
    const final = vintages.pop()!;
    realtimeReliability(vintages, final);
    revisionSpread(vintages, final, 8);
  }
}, 5, 1);
rows.push({ what: 'reliability, 8 methods × 100 vintages', ours: fmt(reliabilityMs), reference: 'one thread', ratio: '', target: '< 1 000 ms', ok: reliabilityMs < 1000 });
const ucVintages = time(() => {
  for (let v = 0; v < 100; v++) decompose({ frequency: 'Q', values: logGdp.subarray(0, 100 + v), method: 'uc' });
}, 3, 1);
rows.push({ what: 'reliability, uc alone × 100 vintages', ours: fmt(ucVintages), reference: 'one thread', ratio: '', target: '(record)', ok: true });

// 3. The range of 8 methods at n = 200.
const rangeMs = time(() => rangeAcross(METHODS.map((m) => decompose({ frequency: 'Q', values: y200, ...m }).cycle)), 15);
rows.push({ what: 'range of 8 methods, n = 200', ours: fmt(rangeMs), reference: '', ratio: '', target: '< 50 ms', ok: rangeMs < 50 });

const widths = [40, 20, 52, 8, 20];
const line = (cells: string[]) => cells.map((c, i) => c.padEnd(widths[i])).join(' ');
console.log(line(['measure', 'Tidegauge (median)', 'reference (median, same run)', 'ratio', 'target']));
console.log('-'.repeat(widths.reduce((a, b) => a + b + 1, 0)));
for (const r of rows) console.log(line([r.what, r.ours, r.reference, r.ratio, `${r.target}${r.ok ? '' : '  ✗ MISSED'}`]));
console.log('');
process.exitCode = rows.every((r) => r.ok) ? 0 : 1;
