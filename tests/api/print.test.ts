/**
 * Exhibits a research department prints (issue 14), through the API on a real MariaDB: the vector
 * PDF (read with poppler-utils), publication packs (PDF and ZIP), the reference chronology, the
 * publication settings frozen into snapshots, downloads with their header blocks (read with
 * Debian's pandas), numbers as loaded, and comparisons across frequencies.
 */
import { execFileSync, spawnSync } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import ExcelJS from 'exceljs';
import JSZip from 'jszip';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { ExhibitState } from '../../server/schemas/exhibits.js';
import { makeTestApp, type TestApp } from '../helpers/app.js';
import { asBytes } from '../helpers/parsers.js';
import { signedIn } from '../helpers/session.js';

type Agent = Awaited<ReturnType<typeof signedIn>>;
let t: TestApp;
let economist: Agent;
let editor: Agent;
let viewer: Agent;
let admin: Agent;
let ids: Record<string, number>;
const tmp = fs.mkdtempSync(path.join(os.tmpdir(), 'tidegauge-print-'));

beforeAll(async () => {
  t = await makeTestApp({}, { seedDemo: true });
  [economist, editor, viewer, admin] = await Promise.all(['economist', 'editor', 'viewer', 'admin'].map((r) => signedIn(t, `${r}@demo.test`)));
  ids = Object.fromEntries((await t.db('series').select('id', 'code')).map((r) => [r.code, r.id]));
}, 120_000);
afterAll(async () => {
  await t.close();
  fs.rmSync(tmp, { recursive: true, force: true });
});

const move = (who: Agent, id: number, to: ExhibitState) => who.post(`/api/v1/exhibits/${id}/transitions`).send({ to }).expect(200);
async function publish(id: number) {
  await move(economist, id, 'in_review');
  await move(editor, id, 'approved');
  await move(editor, id, 'published');
}
/** Writes bytes to a file and runs a poppler tool on it. */
function poppler(tool: 'pdfinfo' | 'pdffonts' | 'pdftotext', pdf: Buffer) {
  const file = path.join(tmp, `f${Math.random().toString(36).slice(2)}.pdf`);
  fs.writeFileSync(file, pdf);
  return execFileSync(tool, tool === 'pdftotext' ? ['-layout', file, '-'] : [file], { encoding: 'utf8' });
}
const pages = (pdf: Buffer) => Number(/Pages:\s+(\d+)/.exec(poppler('pdfinfo', pdf))![1]);
/** Font rows of pdffonts: name and whether embedded. */
const fonts = (pdf: Buffer) =>
  poppler('pdffonts', pdf)
    .split('\n')
    .slice(2)
    .filter(Boolean)
    .map((l) => ({ name: l.split(/\s+/)[0], embedded: / yes +(yes|no) +(yes|no) /.test(l) }));
const getPdf = (who: Agent, url: string) => who.get(url).buffer(true).parse(asBytes as never);

describe('the reference chronology', () => {
  let chronologyId: number;
  it('is kept by editors and administrators and read by everyone signed in', async () => {
    const body = { name: 'Staff chronology (invented)', area: 'Estuary', turns: [{ period: '2008-Q2', type: 'peak' }, { period: '2009-Q2', type: 'trough' }, { period: '2020-Q1', type: 'peak' }, { period: '2020-Q2', type: 'trough' }] };
    await economist.post('/api/v1/chronologies').send(body).expect(403);
    const res = await editor.post('/api/v1/chronologies').send(body).expect(201);
    chronologyId = res.body.id;
    expect(res.body.turns).toHaveLength(4);
    const list = await viewer.get('/api/v1/chronologies').expect(200);
    expect(list.body.items.map((c: { name: string }) => c.name)).toContain('Staff chronology (invented)');
    expect((await t.db('audit_log').where({ action: 'chronology.create', target_id: String(chronologyId) })).length).toBe(1);
  });

  it('refuses turns that do not alternate, a duplicate name, and stores nothing then', async () => {
    const bad = await admin.post('/api/v1/chronologies').send({ name: 'Broken', area: 'Estuary', turns: [{ period: '2008-Q2', type: 'peak' }, { period: '2009-Q2', type: 'peak' }] }).expect(400);
    expect(bad.body.error.message).toMatch(/alternate/);
    await admin.post('/api/v1/chronologies').send({ name: 'Staff chronology (invented)', area: 'x' }).expect(409);
    await admin.post('/api/v1/chronologies').send({ name: 'Bad period', area: 'x', turns: [{ period: '2008Q2', type: 'peak' }] }).expect(400);
    expect(await t.db('chronologies').whereIn('name', ['Broken', 'Bad period']).count({ n: '*' })).toEqual([{ n: 0 }]);
    expect(await t.db('chronologies').where('name', 'Staff chronology (invented)').count({ n: '*' })).toEqual([{ n: 1 }]);
  });

  it('offers the Harding–Pagan dates of a series as a starting point, storing nothing', async () => {
    const res = await editor.post('/api/v1/chronologies/from-series').send({ seriesId: ids.EST_GDP_REAL }).expect(200);
    expect(res.body.turns.length).toBeGreaterThan(0);
    for (let i = 1; i < res.body.turns.length; i++) expect(res.body.turns[i].type).not.toBe(res.body.turns[i - 1].type);
    expect(res.body.turns.every((x: { period: string }) => /^\d{4}-Q[1-4]$/.test(x.period))).toBe(true);
    // The starting point saves as a chronology of its own, in one go.
    const saved = await editor.post('/api/v1/chronologies').send({ name: 'From GDP', area: 'Estuary', turns: res.body.turns }).expect(201);
    expect(saved.body.turns).toEqual([...res.body.turns].sort((a, b) => a.period.localeCompare(b.period)));
    await editor.delete(`/api/v1/chronologies/${saved.body.id}`).expect(200);
  });

  it('replaces the turns as a whole when changed', async () => {
    const res = await admin.patch(`/api/v1/chronologies/${chronologyId}`).send({ turns: [{ period: '2008-Q2', type: 'peak' }, { period: '2009-Q2', type: 'trough' }] }).expect(200);
    expect(res.body.turns).toEqual([{ period: '2008-Q2', type: 'peak' }, { period: '2009-Q2', type: 'trough' }]);
  });

  describe('an exhibit that shades it, as published', () => {
    let exhibitId: number;
    beforeAll(async () => {
      await admin.put('/api/v1/settings').send({ institutionName: 'Research Department (invented)', sourceLineWording: 'Sources: {sources}; Research Department calculations.' }).expect(200);
      const study = (await economist.post('/api/v1/studies').send({ title: 'Gap', seriesId: ids.EST_GDP_REAL, vintage: 'latest', transform: 'log100', method: 'hp', params: {} }).expect(201)).body;
      exhibitId = (await economist.post('/api/v1/exhibits').send({ studyId: study.id, title: 'The output gap, with the staff chronology', subtitle: 'Real GDP', number: 'Chart 3', chronologyId }).expect(201)).body.id;
      await publish(exhibitId);
      // A later change of the settings does not reach what was published.
      await admin.put('/api/v1/settings').send({ institutionName: 'Renamed afterwards' }).expect(200);
    });

    it('freezes the chronology and the printed frame into the snapshot', async () => {
      const ex = (await viewer.get(`/api/v1/exhibits/${exhibitId}`).expect(200)).body;
      expect(ex.snapshot.chronology).toMatchObject({ name: 'Staff chronology (invented)', contractions: [{ peak: '2008-Q2', trough: '2009-Q2' }] });
      expect(ex.snapshot.publication).toEqual({ number: 'Chart 3', institution: 'Research Department (invented)', sourceLine: expect.stringMatching(/^Sources: .+; Research Department calculations\.$/) });
      await editor.delete(`/api/v1/chronologies/${chronologyId}`).expect(200);
      expect((await viewer.get(`/api/v1/exhibits/${exhibitId}`).expect(200)).body.snapshot.chronology.name).toBe('Staff chronology (invented)');
    });

    it('prints as a one-page vector PDF with embedded fonts, its title, number, vintage line and chronology', async () => {
      const res = await getPdf(viewer, `/api/v1/exhibits/${exhibitId}/pdf`).expect(200);
      expect(res.headers['content-type']).toBe('application/pdf');
      const pdf = res.body as Buffer;
      expect(pages(pdf)).toBe(1);
      const f = fonts(pdf);
      expect(f.length).toBeGreaterThan(0);
      expect(f.every((x) => x.embedded)).toBe(true);
      expect(f.some((x) => /SourceSans3/.test(x.name))).toBe(true);
      const text = poppler('pdftotext', pdf);
      const ex = (await viewer.get(`/api/v1/exhibits/${exhibitId}`)).body;
      for (const line of ['Chart 3', 'The output gap, with the staff chronology', ex.snapshot.vintageStamp, 'Staff chronology (invented)', 'Research Department calculations.', 'Research Department (invented)', 'Hodrick–Prescott']) expect(text).toContain(line);
      expect(text).not.toContain('Renamed afterwards');
    });

    it('downloads its data with the header block: CSV comments pandas skips, XLSX "About" sheet', async () => {
      const csv = (await viewer.get(`/api/v1/exhibits/${exhibitId}/data?format=csv`).expect(200)).text;
      const head = csv.split('\n').filter((l) => l.startsWith('#'));
      for (const k of ['Number: Chart 3', 'Exhibit: The output gap', 'Units:', 'Source: ', 'Vintage: data as of', 'Method: Hodrick–Prescott', 'Chronology: contractions shaded from the Staff chronology', 'Caution: end-of-sample']) expect(head.some((l) => l.includes(k)), k).toBe(true);
      // A value that starts with its own label is not labelled twice.
      expect(head.filter((l) => /^# (Source: Sources?:|Caution: Caution:)/.test(l))).toEqual([]);
      const file = path.join(tmp, 'exhibit.csv');
      fs.writeFileSync(file, csv);
      const py = spawnSync('/usr/bin/python3', ['-c', `import pandas as pd, json, sys; d = pd.read_csv(sys.argv[1], comment='#'); print(json.dumps({"columns": list(d.columns), "rows": len(d), "first": d.iloc[0, 0]}))`, file], { encoding: 'utf8' });
      expect(py.stderr).toBe('');
      const read = JSON.parse(py.stdout);
      expect(read.columns.slice(0, 4)).toEqual(['period', 'input, EST$ million, chained 2020 prices (100 × log)', 'trend, EST$ million, chained 2020 prices (100 × log)', 'cycle, % of trend (100 × log)']);
      expect(read.first).toBe('1995-Q1');
      expect(read.rows).toBeGreaterThan(100);
      const book = new ExcelJS.Workbook();
      await book.xlsx.load((await getPdf(viewer, `/api/v1/exhibits/${exhibitId}/data?format=xlsx`).expect(200)).body as never);
      const about = book.getWorksheet('About')!.getSheetValues().filter(Boolean).map((r) => (r as unknown[]).slice(1).join(': '));
      expect(about).toContain('Number: Chart 3');
      expect(about.some((l) => l.startsWith('Caution: '))).toBe(true);
      // Computed numbers to 10 significant digits: no 16-digit noise.
      const numbers = csv.split('\n').filter((l) => /^\d{4}-Q/.test(l)).flatMap((l) => l.split(',').slice(1, 4)).filter(Boolean);
      expect(numbers.every((n) => n.replace(/[-.]/g, '').replace(/^0+/, '').length <= 10)).toBe(true);
    });
  });
});

describe('publication packs', () => {
  let a: number;
  let b: number;
  beforeAll(async () => {
    const board = (await viewer.get('/api/v1/boards').expect(200)).body.items[0];
    const panels = (await viewer.get(`/api/v1/boards/${board.id}`).expect(200)).body.panels;
    a = (await economist.post('/api/v1/exhibits').send({ panelId: panels[2].id, title: 'Two estimates of the gap' }).expect(201)).body.id;
    b = (await economist.post('/api/v1/exhibits').send({ panelId: panels[0].id, title: 'The output gap, panel one' }).expect(201)).body.id;
  });

  it('refuses a board with nothing published yet, and a pack with an unpublished exhibit', async () => {
    const board = (await viewer.get('/api/v1/boards')).body.items[0];
    const none = await viewer.get(`/api/v1/boards/${board.id}/pack.pdf`).expect(409);
    expect(none.body.error.message).toMatch(/published exhibits only/);
    await economist.post('/api/v1/exhibits/pack').send({ ids: [a] }).expect(409);
    // A reader cannot even see an unpublished exhibit.
    await viewer.post('/api/v1/exhibits/pack').send({ ids: [a] }).expect(404);
  });

  it('prints a board’s published exhibits in the order of its panels, numbered, for readers too', async () => {
    await publish(a);
    await publish(b);
    const board = (await viewer.get('/api/v1/boards')).body.items[0];
    const pdf = (await getPdf(viewer, `/api/v1/boards/${board.id}/pack.pdf`).expect(200)).body as Buffer;
    expect(pages(pdf)).toBe(2);
    const text = poppler('pdftotext', pdf);
    // Panel one comes before panel three on the board.
    expect(text.indexOf('The output gap, panel one')).toBeLessThan(text.indexOf('Two estimates of the gap'));
    expect(text.indexOf('Chart 1')).toBeLessThan(text.indexOf('Chart 2'));
    expect(fonts(pdf).every((x) => x.embedded)).toBe(true);
    const zip = await JSZip.loadAsync((await getPdf(viewer, `/api/v1/boards/${board.id}/pack.zip`).expect(200)).body as Buffer);
    expect(Object.keys(zip.files).sort()).toEqual(['chart-01-The_output_gap_panel_one.csv', 'chart-01-The_output_gap_panel_one.xlsx', 'chart-02-Two_estimates_of_the_gap.csv', 'chart-02-Two_estimates_of_the_gap.xlsx']);
    expect(await zip.file('chart-02-Two_estimates_of_the_gap.csv')!.async('string')).toMatch(/^# Exhibit: Two estimates of the gap/m);
  });

  it('prints a chosen set in the order given', async () => {
    const pdf = (await viewer.post('/api/v1/exhibits/pack').send({ ids: [a, b] }).buffer(true).parse(asBytes as never).expect(200)).body as Buffer;
    expect(pages(pdf)).toBe(2);
    const text = poppler('pdftotext', pdf);
    expect(text.indexOf('Two estimates of the gap')).toBeLessThan(text.indexOf('The output gap, panel one'));
  });
});

describe('defects found (issue 14)', () => {
  it('a study’s CSV names unit and transform in its header and keeps computed numbers to 10 significant digits (defect 6)', async () => {
    const study = (await economist.post('/api/v1/studies').send({ title: 'Gap', seriesId: ids.EST_GDP_REAL, transform: 'log100', method: 'hp', params: {} }).expect(201)).body;
    const csv = (await economist.get(`/api/v1/studies/${study.id}/export?format=csv`).expect(200)).text;
    expect(csv).toMatch(/^# Study: Gap$/m);
    expect(csv).toMatch(/"cycle, % of trend \(100 × log\)"/);
    const row = csv.split('\n').find((l) => l.startsWith('2000-Q1'))!;
    for (const n of row.split(',').slice(1, 4)) expect(n.replace(/[-.]/g, '').replace(/^0+/, '').length).toBeLessThanOrEqual(10);
  });

  it('revisions have the decimals of the values they compare, so from + revision = to (defect 6)', async () => {
    const res = await viewer.get(`/api/v1/series/${ids.EST_GDP_REAL}/revisions?from=1&to=4`).expect(200);
    const revised = res.body.items.filter((r: { status: string }) => r.status === 'revised');
    expect(revised.length).toBeGreaterThan(0);
    for (const r of revised) {
      const d = Math.max(...[r.from, r.to].map((v: number) => (String(v).split('.')[1] ?? '').length));
      expect(Number((r.from + r.revision).toFixed(d))).toBe(r.to);
      expect((String(r.revision).split('.')[1] ?? '').length).toBeLessThanOrEqual(d);
    }
  });

  it('refuses to compare series of different frequencies unless a common one is chosen, then averages into it (defect 3)', async () => {
    const gdp = { seriesId: ids.EST_GDP_REAL, transform: 'log100', method: 'hp', params: {} };
    const ip = { seriesId: ids.EST_IP, transform: 'log100', method: 'hp', params: {} };
    const refused = await economist.post('/api/v1/studies/compare').send({ items: [gdp, ip] }).expect(400);
    expect(refused.body.error.code).toBe('mixed_frequencies');
    expect(refused.body.error.message).toMatch(/quarterly: EST_GDP_REAL; monthly: EST_IP/);
    const alone = (await economist.post('/api/v1/studies/compare').send({ items: [gdp] }).expect(200)).body;
    const both = (await economist.post('/api/v1/studies/compare').send({ items: [gdp, ip], frequency: 'Q' }).expect(200)).body;
    expect(both.periods.every((p: string) => /^\d{4}-Q[1-4]$/.test(p))).toBe(true);
    expect(both.aggregated).toEqual(['EST_IP: monthly values averaged into quarterly periods']);
    // The quarterly line's statistics do not change because a monthly one joined it.
    expect(both.items[0].statistics.sd).toBeCloseTo(alone.items[0].statistics.sd, 12);
    expect(both.items[1].params).toEqual({ lambda: 1600 });
    await economist.post('/api/v1/studies/compare').send({ items: [gdp, ip], frequency: 'M' }).expect(400);
  });

  it('names series and methods in comparison panels, and refuses panels mixing frequencies (defect 4)', async () => {
    const mk = async (seriesId: number, method: string, transform = 'log100') => (await economist.post('/api/v1/studies').send({ title: `${seriesId} ${method}`, seriesId, transform, method, params: {} }).expect(201)).body.id;
    const board = (await economist.post('/api/v1/boards').send({ title: 'Mixed' }).expect(201)).body;
    const gdpHp = await mk(ids.EST_GDP_REAL, 'hp');
    const creditHam = await mk(ids.EST_CREDIT_GDP, 'hamilton', 'none');
    const panel = (await economist.post(`/api/v1/boards/${board.id}/panels`).send({ title: 'Two series, two methods', studyIds: [gdpHp, creditHam], compareBy: 'series' }).expect(201)).body;
    const data = (await economist.get(`/api/v1/boards/${board.id}/panels/${panel.id}/data`).expect(200)).body;
    expect(data.lines.map((l: { label: string }) => l.label)).toEqual(['EST_GDP_REAL · Hodrick–Prescott, λ = 1 600', 'EST_CREDIT_GDP · Hamilton regression filter, h = 8, p = 4']);
    expect(data.unit).toBe('% of trend · percentage points');
    expect(data.endOfSamplePeriods).toBe(8);
    const mixed = await economist.post(`/api/v1/boards/${board.id}/panels`).send({ title: 'x', studyIds: [gdpHp, await mk(ids.EST_IP, 'hp')], compareBy: 'series' }).expect(400);
    expect(mixed.body.error.code).toBe('mixed_frequencies');
  });

  it('says what Baxter–King loses at each end, and one sentence for a bad λ (defect 5)', async () => {
    const bk = (await economist.post('/api/v1/studies/preview').send({ seriesId: ids.EST_GDP_REAL, transform: 'log100', method: 'baxter-king', params: {} }).expect(200)).body;
    expect(bk.params.k).toBe(12);
    expect(bk.endNote).toBe('no estimate for the first 12 and the last 12 quarters: the filter needs 12 quarters on each side');
    expect(bk.endOfSamplePeriods).toBe(0);
    const hp = (await economist.post('/api/v1/studies/preview').send({ seriesId: ids.EST_GDP_REAL, transform: 'log100', method: 'hp', params: {} }).expect(200)).body;
    expect(hp.endNote).toBe('last 8 quarters (2 years): estimates will be revised');
    const bad = await economist.post('/api/v1/studies/preview').send({ seriesId: ids.EST_GDP_REAL, transform: 'log100', method: 'hp', params: { lambda: -5 } }).expect(400);
    expect(bad.body.error.details).toEqual([{ path: 'params.lambda', message: 'λ must be greater than 0.' }]);
    const l1 = (await economist.get('/api/v1/methods').expect(200)).body.methods.find((m: { id: string }) => m.id === 'l1-trend');
    expect(l1.params[0]).toMatchObject({ kind: 'lambda', squaredPenalty: false });
  });
});
