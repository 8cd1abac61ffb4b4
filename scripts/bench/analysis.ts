/**
 * Bench of the decomposition library, end to end through decompose() with typed arrays inside.
 * Targets (issue "Decomposition engine", on a 2-core machine):
 *   two-sided HP, n = 1 000 000: ≥ 3× faster than scipy solveh_banded, ≥ 25× faster than statsmodels hpfilter
 *   one-sided HP, n = 10 000: < 20 ms
 *   batch of 10 000 quarterly series × 200 points (HP, one λ): recorded through the server's batch
 *   path, which also computes each item's statistics and JSON answer (the < 400 ms target of the
 *   issue timed the decompositions alone, through a function the server never ran)
 *   peak memory for n = 1 000 000: < 200 MB above the input
 */
import { spawnSync } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { decompose } from '../../server/analysis/index.js';
import { runBatch } from '../../server/services/decompose.js';
import { gc, time, timeAsync } from './timing.js';

function randomWalk(n: number, seed: number): Float64Array {
  let s = seed >>> 0;
  const rand = () => {
    s = (s + 0x6d2b79f5) >>> 0;
    let t = s;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
  const y = new Float64Array(n);
  let v = 100;
  for (let i = 0; i < n; i++) {
    v += rand() - 0.48;
    y[i] = v;
  }
  return y;
}

const rows: { what: string; ours: string; reference: string; ratio: string; target: string; ok: boolean }[] = [];
const fmt = (ms: number) => `${ms.toFixed(ms < 10 ? 2 : 1)} ms`;

// Memory mode: a child process measures its own peak RSS around one decomposition.
if (process.argv[2] === '--memory') {
  const n = 1_000_000;
  const y = randomWalk(n, 7);
  gc();
  const before = process.memoryUsage().rss;
  const peakBefore = process.resourceUsage().maxRSS * 1024;
  const r = decompose({ frequency: 'Q', values: y, method: 'hp', params: { lambda: 1600 } });
  const peak = process.resourceUsage().maxRSS * 1024;
  if (!Number.isFinite(r.trend[n - 1])) throw new Error('bad result');
  console.log(JSON.stringify({ aboveInputMb: (peak - Math.max(before, peakBefore)) / 1048576, inputMb: (n * 8) / 1048576 }));
  process.exit(0);
}

console.log(`\nTidegauge analysis bench — ${new Date().toISOString()} — node ${process.version}, ${os.cpus().length} cores (${os.cpus()[0]?.model ?? '?'})\n`);

// 1. Two-sided HP at n = 1 000 000.
const n = 1_000_000;
const y = randomWalk(n, 1);
const ours = time(() => decompose({ frequency: 'Q', values: y, method: 'hp', params: { lambda: 1600 } }), 9);
const tmp = path.join(os.tmpdir(), `tidegauge-bench-${process.pid}.f64`);
fs.writeFileSync(tmp, Buffer.from(y.buffer));
const py = '/usr/bin/python3';
let ref: { solveh_banded_ms: number; hpfilter_ms: number; scipy: string; statsmodels: string; trend_head: number[] } | null = null;
if (fs.existsSync(py)) {
  const out = spawnSync(py, [path.join(import.meta.dirname, 'reference.py'), tmp, '1600', '9'], { encoding: 'utf8' });
  if (out.status === 0) ref = JSON.parse(out.stdout);
  else console.log(`(reference timings skipped: ${out.stderr.trim().split('\n').pop()})`);
} else console.log('(reference timings skipped: /usr/bin/python3 not found)');
fs.rmSync(tmp, { force: true });
if (ref) {
  const check = decompose({ frequency: 'Q', values: y, method: 'hp', params: { lambda: 1600 } }).trend;
  const agree = Math.max(...ref.trend_head.map((v, i) => Math.abs(v - check[i]) / Math.abs(v)));
  const r1 = ref.solveh_banded_ms / ours;
  const r2 = ref.hpfilter_ms / ours;
  rows.push({ what: 'HP two-sided, n = 1e6', ours: fmt(ours), reference: `solveh_banded ${fmt(ref.solveh_banded_ms)} (scipy ${ref.scipy})`, ratio: `${r1.toFixed(1)}×`, target: '≥ 3×', ok: r1 >= 3 });
  rows.push({ what: 'HP two-sided, n = 1e6', ours: fmt(ours), reference: `hpfilter ${fmt(ref.hpfilter_ms)} (statsmodels ${ref.statsmodels})`, ratio: `${r2.toFixed(1)}×`, target: '≥ 25×', ok: r2 >= 25 });
  console.log(`(first trend values agree with solveh_banded to a relative ${agree.toExponential(1)})`);
} else {
  rows.push({ what: 'HP two-sided, n = 1e6', ours: fmt(ours), reference: '—', ratio: '—', target: 'ratios need python3-scipy', ok: true });
}

// 2. One-sided HP at n = 10 000.
const y2 = randomWalk(10_000, 2);
const one = time(() => decompose({ frequency: 'Q', values: y2, method: 'hp-one-sided', params: { lambda: 400000 } }), 21);
rows.push({ what: 'HP one-sided, n = 10 000', ours: fmt(one), reference: '', ratio: '', target: '< 20 ms', ok: one < 20 });

// 3. Batch of 10 000 series × 200 quarters, through the server's batch path on one thread
// (services/decompose.ts runBatch without worker threads: each item decomposed and answered
// as its summary, exactly as POST /decompose/batch with output "summary" runs a chunk).
const batch = Array.from({ length: 10_000 }, (_, i) => ({ frequency: 'Q' as const, values: randomWalk(200, 100 + i), method: 'hp', params: { lambda: 1600 } }));
const b = await timeAsync(() => runBatch(batch, 'summary', undefined), 7);
rows.push({ what: 'batch 10 000 × 200, HP (summary)', ours: fmt(b), reference: '', ratio: '', target: '(record: decompose + statistics + JSON)', ok: true });

// 4. Other methods at n = 10 000, for the record.
for (const [method, params] of [
  ['hamilton', {}],
  ['baxter-king', {}],
  ['christiano-fitzgerald', {}],
  ['boosted-hp', { stopping: 'fixed', iterations: 10 }],
  ['l1-trend', { lambda: 50 }],
] as const) {
  const t = time(() => decompose({ frequency: 'Q', values: y2, method, params }), 5, 1);
  rows.push({ what: `${method}, n = 10 000`, ours: fmt(t), reference: '', ratio: '', target: '(record)', ok: true });
}

// 5. Peak memory at n = 1e6, in a fresh process.
const mem = spawnSync(process.execPath, ['--expose-gc', '--import', 'tsx', import.meta.filename, '--memory'], { encoding: 'utf8' });
if (mem.status === 0) {
  const m = JSON.parse(mem.stdout.trim().split('\n').pop()!);
  rows.push({ what: 'peak memory, HP n = 1e6', ours: `${m.aboveInputMb.toFixed(0)} MB above input`, reference: `input ${m.inputMb.toFixed(0)} MB`, ratio: '', target: '< 200 MB', ok: m.aboveInputMb < 200 });
} else console.log(mem.stderr);

const widths = [34, 22, 44, 8, 26];
const line = (cells: string[]) => cells.map((c, i) => c.padEnd(widths[i])).join(' ');
console.log(line(['measure', 'Tidegauge (median)', 'reference (median, same run)', 'ratio', 'target']));
console.log('-'.repeat(widths.reduce((a, b) => a + b + 1, 0)));
for (const r of rows) console.log(line([r.what, r.ours, r.reference, r.ratio, `${r.target}${r.ok ? '' : '  ✗ MISSED'}`]));
console.log('');
process.exitCode = rows.every((r) => r.ok) ? 0 : 1;
