/** Issue 12: a series' whole release history loaded from one file (wide or long, CSV or XLSX). */
import ExcelJS from 'exceljs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { makeTestApp, type TestApp } from '../helpers/app.js';
import { signedIn } from '../helpers/session.js';
import { csvOf, quarterRows, utc, withDanglingReferences, workbook, type Cell } from '../helpers/history-files.js';
import { asBytes } from '../helpers/parsers.js';

let t: TestApp;
let steward: Awaited<ReturnType<typeof signedIn>>;
let viewer: Awaited<ReturnType<typeof signedIn>>;

beforeAll(async () => {
  t = await makeTestApp({}, { seedDemo: true });
  steward = await signedIn(t, 'steward@demo.test');
  viewer = await signedIn(t, 'viewer@demo.test');
});
afterAll(async () => {
  await t.close();
});

const counts = async () => ({
  vintages: Number((await t.db('vintages').count({ n: '*' }))[0].n),
  observations: Number((await t.db('observations').count({ n: '*' }))[0].n),
  loads: Number((await t.db('loads').count({ n: '*' }))[0].n),
});

async function newSeries(code: string, frequency: 'Q' | 'M' = 'Q') {
  await steward.post('/api/v1/series').send({ code, title: `History ${code}`, frequency, unit: 'index', seasonalAdjustment: 'sa', source: 'test' }).expect(201);
  return code;
}

function post(agent: typeof steward, code: string, file: Buffer, name: string, fields: Record<string, string> = {}, dryRun = false) {
  let r = agent.post(`/api/v1/series/${code}/history${dryRun ? '?dryRun=1' : ''}`).attach('file', file, name);
  for (const [k, v] of Object.entries(fields)) r = r.field(k, v);
  return r;
}

const vintagesOf = async (code: string) => (await t.db('vintages as v').join('series as s', 's.id', 'v.series_id').where('s.code', code).orderBy('v.number').select('v.number', 'v.as_of', 'v.checksum', 'v.row_count')).map((r) => ({ ...r, as_of: String(r.as_of) }));

/** The release table of `code` as CSV and XLSX, each loaded into a new series: both hold `code`'s vintages. */
async function expectLoadsBack(code: string, copies: [string, string]) {
  const csv = await viewer.get(`/api/v1/series/${code}/history?format=csv`).expect(200);
  const xlsx = await viewer.get(`/api/v1/series/${code}/history?format=xlsx`).buffer(true).parse(asBytes as never).expect(200);
  const original = await vintagesOf(code);
  for (const [copy, file, name] of [[copies[0], Buffer.from(csv.text), 'back.csv'], [copies[1], xlsx.body as Buffer, 'back.xlsx']] as const) {
    await newSeries(copy);
    await post(steward, copy, file, name).expect(201);
    expect(await vintagesOf(copy), name).toEqual(original);
  }
  return csv.text;
}

// Wide, with a title row, a note row, the release dates in a row above the header, an empty release
// column and one identical to the release before it. Three releases: 8, 9 and 10 quarters.
const release = (n: number, bump: number) => (i: number) => (i < n ? 100 + i + bump : null);
const WIDE: Cell[][] = [
  ['Real GDP, invented for the tests', null, null, null, null, null],
  ['Index; seasonally adjusted', null, null, null, null, null],
  ['release date', '2020-01-15', '2020-02-01', '2020-04-15', '2020-05-01', '2020-07-15'],
  ['period', '2019Q4', 'empty', '2020Q1', 'same as before', '2020Q2'],
  ...quarterRows(10, (i) => null).map(([p], i) => [p, release(8, 0)(i), null, release(9, 0.5)(i), release(9, 0.5)(i), release(10, 0.25)(i)]),
  ['Source: invented.', null, null, null, null, null],
];

describe('wide CSV', () => {
  it('previews what it detected and stores nothing; then stores each release as a vintage in release order', async () => {
    const code = await newSeries('T_HIST_WIDE');
    const before = await counts();
    const dry = await post(steward, code, csvOf(WIDE), 'gdp.csv', {}, true).expect(200);
    const p = dry.body.preview;
    expect(p).toMatchObject({ layout: 'wide', headerRow: 4, releaseDateRow: 3, detected: { layout: true, headerRow: true, releaseDateRow: true }, errors: 0, canStore: true });
    expect(p.headers[0]).toMatchObject({ column: 'B', text: '2019Q4', asOf: '2020-01-15', readAs: 'released 2020-01-15 (row 3)' });
    expect(dry.body.vintages.map((v: { number: number; asOf: string; rowCount: number; column: string }) => [v.number, v.asOf, v.rowCount, v.column])).toEqual([
      [1, '2020-01-15', 8, 'B'],
      [2, '2020-04-15', 9, 'D'],
      [3, '2020-07-15', 10, 'F'],
    ]);
    expect(dry.body.vintages[1].changes).toMatchObject({ revised: 8, new: 1, unchanged: 0, meanRevision: 0.5 });
    expect(dry.body.skipped).toEqual([
      { column: 'C', label: 'empty', reason: 'empty: no values' },
      { column: 'E', label: 'same as before', reason: 'identical to the release before it (D, 2020Q1)' },
    ]);
    expect(await counts()).toEqual(before);

    const res = await post(steward, code, csvOf(WIDE), 'gdp.csv').expect(201);
    expect(res.body.vintages.map((v: { number: number; asOf: string; label: string; rowCount: number }) => ({ number: v.number, asOf: v.asOf, label: v.label, rowCount: v.rowCount }))).toEqual([
      { number: 1, asOf: '2020-01-15', label: '2019Q4', rowCount: 8 },
      { number: 2, asOf: '2020-04-15', label: '2020Q1', rowCount: 9 },
      { number: 3, asOf: '2020-07-15', label: '2020Q2', rowCount: 10 },
    ]);
    expect(await counts()).toEqual({ vintages: before.vintages + 3, observations: before.observations + 27, loads: before.loads + 1 });
    const ids = (await t.db('vintages as v').join('series as s', 's.id', 'v.series_id').where('s.code', code).select('v.id')).map((r) => r.id);
    expect(await t.db('vintage_metadata').whereIn('vintage_id', ids).count({ n: '*' })).toEqual([{ n: 3 }]);
    const asOf = await viewer.get(`/api/v1/series/${code}/observations?asOf=2020-05-30`).expect(200);
    expect(asOf.body).toMatchObject({ vintage: { number: 2, asOf: '2020-04-15' } });
    expect(asOf.body.values.slice(0, 2)).toEqual([100.5, 101.5]);
    expect(asOf.body.periods).toHaveLength(9);
  });

  it('refuses releases dated before the latest stored vintage with 409 and stores nothing', async () => {
    const code = await newSeries('T_HIST_ORDER');
    await post(steward, code, csvOf(WIDE), 'gdp.csv').expect(201);
    const before = await counts();
    const late: Cell[][] = [['release date', '2020-06-01', '2020-10-15'], ['period', 'a', 'b'], ...quarterRows(11, (i) => 200 + i).map(([p, v]) => [p, v, Number(v) + 1])];
    const dry = await post(steward, code, csvOf(late), 'late.csv', {}, true).expect(200);
    expect(dry.body.preview.canStore).toBe(false);
    expect(dry.body.preview.problems).toContainEqual(expect.objectContaining({ row: 1, column: 'B', severity: 'error', message: expect.stringMatching(/before the latest stored vintage \(3, 2020-07-15\)/) }));
    const res = await post(steward, code, csvOf(late), 'late.csv').expect(409);
    expect(res.body.error.code).toBe('release_before_latest');
    expect(res.body.error.message).toMatch(/pinned by studies and exhibits/);
    expect(await counts()).toEqual(before);
  });

  it('reports every problem by row and column, stores nothing, and lets only stewards load', async () => {
    const code = await newSeries('T_HIST_BAD');
    const bad: Cell[][] = [['period', '2020-01-15', 'next release', '2020-07-15'], ['2000-Q1', 1, 2, 3], ['2000-Q2', '1,5', 2, 3], ['2000-Q2', 2, 2, 3], ['2000-Q4', 'n/a', 2, 3]];
    const before = await counts();
    const res = await post(steward, code, csvOf(bad), 'bad.csv').expect(422);
    expect(res.body.error.code).toBe('file_has_errors');
    const where = res.body.error.details.map((d: { row: number; column: string }) => `${d.row}:${d.column}`);
    expect(where).toEqual(expect.arrayContaining(['1:C', '3:B', '4:D', '5:B']));
    expect(res.body.error.details.find((d: { row: number; column: string }) => d.row === 4 && d.column === 'D').message).toMatch(/2000-Q2 appears again \(first on row 3\)/);
    expect(res.body.error.details.find((d: { row: number }) => d.row === 3).message).toMatch(/comma as the decimal mark/);
    for (const who of ['viewer@demo.test', 'economist@demo.test']) {
      const agent = who === 'viewer@demo.test' ? viewer : await signedIn(t, who);
      await post(agent, code, csvOf(WIDE), 'gdp.csv').expect(403);
    }
    const none = await steward.post(`/api/v1/series/${code}/history`).field('layout', 'wide').expect(400);
    expect(none.body.error.code).toBe('file_missing');
    const wrongLayout = await post(steward, code, csvOf(WIDE), 'gdp.csv', { layout: 'diagonal' }).expect(400);
    expect(wrongLayout.body.error.message).toMatch(/wide or long/);
    expect(await counts()).toEqual(before);
  });
});

describe('wide XLSX from a statistics office', () => {
  // Sheet 1: notes. Sheet "GDP": merged title, header spellings read as dates, numbers as text,
  // period cells as dates inside their quarter. Sheet "Dated": the same with a release-date row.
  const spellings = ['2001Q1', '2001q2', '2001-Q3', '2001:Q4', '2002-02', '2002-05-25'];
  const gdpRows: Cell[][] = [
    ['Gross domestic product, volume (invented)', null, null, null, null, null, null],
    [null],
    ['Quarter', ...spellings],
    ...Array.from({ length: 8 }, (_, i) => [utc(`${2000 + Math.floor(i / 4)}-${String((i % 4) * 3 + 2).padStart(2, '0')}-15`), ...spellings.map((_, k) => (i < 3 + k ? String(50 + i + k / 10) : null))]),
  ];
  const datedRows: Cell[][] = [['Industrial production (invented)'], ['Released', utc('2021-03-01'), utc('2021-06-01')], ['period', 'first', 'second'], ...quarterRows(4, (i) => 10 + i).map(([p, v]) => [p, v, Number(v) + 0.1])];

  it('reads the chosen sheet despite references to missing parts, and says how each header was read', async () => {
    const file = await withDanglingReferences(await workbook([{ name: 'Notes', rows: [['These figures are invented.']] }, { name: 'GDP', rows: gdpRows, merge: ['A1:G1'] }, { name: 'Dated', rows: datedRows }]));
    // exceljs on its own stops on this file: the test's workbook really has the dangling references.
    await expect(new ExcelJS.Workbook().xlsx.load(file as unknown as ArrayBuffer)).rejects.toThrow();
    const code = await newSeries('T_HIST_XLSX');
    const dry = await post(steward, code, file, 'office.xlsx', { sheet: 'GDP' }, true).expect(200);
    const p = dry.body.preview;
    expect(p).toMatchObject({ format: 'xlsx', sheets: ['Notes', 'GDP', 'Dated'], sheet: 'GDP', layout: 'wide', headerRow: 3, releaseDateRow: null, errors: 0 });
    expect(p.headers.map((h: { asOf: string }) => h.asOf)).toEqual(['2001-01-01', '2001-04-01', '2001-07-01', '2001-10-01', '2002-02-01', '2002-05-25']);
    expect(p.headers[1].readAs).toBe('the period 2001-Q2, dated its first day 2001-04-01');
    expect(p.problems).toContainEqual(expect.objectContaining({ severity: 'warning', message: expect.stringMatching(/refers to 2 parts it does not contain/) }));
    const stored = await post(steward, code, file, 'office.xlsx', { sheet: 'GDP' }).expect(201);
    expect(stored.body.vintages.map((v: { rowCount: number }) => v.rowCount)).toEqual([3, 4, 5, 6, 7, 8]);
    const last = await viewer.get(`/api/v1/series/${code}/vintages/6/observations`).expect(200);
    expect(last.body.periods.slice(0, 2)).toEqual(['2000-Q1', '2000-Q2']);
    expect(last.body.values.slice(0, 2)).toEqual([50.5, 51.5]);

    const other = await newSeries('T_HIST_XLSX2');
    const dated = await post(steward, other, file, 'office.xlsx', { sheet: 'dated' }).expect(201);
    expect(dated.body.preview).toMatchObject({ sheet: 'Dated', headerRow: 3, releaseDateRow: 2 });
    expect(dated.body.vintages.map((v: { asOf: string }) => v.asOf)).toEqual(['2021-03-01', '2021-06-01']);
    const missing = await post(steward, other, file, 'office.xlsx', { sheet: 'Prices' }, true).expect(400);
    expect(missing.body.error.message).toMatch(/no sheet named "Prices".*"Notes", "GDP", "Dated"/);
    // Without a sheet named: the first with periods down its first column, not the notes before it.
    expect((await post(steward, other, file, 'office.xlsx', {}, true).expect(200)).body.preview.sheet).toBe('GDP');
  });

  it('takes headerRow and releaseDateRow when given, and refuses a zip bomb as single loads do', async () => {
    const code = await newSeries('T_HIST_ROWS');
    const file = await workbook([{ name: 'Dated', rows: datedRows }]);
    const res = await post(steward, code, file, 'd.xlsx', { headerRow: '3', releaseDateRow: '2' }, true).expect(200);
    expect(res.body.preview.detected).toEqual({ layout: true, headerRow: false, releaseDateRow: false });
    expect(res.body.vintages).toHaveLength(2);
    const bomb = Buffer.from('PK\u0003\u0004not a real archive');
    const refused = await post(steward, code, bomb, 'x.xlsx').expect(422);
    expect(refused.body.error.code).toBe('unsafe_workbook');
  });
});

describe('long CSV', () => {
  it('groups rows by the release column (any case) and numbers the releases by date', async () => {
    const code = await newSeries('T_HIST_LONG', 'M');
    const rows: Cell[][] = [['Period', 'Value', 'Release_Date']];
    for (const [asOf, n] of [['2021-02-10', 14], ['2021-01-12', 13]] as const) for (let i = 0; i < n; i++) rows.push([`2020-${String((i % 12) + 1).padStart(2, '0')}`.replace(/^2020/, String(2020 + Math.floor(i / 12))), 90 + i + (n === 14 ? 0.3 : 0), asOf]);
    const res = await post(steward, code, csvOf(rows), 'long.csv').expect(201);
    expect(res.body.preview).toMatchObject({ layout: 'long', headerRow: 1 });
    expect(res.body.vintages.map((v: { number: number; asOf: string; rowCount: number }) => [v.number, v.asOf, v.rowCount])).toEqual([
      [1, '2021-01-12', 13],
      [2, '2021-02-10', 14],
    ]);
    expect(res.body.preview.problems).toContainEqual(expect.objectContaining({ severity: 'warning', message: expect.stringMatching(/not in date order/) }));
    const v2 = await viewer.get(`/api/v1/series/${code}/observations?asOf=2021-02-10`).expect(200);
    expect(v2.body.periods[13]).toBe('2021-02');
    expect(v2.body.values[0]).toBe(90.3);
  });
});

describe('long XLSX', () => {
  it('reads release dates kept as date cells, and stores what the same table as CSV stores', async () => {
    const rows = (date: (d: string) => Cell): Cell[][] => {
      const out: Cell[][] = [['period', 'value', 'release date']];
      for (const [asOf, n] of [['2021-01-28', 8], ['2021-04-29', 9], ['2021-07-29', 10]] as const) for (let i = 0; i < n; i++) out.push([`${2019 + Math.floor(i / 4)}-Q${(i % 4) + 1}`, 100 + i * 0.5 + (n - 8) * 0.1, date(asOf)]);
      return out;
    };
    const viaCsv = await newSeries('T_HIST_LONG_CSV');
    const viaXlsx = await newSeries('T_HIST_LONG_XLSX');
    await post(steward, viaCsv, csvOf(rows((d) => d)), 'long.csv').expect(201);
    const res = await post(steward, viaXlsx, await workbook([{ name: 'Releases', rows: rows(utc) }]), 'long.xlsx').expect(201);
    expect(res.body.preview).toMatchObject({ format: 'xlsx', layout: 'long', headerRow: 1, errors: 0 });
    expect(res.body.vintages.map((v: { number: number; asOf: string; rowCount: number }) => [v.number, v.asOf, v.rowCount])).toEqual([
      [1, '2021-01-28', 8],
      [2, '2021-04-29', 9],
      [3, '2021-07-29', 10],
    ]);
    const checksums = async (code: string) => (await t.db('vintages as v').join('series as s', 's.id', 'v.series_id').where('s.code', code).orderBy('v.number').select('v.checksum')).map((r) => r.checksum);
    expect(await checksums(viaXlsx)).toEqual(await checksums(viaCsv));
    const v3 = await viewer.get(`/api/v1/series/${viaXlsx}/observations?asOf=2021-07-29`).expect(200);
    expect([v3.body.periods.at(-1), v3.body.values.at(-1)]).toEqual(['2021-Q2', 104.7]);
  });
});

describe('history out', () => {
  it('CSV and XLSX load back into a new series as identical vintages', async () => {
    const code = await newSeries('T_HIST_OUT');
    await post(steward, code, csvOf(WIDE), 'gdp.csv').expect(201);
    expect(await vintagesOf(code)).toHaveLength(3);
    const csv = await viewer.get(`/api/v1/series/${code}/history?format=csv`).expect(200);
    expect(csv.headers['content-disposition']).toMatch(/T_HIST_OUT-history\.csv/);
    const lines = (await expectLoadsBack(code, ['T_HIST_BACK_CSV', 'T_HIST_BACK_XLSX'])).trim().split('\n');
    expect(lines[1]).toBe('release date,2020-01-15,2020-04-15,2020-07-15');
    expect(lines[2]).toBe('period,vintage 1,vintage 2,vintage 3');
    expect(lines[3]).toBe('2000-Q1,100,100.5,100.25');
    expect(lines[12]).toBe('2002-Q2,,,109.25');
  });
});

describe('history out, with missing values', () => {
  it('writes NA for a period a vintage has without a value, so values missing at its ends load back too', async () => {
    const code = await newSeries('T_HIST_NA');
    const single = (rows: string[]) => Buffer.from(['period,value', ...rows].join('\n') + '\n');
    // Vintage 1 has no value for its first and last quarters; vintage 2 fills the last one and misses one inside.
    await steward.post(`/api/v1/series/${code}/vintages`).field('asOf', '2021-01-15').attach('file', single(['2020-Q1,', '2020-Q2,101', '2020-Q3,102', '2020-Q4,']), 'v1.csv').expect(201);
    await steward.post(`/api/v1/series/${code}/vintages`).field('asOf', '2021-04-15').attach('file', single(['2020-Q1,', '2020-Q2,101.5', '2020-Q3,', '2020-Q4,103', '2021-Q1,104']), 'v2.csv').expect(201);
    expect((await vintagesOf(code)).map((v) => v.row_count)).toEqual([4, 5]);
    const lines = (await expectLoadsBack(code, ['T_HIST_NA_CSV', 'T_HIST_NA_XLSX'])).trim().split('\n');
    expect(lines.slice(3)).toEqual(['2020-Q1,NA,NA', '2020-Q2,101,101.5', '2020-Q3,102,NA', '2020-Q4,NA,103', '2021-Q1,,104']);
  });

  it('reads NA in a load as a missing value', async () => {
    const code = await newSeries('T_LOAD_NA');
    const res = await steward.post(`/api/v1/series/${code}/vintages`).attach('file', Buffer.from('period,value\n2020-Q1,100\n2020-Q2,NA\n2020-Q3,\n2020-Q4,103\n'), 'na.csv').expect(201);
    expect(res.body.vintage.rowCount).toBe(4);
    const v = await viewer.get(`/api/v1/series/${code}/vintages/1/observations`).expect(200);
    expect(v.body.values).toEqual([100, null, null, 103]);
  });
});

describe('the demo histories (invented)', () => {
  it('hold at least 80 quarterly releases of real GDP and 150 monthly of industrial production, with a base-year change', async () => {
    const gdp = (await viewer.get('/api/v1/series/EST_GDP_RT').expect(200)).body;
    const ip = (await viewer.get('/api/v1/series/EST_IP_RT').expect(200)).body;
    expect(gdp.vintageCount).toBeGreaterThanOrEqual(80);
    expect(ip.vintageCount).toBeGreaterThanOrEqual(150);
    expect(gdp.source).toMatch(/Invented/);
    expect(ip.notes).toMatch(/Invented/);
    // The base-year change of February 2013 rescales the whole level (old base 0.84 of the new).
    const before = (await viewer.get('/api/v1/series/EST_GDP_RT/observations?asOf=2013-02-14').expect(200)).body;
    const after = (await viewer.get('/api/v1/series/EST_GDP_RT/observations?asOf=2013-02-15').expect(200)).body;
    expect(after.vintage.number).toBe(before.vintage.number + 1);
    expect(after.values[0] / before.values[0]).toBeCloseTo(1 / 0.84, 3);
    // Early revisions are small: the first estimate of 2010-Q1 against the one two years later.
    const first = (await viewer.get('/api/v1/series/EST_GDP_RT/observations?asOf=2010-05-15').expect(200)).body;
    const later = (await viewer.get('/api/v1/series/EST_GDP_RT/observations?asOf=2012-05-15').expect(200)).body;
    const k = first.periods.indexOf('2010-Q1');
    expect(first.periods[first.periods.length - 1]).toBe('2010-Q1');
    expect(Math.abs(later.values[k] / first.values[k] - 1)).toBeLessThan(0.03);
    expect(later.values[k]).not.toBe(first.values[k]);
  });
});
