/**
 * Writes the demo workspace's data files to datasets/demo/: an invented economy, the Republic of
 * Estuary, with quarterly real GDP, credit to the private non-financial sector and the
 * credit-to-GDP ratio, monthly industrial production and unemployment, and annual population;
 * four vintages of each with realistic revisions (a benchmark revision among them).
 *
 * Every number is invented. Deterministic: the same files every run (seeded generator).
 *     npm run demo-data
 */
import fs from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { formatPeriod, periodIndex } from '../server/analysis/periods.js';
import type { Frequency } from '../server/schemas/frequency.js';
import { normal, rng } from './lib/random.js';

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..');
const out = path.join(root, 'datasets', 'demo');


interface VintageSpec {
  number: number;
  asOf: string;
  last: string;
  note: string;
  /** Multiplicative revision applied to the "true" series for this vintage. */
  revise: (t: number, n: number, r: () => number) => number;
}

interface SeriesSpec {
  code: string;
  title: string;
  frequency: Frequency;
  unit: string;
  seasonalAdjustment: 'sa' | 'nsa' | 'sca';
  source: string;
  notes: string;
  start: string;
  decimals: number;
  values: (n: number, r: () => number) => number[];
  vintages: VintageSpec[];
}

const SOURCE = 'Invented demo data (Republic of Estuary)';

// Shocks of the invented economy, as quarter offsets from 1995-Q1: a financial crisis from 2008-Q3
// and a sudden stop in 2020-Q2.
const q = (p: string) => periodIndex(p, 'Q')! - periodIndex('1995-Q1', 'Q')!;

function gdpPath(n: number, r: () => number) {
  const out: number[] = [];
  let level = Math.log(180_000);
  let c1 = 0;
  let c2 = 0;
  for (let t = 0; t < n; t++) {
    const growth = 0.0058 - (t > q('2010-Q1') ? 0.0012 : 0);
    let shock = 0.004 * normal(r);
    if (t >= q('2008-Q3') && t <= q('2009-Q2')) shock -= 0.012;
    if (t === q('2020-Q2')) shock -= 0.085;
    if (t === q('2020-Q3')) shock += 0.06;
    const c = 1.35 * c1 - 0.45 * c2 + shock;
    c2 = c1;
    c1 = c;
    level += growth;
    out.push(Math.exp(level + c));
  }
  return out;
}

// Reused by the credit series so that the ratio is consistent with GDP.
let gdpTrue: number[] = [];

const recent = (span: number, sd: number) => (t: number, n: number, r: () => number) => (t >= n - span ? 1 + sd * normal(r) : 1);

const quarterlyVintages = (lasts: string[]): VintageSpec[] => [
  { number: 1, asOf: '2024-11-15', last: lasts[0], note: 'Flash estimate for the third quarter of 2024.', revise: recent(4, 0.002) },
  { number: 2, asOf: '2025-02-14', last: lasts[1], note: 'Fourth-quarter release; the last three quarters revised.', revise: recent(3, 0.0015) },
  {
    number: 3,
    asOf: '2025-05-15',
    last: lasts[2],
    note: 'Benchmark revision: new base year and revised source data from 2015.',
    revise: (t, n, r) => 1.013 * (t > q('2015-Q1') ? 1 + 0.00035 * (t - q('2015-Q1')) : 1) * recent(3, 0.001)(t, n, r),
  },
  { number: 4, asOf: '2025-08-14', last: lasts[3], note: 'Second-quarter release.', revise: recent(3, 0.001) },
];

const SERIES: SeriesSpec[] = [
  {
    code: 'EST_GDP_REAL',
    title: 'Estuary: real gross domestic product',
    frequency: 'Q',
    unit: 'EST$ million, chained 2020 prices',
    seasonalAdjustment: 'sa',
    source: SOURCE,
    notes: 'Invented demo series. Quarterly, seasonally adjusted. The May 2025 vintage is a benchmark revision.',
    start: '1995-Q1',
    decimals: 1,
    values: (n, r) => (gdpTrue = gdpPath(n, r)),
    vintages: quarterlyVintages(['2024-Q3', '2024-Q4', '2025-Q1', '2025-Q2']),
  },
  {
    code: 'EST_CREDIT_PNF',
    title: 'Estuary: credit to the private non-financial sector',
    frequency: 'Q',
    unit: 'EST$ million',
    seasonalAdjustment: 'nsa',
    source: SOURCE,
    notes: 'Invented demo series: bank and market credit to households and non-financial firms, end of quarter.',
    start: '1995-Q1',
    decimals: 0,
    values: (n, r) => creditPath(n, r).credit,
    vintages: quarterlyVintages(['2024-Q3', '2024-Q4', '2025-Q1', '2025-Q2']),
  },
  {
    code: 'EST_CREDIT_GDP',
    title: 'Estuary: credit-to-GDP ratio',
    frequency: 'Q',
    unit: 'percent of GDP',
    seasonalAdjustment: 'nsa',
    source: SOURCE,
    notes: 'Invented demo series: credit to the private non-financial sector over the sum of the last four quarters of nominal GDP.',
    start: '1995-Q1',
    decimals: 2,
    values: (n, r) => creditPath(n, r).ratio,
    vintages: quarterlyVintages(['2024-Q3', '2024-Q4', '2025-Q1', '2025-Q2']),
  },
  {
    code: 'EST_IP',
    title: 'Estuary: industrial production index',
    frequency: 'M',
    unit: 'index, 2021 = 100',
    seasonalAdjustment: 'sca',
    source: SOURCE,
    notes: 'Invented demo series. Seasonally and calendar adjusted. The June 2025 vintage rebases and revises from 2019.',
    start: '1998-01',
    decimals: 1,
    values: (n, r) => {
      const out: number[] = [];
      let level = Math.log(62);
      let c1 = 0;
      for (let t = 0; t < n; t++) {
        let shock = 0.009 * normal(r);
        if (t >= 128 && t <= 137) shock -= 0.018; // 2008-09 to 2009-06
        if (t === 267) shock -= 0.16; // 2020-04
        if (t === 268 || t === 269) shock += 0.07;
        const c = 0.9 * c1 + shock;
        c1 = c;
        level += 0.0016;
        out.push(Math.exp(level + c));
      }
      const base = out.slice(276, 288).reduce((a, b) => a + b, 0) / 12; // 2021 average
      return out.map((v) => (100 * v) / base);
    },
    vintages: [
      { number: 1, asOf: '2025-04-30', last: '2025-03', note: 'March 2025 release.', revise: recent(3, 0.004) },
      { number: 2, asOf: '2025-05-30', last: '2025-04', note: 'April 2025 release.', revise: recent(3, 0.003) },
      { number: 3, asOf: '2025-06-30', last: '2025-05', note: 'Benchmark revision: new weights and survey frame from 2019.', revise: (t, n, r) => (t >= 252 ? 1.021 + 0.0001 * (t - 252) : 1) * recent(3, 0.002)(t, n, r) },
      { number: 4, asOf: '2025-07-31', last: '2025-06', note: 'June 2025 release.', revise: recent(3, 0.002) },
    ],
  },
  {
    code: 'EST_UNEMP',
    title: 'Estuary: unemployment rate',
    frequency: 'M',
    unit: 'percent of the labour force',
    seasonalAdjustment: 'sa',
    source: SOURCE,
    notes: 'Invented demo series from the labour force survey, seasonally adjusted.',
    start: '1998-01',
    decimals: 1,
    values: (n, r) => {
      const out: number[] = [];
      let u = 7.2;
      for (let t = 0; t < n; t++) {
        let drift = -0.006 + 0.03 * (6.0 - u) * 0.02;
        if (t >= 128 && t <= 150) drift += 0.09;
        if (t === 267) drift += 2.6;
        if (t > 268 && t < 290) drift -= 0.1;
        u = Math.max(2.5, u + drift + 0.08 * normal(r));
        out.push(u);
      }
      return out;
    },
    vintages: [
      { number: 1, asOf: '2025-04-30', last: '2025-03', note: 'March 2025 release.', revise: recent(2, 0.01) },
      { number: 2, asOf: '2025-05-30', last: '2025-04', note: 'April 2025 release.', revise: recent(2, 0.01) },
      { number: 3, asOf: '2025-06-30', last: '2025-05', note: 'Survey reweighting to the 2024 census: revised from 2015.', revise: (t, n, r) => (t >= 204 ? 0.985 : 1) * recent(2, 0.008)(t, n, r) },
      { number: 4, asOf: '2025-07-31', last: '2025-06', note: 'June 2025 release.', revise: recent(2, 0.008) },
    ],
  },
  {
    code: 'EST_POP',
    title: 'Estuary: resident population',
    frequency: 'A',
    unit: 'thousands',
    seasonalAdjustment: 'nsa',
    source: SOURCE,
    notes: 'Invented demo series, mid-year estimates.',
    start: '1980',
    decimals: 0,
    values: (n, r) => {
      const out: number[] = [];
      let p = 3150;
      for (let t = 0; t < n; t++) {
        p *= 1.006 + 0.002 * normal(r) - (t > 30 ? 0.002 : 0);
        out.push(p);
      }
      return out;
    },
    vintages: [
      { number: 1, asOf: '2023-06-30', last: '2022', note: 'Mid-year estimate for 2022.', revise: recent(2, 0.002) },
      { number: 2, asOf: '2024-06-28', last: '2023', note: 'Mid-year estimate for 2023.', revise: recent(2, 0.002) },
      { number: 3, asOf: '2025-06-27', last: '2024', note: 'Census-based revision from 2011.', revise: (t, n, r) => (t >= 31 ? 1.008 : 1) * recent(2, 0.001)(t, n, r) },
    ],
  },
];

let creditCache: { credit: number[]; ratio: number[] } | null = null;
function creditPath(n: number, r: () => number) {
  if (creditCache) return creditCache;
  const credit: number[] = [];
  const ratio: number[] = [];
  let deflator = 0.62;
  const nominal: number[] = [];
  for (let t = 0; t < n; t++) {
    deflator *= 1.0055 + 0.001 * normal(r);
    nominal.push(gdpTrue[t] * deflator);
  }
  // A credit boom before the crisis, deleveraging after it, and a milder upswing lately.
  let x = Math.log(0.88);
  for (let t = 0; t < n; t++) {
    let g = 0.002;
    if (t > q('2002-Q1') && t < q('2008-Q3')) g = 0.011;
    if (t >= q('2009-Q1') && t < q('2014-Q1')) g = -0.007;
    if (t > q('2019-Q1')) g = 0.003;
    x += g + 0.004 * normal(r);
    const annual = t >= 3 ? nominal[t] + nominal[t - 1] + nominal[t - 2] + nominal[t - 3] : 4 * nominal[t];
    const c = Math.exp(x) * annual;
    credit.push(c);
    ratio.push((100 * c) / annual);
  }
  creditCache = { credit, ratio };
  return creditCache;
}

fs.mkdirSync(out, { recursive: true });
const manifest: unknown[] = [];
let seed = 20250101;
for (const s of SERIES) {
  const r = rng(seed++);
  const lastAll = s.vintages[s.vintages.length - 1].last;
  const n = periodIndex(lastAll, s.frequency)! - periodIndex(s.start, s.frequency)! + 1;
  const truth = s.values(n, r);
  let current = truth.slice();
  const files: unknown[] = [];
  for (const v of s.vintages) {
    const len = periodIndex(v.last, s.frequency)! - periodIndex(s.start, s.frequency)! + 1;
    const rv = rng(seed * 31 + v.number);
    // Each vintage starts from the previous one's numbers (revisions accumulate), except where the
    // new release revises them.
    current = truth.map((x, t) => (t < current.length ? current[t] : x) * v.revise(t, len, rv));
    const lines = ['period,value'];
    for (let t = 0; t < len; t++) lines.push(`${formatPeriod(periodIndex(s.start, s.frequency)! + t, s.frequency)},${current[t].toFixed(s.decimals)}`);
    const file = `${s.code}_v${v.number}.csv`;
    fs.writeFileSync(path.join(out, file), lines.join('\n') + '\n');
    files.push({ number: v.number, asOf: v.asOf, note: v.note, file, lastPeriod: v.last });
  }
  manifest.push({
    code: s.code,
    title: s.title,
    frequency: s.frequency,
    unit: s.unit,
    seasonalAdjustment: s.seasonalAdjustment,
    source: s.source,
    notes: s.notes,
    vintages: files,
  });
}
fs.writeFileSync(
  path.join(out, 'manifest.json'),
  JSON.stringify({ economy: 'Republic of Estuary', invented: true, note: 'Every number in these files is invented for the Tidegauge demo.', series: manifest }, null, 2) + '\n',
);
fs.writeFileSync(
  path.join(out, 'README.md'),
  `# Demo data — invented\n\nThe Republic of Estuary does not exist. Every number in these files is invented for the Tidegauge demo\nworkspace by \`scripts/make-demo-data.ts\` (deterministic: \`npm run demo-data\` rewrites the same files).\n\n${SERIES.map((s) => `- \`${s.code}\` (${s.frequency}): ${s.title}, ${s.unit}; ${s.vintages.length} vintages`).join('\n')}\n`,
);
console.log(`wrote ${SERIES.length} series to ${path.relative(root, out)}`);
