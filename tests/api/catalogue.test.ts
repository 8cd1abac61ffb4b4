import ExcelJS from 'exceljs';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { makeTestApp, type TestApp } from '../helpers/app.js';
import { signedIn } from '../helpers/session.js';
import { asBytes, asText, ndjsonEvents } from '../helpers/parsers.js';

let t: TestApp;
let steward: Awaited<ReturnType<typeof signedIn>>;
let viewer: Awaited<ReturnType<typeof signedIn>>;
let gdpId: number;

beforeAll(async () => {
  t = await makeTestApp({}, { seedDemo: true });
  steward = await signedIn(t, 'steward@demo.test');
  viewer = await signedIn(t, 'viewer@demo.test');
  gdpId = (await t.db('series').where('code', 'EST_GDP_REAL').first()).id;
});
afterAll(async () => {
  await t.close();
});

const counts = async () => ({
  vintages: Number((await t.db('vintages').count({ n: '*' }))[0].n),
  observations: Number((await t.db('observations').count({ n: '*' }))[0].n),
  loads: Number((await t.db('loads').count({ n: '*' }))[0].n),
});

async function newSeries(code: string, frequency: 'A' | 'Q' | 'M' = 'Q', unit = 'index') {
  const res = await steward.post('/api/v1/series').send({ code, title: `Test ${code}`, frequency, unit, seasonalAdjustment: 'sa', source: 'test' }).expect(201);
  return res.body.id as number;
}

const csv = (rows: [string, string][], header = 'period,value') => Buffer.from([header, ...rows.map((r) => r.join(','))].join('\n') + '\n');
const quarters = (start: number, n: number, f: (i: number) => string = (i) => String(100 + i)): [string, string][] =>
  Array.from({ length: n }, (_, i) => [`${start + Math.floor(i / 4)}-Q${(i % 4) + 1}`, f(i)]);

async function xlsx(rows: (string | number | { formula: string } | Date | null)[][]) {
  const wb = new ExcelJS.Workbook();
  const ws = wb.addWorksheet('Data');
  for (const r of rows) ws.addRow(r as ExcelJS.CellValue[]);
  return Buffer.from(await wb.xlsx.writeBuffer());
}

const load = (agent: typeof steward, id: number, file: Buffer, name: string, fields: Record<string, string> = {}, dryRun = false) => {
  let r = agent.post(`/api/v1/series/${id}/vintages${dryRun ? '?dryRun=1' : ''}`).attach('file', file, name);
  for (const [k, v] of Object.entries(fields)) r = r.field(k, v);
  return r;
};

describe('series', () => {
  it('lists the demo Catalogue with each latest vintage', async () => {
    const res = await viewer.get('/api/v1/series').expect(200);
    const gdp = res.body.items.find((s: { code: string }) => s.code === 'EST_GDP_REAL');
    expect(gdp).toMatchObject({ frequency: 'Q', unit: 'EST$ million, chained 2020 prices' });
    expect(gdp.latestVintage.number).toBe(4);
    expect(res.body.items.length).toBeGreaterThanOrEqual(5);
    const filtered = await viewer.get('/api/v1/series?frequency=M').expect(200);
    expect(filtered.body.items.every((s: { frequency: string }) => s.frequency === 'M')).toBe(true);
  });
  it('refuses a duplicate code with 409', async () => {
    const res = await steward.post('/api/v1/series').send({ code: 'EST_GDP_REAL', title: 'x', frequency: 'Q', unit: 'x', seasonalAdjustment: 'sa', source: '' }).expect(409);
    expect(res.body.error.code).toBe('duplicate_code');
  });
  it('validates metadata and says what to fix', async () => {
    const res = await steward.post('/api/v1/series').send({ code: 'bad code', title: '', frequency: 'W', unit: 'x', seasonalAdjustment: 'sa' }).expect(400);
    expect(res.body.error.details.map((d: { path: string }) => d.path)).toEqual(expect.arrayContaining(['code', 'title', 'frequency']));
  });
  it('lets a steward correct metadata, but not the frequency once a vintage exists', async () => {
    await steward.patch(`/api/v1/series/${gdpId}`).send({ notes: 'Corrected note.' }).expect(200);
    const res = await steward.patch(`/api/v1/series/${gdpId}`).send({ frequency: 'M' }).expect(409);
    expect(res.body.error.code).toBe('frequency_locked');
  });
  it('lets only stewards (and admins) create or edit', async () => {
    await viewer.post('/api/v1/series').send({ code: 'X_Y', title: 'x', frequency: 'Q', unit: 'x', seasonalAdjustment: 'sa' }).expect(403);
    const economist = await signedIn(t, 'economist@demo.test');
    await economist.patch(`/api/v1/series/${gdpId}`).send({ title: 'x' }).expect(403);
    const admin = await signedIn(t, 'admin@demo.test');
    await admin.patch(`/api/v1/series/${gdpId}`).send({ source: 'Invented demo data (Republic of Estuary)' }).expect(200);
  });
});

describe('loads in each format', () => {
  it('CSV: the dry run previews and stores nothing; the load stores vintage 1', async () => {
    const id = await newSeries('T_CSV');
    const before = await counts();
    const file = csv(quarters(2000, 12));
    const dry = await load(steward, id, file, 'a.csv', {}, true).expect(200);
    expect(dry.body.preview.series[0]).toMatchObject({ rowCount: 12, firstPeriod: '2000-Q1', lastPeriod: '2002-Q4', errors: 0 });
    expect(await counts()).toEqual(before);
    const res = await load(steward, id, file, 'a.csv', { asOf: '2025-01-31', note: 'first release' }).expect(201);
    expect(res.body.vintage).toMatchObject({ number: 1, asOf: '2025-01-31', rowCount: 12 });
    expect(res.body.vintage.checksum).toMatch(/^[0-9a-f]{64}$/);
    const obs = await viewer.get(`/api/v1/series/${id}/vintages/latest/observations`).expect(200);
    expect(obs.body.periods[0]).toBe('2000-Q1');
    expect(obs.body.values[11]).toBe(111);
  });

  it('XLSX: periods as text or first-of-quarter dates, numbers as numbers', async () => {
    const id = await newSeries('T_XLSX');
    const file = await xlsx([['period', 'value'], ['2001-Q1', 1.5], [new Date(Date.UTC(2001, 3, 1)), 2.5], ['2001-Q3', null], ['2001Q4', 4]]);
    const res = await load(steward, id, file, 'data.xlsx').expect(201);
    expect(res.body.vintage.rowCount).toBe(4);
    const obs = await viewer.get(`/api/v1/series/${id}/vintages/1/observations`).expect(200);
    expect(obs.body).toMatchObject({ periods: ['2001-Q1', '2001-Q2', '2001-Q3', '2001-Q4'], values: [1.5, 2.5, null, 4] });
  });

  it('SDMX-CSV with many series: one transaction makes a vintage for each changed series', async () => {
    const a = await newSeries('T_SDMX_A', 'M');
    const b = await newSeries('T_SDMX_B', 'M');
    const lines = ['STRUCTURE,STRUCTURE_ID,ACTION,FREQ,SERIES_CODE,TIME_PERIOD,OBS_VALUE,UNIT_MEASURE'];
    for (const code of ['T_SDMX_A', 'T_SDMX_B']) for (let m = 1; m <= 12; m++) lines.push(`dataflow,X:Y(1.0),I,M,${code},2020-${String(m).padStart(2, '0')},${m * (code.endsWith('A') ? 1 : 2)},index`);
    const file = Buffer.from(lines.join('\n') + '\n');
    const dry = await steward.post('/api/v1/loads?dryRun=1').attach('file', file, 'bulk.csv').expect(200);
    expect(dry.body.preview.format).toBe('sdmx-csv');
    expect(dry.body.preview.series.map((s: { series: { code: string } }) => s.series.code).sort()).toEqual(['T_SDMX_A', 'T_SDMX_B']);
    const res = await steward.post('/api/v1/loads').attach('file', file, 'bulk.csv').field('asOf', '2025-03-01').expect(201);
    expect(res.body.vintages).toHaveLength(2);
    const va = await viewer.get(`/api/v1/series/${a}/vintages/latest/observations`).expect(200);
    const vb = await viewer.get(`/api/v1/series/${b}/vintages/latest/observations`).expect(200);
    expect(va.body.values[11]).toBe(12);
    expect(vb.body.values[11]).toBe(24);
    // The same series loaded by the single-series route from the SDMX file.
    const again = lines.map((l) => l.replace(/,(\d+),index$/, (_, v) => `,${Number(v) + 0.5},index`)).join('\n');
    const one = await load(steward, a, Buffer.from(again + '\n'), 'bulk2.csv').expect(201);
    expect(one.body.vintage.number).toBe(2);
    expect(one.body.preview.problems.some((p: { message: string }) => /other series in the file/.test(p.message))).toBe(true);
  });

  it('streams progress for a bulk load as NDJSON', async () => {
    await newSeries('T_STREAM', 'A');
    const file = Buffer.from('STRUCTURE,STRUCTURE_ID,ACTION,FREQ,SERIES_CODE,TIME_PERIOD,OBS_VALUE\n' + Array.from({ length: 30 }, (_, i) => `df,X,I,A,T_STREAM,${1990 + i},${i}`).join('\n') + '\n');
    const res = await steward.post('/api/v1/loads').set('Accept', 'application/x-ndjson').attach('file', file, 's.csv').buffer(true).parse(asText as never);
    const events = ndjsonEvents(res.body);
    expect(events.some((e) => e.type === 'progress')).toBe(true);
    expect(events[events.length - 1].type).toBe('result');
    expect(events[events.length - 1].result.vintages[0].code).toBe('T_STREAM');
  });
});

describe('a file with each kind of problem stores nothing and says where', () => {
  let id: number;
  beforeAll(async () => {
    id = await newSeries('T_PROBLEMS');
    await load(steward, id, csv(quarters(2010, 8)), 'ok.csv').expect(201);
  });
  const cases: [string, () => Promise<Buffer> | Buffer, string, RegExp, number | null][] = [
    ['an unparseable period', () => csv([['2010-Q1', '1'], ['soon', '2']]), 'period', /is not a period/, 3],
    ['a period of another frequency', () => csv([['2010-Q1', '1'], ['2010-05', '2']]), 'period', /monthly period, but the series is quarterly/, 3],
    ['a duplicate period', () => csv([['2010-Q1', '1'], ['2010-Q1', '2']]), 'period', /appears again \(first on row 2\)/, 3],
    ['a non-numeric value', () => csv([['2010-Q1', '1'], ['2010-Q2', 'n/a']]), 'value', /is not a number/, 3],
    ['NaN spelled as text', () => csv([['2010-Q1', 'NaN']]), 'value', /leave the cell empty/, 2],
    ['Infinity spelled as text', () => csv([['2010-Q1', 'Infinity']]), 'value', /leave the cell empty/, 2],
    ['a number too large', () => csv([['2010-Q1', '1e999']]), 'value', /too large/, 2],
    ['a decimal comma', () => csv([['2010-Q1', '"1,5"']]), 'value', /comma as the decimal mark/, 2],
    ['a frequency mismatch (SDMX FREQ)', () => Buffer.from('STRUCTURE,STRUCTURE_ID,ACTION,FREQ,SERIES_CODE,TIME_PERIOD,OBS_VALUE\ndf,X,I,M,T_PROBLEMS,2010-Q1,5\n'), 'FREQ', /frequency is M, but the series is Q/, 2],
    ['a formula in an XLSX cell', () => xlsx([['period', 'value'], ['2010-Q1', { formula: '1+1' }]]), 'value', /formula/, 2],
  ];
  for (const [name, make, column, message, row] of cases) {
    it(name, async () => {
      const before = await counts();
      const file = await make();
      const isX = file.readUInt32LE(0) === 0x04034b50;
      const res = await load(steward, id, file, isX ? 'bad.xlsx' : 'bad.csv');
      expect(res.status).toBe(422);
      expect(res.body.error.details.length).toBeGreaterThan(0);
      const hit = res.body.error.details.find((d: { message: string }) => message.test(d.message));
      expect(hit, JSON.stringify(res.body.error.details)).toBeTruthy();
      expect(hit.column.toLowerCase()).toBe(column.toLowerCase());
      expect(hit.row).toBe(row);
      expect(await counts()).toEqual(before);
      // The dry run shows the same problems and stores nothing either.
      const dry = await load(steward, id, file, isX ? 'bad.xlsx' : 'bad.csv', {}, true);
      if (dry.status === 200) expect(dry.body.preview.errors).toBeGreaterThan(0);
      else expect(dry.status).toBe(422);
      expect(await counts()).toEqual(before);
    });
  }
  it('a gap in the sequence is a warning, and the load goes ahead', async () => {
    const rows = quarters(2010, 8).filter((r) => r[0] !== '2011-Q2');
    const dry = await load(steward, id, csv(rows), 'gap.csv', {}, true).expect(200);
    const warning = dry.body.preview.series[0].problems.find((p: { severity: string; message: string }) => p.severity === 'warning' && /gap/.test(p.message));
    expect(warning.message).toMatch(/No row for 2011-Q2/);
    expect(dry.body.preview.canStore).toBe(true);
  });
  it('a unit mismatch is a warning that names both units', async () => {
    const dry = await load(steward, id, csv([['2010-Q1', '5,EUR']].map((r) => [r[0], r[1]]) as [string, string][], 'period,value,unit'), 'u.csv', {}, true).expect(200);
    expect(dry.body.preview.series[0].problems.some((p: { message: string }) => /unit is "EUR", but the series is in "index"/.test(p.message))).toBe(true);
  });
  it('a file identical to the latest vintage is refused as no change', async () => {
    const before = await counts();
    const res = await load(steward, id, csv(quarters(2010, 8)), 'same.csv').expect(409);
    expect(res.body.error.code).toBe('no_change');
    expect(await counts()).toEqual(before);
  });
  it('a future as-of date, a file without a header, and no file at all are refused', async () => {
    await load(steward, id, csv(quarters(2010, 9)), 'f.csv', { asOf: '2999-01-01' }).expect(400);
    const nohead = await load(steward, id, Buffer.from('2010-Q1,1\n2010-Q2,2\n'), 'n.csv').expect(422);
    expect(nohead.body.error.code).toBe('missing_columns');
    const none = await steward.post(`/api/v1/series/${id}/vintages`).field('note', 'x').expect(400);
    expect(none.body.error.code).toBe('file_missing');
  });
});

describe('vintages', () => {
  it('two loads of the same series at the same moment become vintages n and n+1', async () => {
    const id = await newSeries('T_RACE');
    await load(steward, id, csv(quarters(2000, 8)), 'base.csv').expect(201);
    const other = await signedIn(t, 'admin@demo.test');
    const [r1, r2] = await Promise.all([
      load(steward, id, csv(quarters(2000, 9)), 'one.csv'),
      load(other, id, csv(quarters(2000, 10)), 'two.csv'),
    ]);
    expect([r1.status, r2.status]).toEqual([201, 201]);
    expect([r1.body.vintage.number, r2.body.vintage.number].sort()).toEqual([2, 3]);
    const list = await viewer.get(`/api/v1/series/${id}/vintages`).expect(200);
    expect(list.body.items.map((v: { number: number }) => v.number)).toEqual([3, 2, 1]);
    const rows = await t.db('observations as o').join('vintages as v', 'v.id', 'o.vintage_id').where('v.series_id', id).groupBy('v.number').select('v.number').count({ n: '*' });
    expect(Object.fromEntries(rows.map((r) => [(r as { number: number }).number, Number(r.n)]))).toEqual({ 1: 8, 2: r1.body.vintage.number === 2 ? 9 : 10, 3: r1.body.vintage.number === 3 ? 9 : 10 });
  });

  it('answers 409 to any attempt to change a vintage, and the database refuses too', async () => {
    for (const m of ['put', 'patch', 'delete'] as const) {
      const res = await steward[m](`/api/v1/series/${gdpId}/vintages/1`).send({ note: 'x' }).expect(409);
      expect(res.body.error.code).toBe('vintage_immutable');
    }
    await expect(t.db('observations').update({ value: 0 }).limit(1)).rejects.toThrow(/immutable/);
    await expect(t.db('vintages').where('series_id', gdpId).delete()).rejects.toThrow(/immutable/);
  });

  it('lists each vintage with who loaded it and when', async () => {
    const res = await viewer.get(`/api/v1/series/${gdpId}/vintages`).expect(200);
    expect(res.body.items).toHaveLength(4);
    expect(res.body.items[0]).toMatchObject({ number: 4, asOf: '2025-08-14', createdBy: { name: 'Sam Steward' } });
    expect(res.body.items[1].note).toMatch(/Benchmark/);
  });
});

describe('revisions', () => {
  it('between two vintages: which periods changed and by how much', async () => {
    const res = await viewer.get(`/api/v1/series/${gdpId}/revisions?from=2&to=3`).expect(200);
    expect(res.body.summary.new).toBe(1); // 2025-Q1 added
    expect(res.body.summary.revised).toBeGreaterThan(100); // the benchmark revision touches the whole history
    const row = res.body.items.find((r: { period: string }) => r.period === '2000-Q1');
    expect(row.status).toBe('revised');
    expect(row.revision).toBeCloseTo(row.to - row.from, 6);
    expect(row.percent).toBeCloseTo(1.3, 1);
  });
  it('the revision triangle has periods down and vintages across', async () => {
    const res = await viewer.get(`/api/v1/series/${gdpId}/revisions/triangle`).expect(200);
    expect(res.body.vintages.map((v: { number: number }) => v.number)).toEqual([1, 2, 3, 4]);
    const last = res.body.values[res.body.values.length - 1];
    expect(last.slice(0, 3)).toEqual([null, null, null]); // 2025-Q2 exists only in vintage 4
    expect(res.body.periods.length).toBe(res.body.values.length);
  });
});

describe('exports', () => {
  it('CSV, XLSX and SDMX-CSV of a vintage; text cells are safe for spreadsheets', async () => {
    const id = await newSeries('T_EXPORT');
    await steward.patch(`/api/v1/series/${id}`).send({ unit: '=HYPERLINK("http://evil")' }).expect(200);
    await load(steward, id, csv(quarters(2000, 4, (i) => String(-1.5 + i))), 'e.csv').expect(201);
    const c = await viewer.get(`/api/v1/series/${id}/vintages/1/export?format=csv`).expect(200);
    expect(c.headers['content-disposition']).toMatch(/T_EXPORT_v1\.csv/);
    const lines = c.text.trim().split('\n');
    expect(lines[0]).toBe('series_code,period,value,unit,vintage,as_of');
    expect(lines[1]).toContain(',-1.5,');
    expect(lines[1]).toContain(`"'=HYPERLINK(""http://evil"")"`);
    const s = await viewer.get(`/api/v1/series/${id}/vintages/1/export?format=sdmx-csv`).expect(200);
    expect(s.text.split('\n')[0]).toContain('TIME_PERIOD,OBS_VALUE');
    // The SDMX-CSV export loads back as the same data: refused as no change.
    const back = await steward.post(`/api/v1/series/${id}/vintages`).attach('file', Buffer.from(s.text), 'back.csv').expect(409);
    expect(back.body.error.code).toBe('no_change');
    const x = await viewer.get(`/api/v1/series/${id}/vintages/1/export?format=xlsx`).buffer(true).parse(asBytes as never).expect(200);
    const wb = new ExcelJS.Workbook();
    await wb.xlsx.load(x.body as never);
    const ws = wb.worksheets[0];
    expect(ws.getCell('C2').value).toBe(-1.5);
    expect(String(ws.getCell('D2').value)).toMatch(/^'=/);
  });
});

describe('roles', () => {
  it('only stewards and admins load; everyone signed in reads', async () => {
    const economist = await signedIn(t, 'economist@demo.test');
    await load(economist, gdpId, csv(quarters(2000, 4)), 'x.csv').expect(403);
    await load(viewer, gdpId, csv(quarters(2000, 4)), 'x.csv').expect(403);
    await request(t.app).get(`/api/v1/series/${gdpId}/vintages`).expect(401);
    await viewer.get(`/api/v1/series/${gdpId}/vintages/latest/observations`).expect(200);
  });
});
