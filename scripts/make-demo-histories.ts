/**
 * Writes the demo's release histories to datasets/demo/ (run by `npm run demo-data` after
 * make-demo-data.ts): two invented series of the Republic of Estuary with the whole history of
 * their releases, as research teams keep real-time data, one wide table per series (periods down,
 * one column per release, the release dates in the row above the header):
 * - EST_GDP_RT: real GDP, 84 quarterly releases (Nov 2004 to Aug 2025);
 * - EST_IP_RT: industrial production, 156 monthly releases (Aug 2012 to Jul 2025).
 * The revision patterns the trade knows: small early revisions that fade as a period ages, an
 * annual benchmark revision (the GDP release of August, the IP release of June) that revises the
 * last three years, a base-year change that rescales the whole level (GDP from Feb 2013, IP from
 * Feb 2018), and seasonal re-estimation (each GDP release of February, each IP release of
 * January) that moves the seasonally adjusted values of the last three years a little.
 *
 * Every number is invented. Deterministic: a seeded generator, the same files every run.
 */
import fs from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { formatPeriod, periodIndex } from '../server/analysis/periods.js';
import type { Frequency } from '../server/schemas/frequency.js';
import { normal, rng } from './lib/random.js';
import { csvLine } from '../server/importers/export.js';

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..');
const out = path.join(root, 'datasets', 'demo');


interface HistorySpec {
  code: string;
  title: string;
  frequency: Frequency;
  unit: string;
  notes: string;
  start: string;
  /** The last period of the first release, the number of releases, and each release's date (k = 0, 1, …). */
  firstLast: string;
  releases: number;
  releaseDate: (k: number, last: string) => string;
  decimals: number;
  truth: (n: number, r: () => number) => number[];
  /** Periods a year, the first-estimate error's size, the benchmark month and the seasonal month of releases. */
  perYear: number;
  firstError: number;
  benchmarkMonth: number;
  seasonalMonth: number;
  /** The release from which the new base year holds, and the old base's level relative to the new. */
  rebaseFrom: string;
  oldBase: number;
}

function businessCycle(n: number, r: () => number, growth: number, persistence: [number, number], sd: number, shocks: Record<number, number>) {
  const outv: number[] = [];
  let level = 0;
  let c1 = 0;
  let c2 = 0;
  for (let t = 0; t < n; t++) {
    const c = persistence[0] * c1 + persistence[1] * c2 + sd * normal(r) + (shocks[t] ?? 0);
    c2 = c1;
    c1 = c;
    level += growth;
    outv.push(Math.exp(level + c));
  }
  return outv;
}

const HISTORIES: HistorySpec[] = [
  {
    code: 'EST_GDP_RT',
    title: 'Estuary: real GDP, every release since 2004',
    frequency: 'Q',
    unit: 'EST$ million, chained 2020 prices',
    notes: 'Invented demo series: the whole release history of quarterly real GDP (84 releases), with early revisions, August benchmark revisions, a base-year change in February 2013 and seasonal re-estimation each February.',
    start: '1995-Q1',
    firstLast: '2004-Q3',
    releases: 84,
    // Published about 45 days after the quarter: the 15th of the second month after it.
    releaseDate: (_k, last) => {
      const [y, qq] = [Number(last.slice(0, 4)), Number(last.slice(6))];
      const m = qq * 3 + 2;
      return m > 12 ? `${y + 1}-${String(m - 12).padStart(2, '0')}-15` : `${y}-${String(m).padStart(2, '0')}-15`;
    },
    decimals: 1,
    truth: (n, r) => businessCycle(n, r, 0.0055, [1.3, -0.42], 0.004, { 54: -0.012, 55: -0.014, 56: -0.01, 57: -0.006, 101: -0.085, 102: 0.06 }).map((v) => 180_000 * v),
    perYear: 4,
    firstError: 0.004,
    benchmarkMonth: 8,
    seasonalMonth: 2,
    rebaseFrom: '2013-02-15',
    oldBase: 0.84,
  },
  {
    code: 'EST_IP_RT',
    title: 'Estuary: industrial production, every release since 2012',
    frequency: 'M',
    unit: 'index, 2021 = 100',
    notes: 'Invented demo series: the whole release history of the monthly industrial production index (156 releases), with early revisions, June benchmark revisions, a rebasing in February 2018 and seasonal re-estimation each January.',
    start: '1998-01',
    firstLast: '2012-06',
    releases: 156,
    // Published at the end of the following month (the 28th, to keep every month simple).
    releaseDate: (_k, last) => {
      const [y, m] = [Number(last.slice(0, 4)), Number(last.slice(5))];
      return m === 12 ? `${y + 1}-01-28` : `${y}-${String(m + 1).padStart(2, '0')}-28`;
    },
    decimals: 1,
    truth: (n, r) => {
      const v = businessCycle(n, r, 0.0016, [0.9, 0], 0.009, { 128: -0.05, 129: -0.05, 130: -0.04, 267: -0.16, 268: 0.07, 269: 0.07 });
      const base = v.slice(276, 288).reduce((a, b) => a + b, 0) / 12;
      return v.map((x) => (100 * x) / base);
    },
    perYear: 12,
    firstError: 0.008,
    benchmarkMonth: 6,
    seasonalMonth: 1,
    rebaseFrom: '2018-02-01',
    oldBase: 1.12,
  },
];

/** One release's values: the truth with the errors that its age, the benchmarks and the seasonal factors leave. */
function releases(h: HistorySpec) {
  const f = h.frequency;
  const i0 = periodIndex(h.start, f)!;
  const lastIndex = periodIndex(h.firstLast, f)! + h.releases - 1;
  const r = rng(20260101 + h.releases);
  const truth = h.truth(lastIndex - i0 + 1, r);
  const firstError = truth.map(() => h.firstError * normal(r));
  const seasonal = truth.map((_, t) => 0.0015 * Math.cos((2 * Math.PI * (t % h.perYear)) / h.perYear));
  const outv: { asOf: string; last: string; values: number[] }[] = [];
  let benchmarks = 0;
  let seasonalRounds = 0;
  for (let k = 0; k < h.releases; k++) {
    const last = formatPeriod(periodIndex(h.firstLast, f)! + k, f);
    const asOf = h.releaseDate(k, last);
    const month = Number(asOf.slice(5, 7));
    const newMonth = k === 0 || Number(outv[k - 1].asOf.slice(5, 7)) !== month;
    if (newMonth && month === h.benchmarkMonth) benchmarks++;
    if (newMonth && month === h.seasonalMonth) seasonalRounds++;
    const n = periodIndex(last, f)! - i0 + 1;
    const scale = asOf < h.rebaseFrom ? h.oldBase : 1;
    const values = new Array<number>(n);
    for (let t = 0; t < n; t++) {
      const age = n - 1 - t;
      // The first estimate's error fades with each release, and is mostly gone after a benchmark.
      const fade = Math.max(0, 1 - age / (2 * h.perYear)) * (age < 3 * h.perYear ? 1 : 0);
      const bench = age < 3 * h.perYear ? 0.002 * Math.sin(benchmarks * 1.7 + t / h.perYear) : 0;
      const seas = age < 3 * h.perYear ? seasonal[t] * Math.sin(seasonalRounds * 2.3 + t) : 0;
      values[t] = scale * truth[t] * (1 + firstError[t] * fade + bench + seas);
    }
    outv.push({ asOf, last, values });
  }
  return outv;
}

const histories: unknown[] = [];
for (const h of HISTORIES) {
  const rel = releases(h);
  const i0 = periodIndex(h.start, h.frequency)!;
  const longest = rel[rel.length - 1].values.length;
  const kinds = ['text' as const, ...rel.map(() => 'number' as const)];
  const lines = [
    csvLine([`${h.code}: ${h.title} (${h.unit}); invented demo data; release dates in row 2`]),
    csvLine(['release date', ...rel.map((x) => x.asOf)]),
    csvLine(['period', ...rel.map((x) => `data to ${x.last}`)]),
  ];
  for (let t = 0; t < longest; t++) lines.push(csvLine([formatPeriod(i0 + t, h.frequency), ...rel.map((x) => (t < x.values.length ? Number(x.values[t].toFixed(h.decimals)) : null))], kinds));
  const file = `${h.code}_history.csv`;
  fs.writeFileSync(path.join(out, file), lines.join('\n') + '\n');
  histories.push({ code: h.code, title: h.title, frequency: h.frequency, unit: h.unit, seasonalAdjustment: 'sa', source: 'Invented demo data (Republic of Estuary)', notes: h.notes, file, releases: h.releases, first: rel[0].asOf, last: rel[rel.length - 1].asOf });
}
fs.writeFileSync(path.join(out, 'histories.json'), JSON.stringify({ invented: true, note: 'Release histories invented for the Tidegauge demo; loaded as history loads.', histories }, null, 2) + '\n');
fs.appendFileSync(path.join(out, 'README.md'), `\nRelease histories (wide tables, one column per release; \`scripts/make-demo-histories.ts\`):\n\n${HISTORIES.map((h) => `- \`${h.code}\` (${h.frequency}): ${h.title}; ${h.releases} releases`).join('\n')}\n`);
console.log(`wrote ${HISTORIES.length} release histories to ${path.relative(root, out)}`);
