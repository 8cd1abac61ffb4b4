/**
 * Who reads what (issue 17): readers see a published exhibit and its publication record, not its
 * review; the diff of revisions is review; a public link shows only the published figure; a
 * vintage's exports keep the metadata it was loaded under, and every metadata change is audited;
 * every text field of every export is guarded against formulas and quoted so that no spreadsheet
 * splits it into a formula.
 */
import ExcelJS from 'exceljs';
import Papa from 'papaparse';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { csvLine } from '../../server/importers/export.js';
import { makeTestApp, type TestApp } from '../helpers/app.js';
import { asBytes } from '../helpers/parsers.js';
import { addPerson, signedIn } from '../helpers/session.js';

type Agent = Awaited<ReturnType<typeof signedIn>>;
let t: TestApp;
/** The demo accounts (the economist is the author of everything here) and a second economist and editor. */
let author: Agent, economist2: Agent, editor: Agent, editor2: Agent, viewer: Agent, steward: Agent, admin: Agent;
let gdpId: number;
let studyId: number;

const RETURN_COMMENT = 'Canary: the axis label is wrong, and the gap looks too large.';
const APPROVAL_COMMENT = 'Canary: approved after a second look.';
const STUDY_TITLE = 'Canary internal study title';
const NOTES = 'Canary internal notes: check against the staff forecast before the board meeting.';

const move = (who: Agent, id: number, to: string, comment?: string) => who.post(`/api/v1/exhibits/${id}/transitions`).send({ to, ...(comment ? { comment } : {}) }).expect(200);

/** An exhibit returned once (with a comment), changed, resubmitted, approved by one editor and published by another. */
async function publishedAfterReview() {
  const e = (await author.post('/api/v1/exhibits').send({ studyId, title: 'The output gap of Estuary', subtitle: 'First subtitle', notes: NOTES }).expect(201)).body;
  await move(author, e.id, 'in_review');
  await move(editor, e.id, 'returned', RETURN_COMMENT);
  await author.patch(`/api/v1/exhibits/${e.id}`).send({ subtitle: 'Deviation of real GDP from its trend' }).expect(200);
  await move(author, e.id, 'in_review');
  await move(editor, e.id, 'approved', APPROVAL_COMMENT);
  await move(editor2, e.id, 'published');
  return e.id as number;
}

beforeAll(async () => {
  t = await makeTestApp({}, { seedDemo: true });
  [author, editor, viewer, steward, admin] = await Promise.all(['economist', 'editor', 'viewer', 'steward', 'admin'].map((r) => signedIn(t, `${r}@demo.test`)));
  economist2 = await addPerson(t, 'second.economist@demo.test', 'Second Economist', ['economist']);
  editor2 = await addPerson(t, 'second.editor@demo.test', 'Second Editor', ['editor']);
  gdpId = (await t.db('series').where('code', 'EST_GDP_REAL').first()).id;
  studyId = (await author.post('/api/v1/studies').send({ title: STUDY_TITLE, seriesId: gdpId, vintage: 'latest', transform: 'log100', method: 'hp', params: { lambda: 1600 } }).expect(201)).body.id;
}, 120_000);
afterAll(async () => {
  await t.close();
});

describe('a published exhibit', () => {
  it('shows readers the exhibit and its publication record, never its review', async () => {
    const id = await publishedAfterReview();
    for (const [who, agent] of [['viewer', viewer], ['steward', steward], ['another economist', economist2]] as const) {
      const seen = (await agent.get(`/api/v1/exhibits/${id}`).expect(200)).body;
      const text = JSON.stringify(seen);
      expect(seen.snapshot.text.subtitle, who).toBe('Deviation of real GDP from its trend');
      expect(seen.events.map((e: { to: string }) => e.to), who).toEqual(['published']);
      expect(seen.events[0].actor.name, who).toBe('Second Editor');
      expect(seen.events[0].comment, who).toBeNull();
      for (const secret of [RETURN_COMMENT, APPROVAL_COMMENT, 'Eddie Editor', 'First subtitle']) expect(text, `${who}: ${secret}`).not.toContain(secret);
    }
    // The author, editors and administrators see the whole review.
    for (const [who, agent] of [['author', author], ['editor', editor], ['admin', admin]] as const) {
      const full = (await agent.get(`/api/v1/exhibits/${id}`).expect(200)).body;
      expect(full.events.map((e: { to: string }) => e.to), who).toEqual(['draft', 'in_review', 'returned', 'in_review', 'approved', 'published']);
      expect(full.events[2].comment, who).toBe(RETURN_COMMENT);
    }
  });

  it('shows a withdrawal and its reason to readers', async () => {
    const id = await publishedAfterReview();
    await move(editor, id, 'withdrawn', 'Replaced by the November estimate.');
    const seen = (await viewer.get(`/api/v1/exhibits/${id}`).expect(200)).body;
    expect(seen.events.map((e: { to: string; comment: string | null }) => [e.to, e.comment])).toEqual([
      ['published', null],
      ['withdrawn', 'Replaced by the November estimate.'],
    ]);
  });

  it('keeps what changed between revisions for the review: readers get no /diff', async () => {
    const id = await publishedAfterReview();
    const refused = await viewer.get(`/api/v1/exhibits/${id}/diff`).expect(403);
    expect(refused.body.error.code).toBe('role_required');
    await steward.get(`/api/v1/exhibits/${id}/diff`).expect(403);
    const other = await economist2.get(`/api/v1/exhibits/${id}/diff`).expect(403);
    expect(other.body.error.code).toBe('review_only');
    expect(JSON.stringify(other.body)).not.toContain('First subtitle');
    const full = (await editor.get(`/api/v1/exhibits/${id}/diff`).expect(200)).body;
    expect(full.previous.text.subtitle).toBe('First subtitle');
    await author.get(`/api/v1/exhibits/${id}/diff`).expect(200);
    await admin.get(`/api/v1/exhibits/${id}/diff`).expect(200);
  });

  it('by its public link shows only what the published figure shows', async () => {
    const id = await publishedAfterReview();
    await admin.put('/api/v1/settings').send({ publicExhibitLinks: true }).expect(200);
    try {
      const row = await t.db('exhibits').where('id', id).first();
      const revision = await t.db('exhibit_revisions').where('exhibit_id', id).orderBy('number', 'desc').first();
      const vintage = await t.db('vintages').where('series_id', gdpId).orderBy('number', 'desc').first();
      const author = await t.db('users').where('email', 'economist@demo.test').first();
      const pub = (await request(t.app).get(`/api/v1/public/exhibits/${row.public_slug}`).expect(200)).body;
      expect(pub.snapshot.text.title).toBe('The output gap of Estuary');
      expect(pub.snapshot.methodLine).toBe('Hodrick–Prescott, λ = 1 600; 100 × log');
      expect(pub.snapshot.lines.find((l: { role: string }) => l.role === 'cycle').values.length).toBeGreaterThan(100);
      const text = JSON.stringify(pub);
      for (const key of ['author', 'studyId', 'panelId', 'snapshotChecksum', 'vintageChecksum', 'events', 'notes":"']) expect(text, key).not.toContain(`"${key}`);
      for (const secret of [STUDY_TITLE, NOTES, revision.checksum, vintage.checksum, author.name, RETURN_COMMENT]) expect(text, secret).not.toContain(secret);
      for (const format of ['csv', 'xlsx']) {
        const file = await request(t.app).get(`/api/v1/public/exhibits/${row.public_slug}/data?format=${format}`).buffer(true).parse(asBytes as never).expect(200);
        const body = (file.body as Buffer).toString('latin1');
        for (const secret of [NOTES.slice(0, 20), revision.checksum, vintage.checksum]) expect(body, `${format}: ${secret}`).not.toContain(secret);
        expect(file.headers['content-disposition']).not.toContain(`exhibit-${id}`);
      }
    } finally {
      await admin.put('/api/v1/settings').send({ publicExhibitLinks: false }).expect(200);
    }
  });
});

describe('metadata and history', () => {
  const quarters = (n: number, at: (i: number) => number) => ['period,value', ...Array.from({ length: n }, (_, i) => `${2000 + Math.floor(i / 4)}-Q${(i % 4) + 1},${at(i)}`)].join('\n');
  const load = (id: number, csv: string, asOf: string) => steward.post(`/api/v1/series/${id}/vintages`).field('asOf', asOf).attach('file', Buffer.from(csv), 'v.csv').expect(201);

  it('an old vintage’s exports keep the code and unit it was loaded under; every change is audited', async () => {
    const s = (await steward.post('/api/v1/series').send({ code: 'META_OLD', title: 'Old title', frequency: 'Q', unit: 'EUR mn', seasonalAdjustment: 'sa', source: 'Invented' }).expect(201)).body;
    await load(s.id, quarters(8, (i) => 100 + i), '2024-01-15');
    await steward.patch(`/api/v1/series/${s.id}`).send({ code: 'META_NEW', unit: 'EUR bn', title: 'New title' }).expect(200);
    await load(s.id, quarters(8, (i) => 0.1 + i / 1000), '2024-04-15');
    const v1 = (await viewer.get(`/api/v1/series/${s.id}/vintages/1/export?format=csv`).expect(200)).text.trim().split('\n');
    expect(v1[1]).toBe('META_OLD,2000-Q1,100,EUR mn,1,2024-01-15');
    const v2 = (await viewer.get(`/api/v1/series/${s.id}/vintages/2/export?format=csv`).expect(200)).text.trim().split('\n');
    expect(v2[1]).toBe('META_NEW,2000-Q1,0.1,EUR bn,2,2024-04-15');
    const sdmx = (await viewer.get(`/api/v1/series/${s.id}/vintages/1/export?format=sdmx-csv`).expect(200)).text;
    expect(sdmx).toContain(',META_OLD,2000-Q1,100,EUR mn,1,');
    const x = await viewer.get(`/api/v1/series/${s.id}/vintages/1/export?format=xlsx`).buffer(true).parse(asBytes as never).expect(200);
    const wb = new ExcelJS.Workbook();
    await wb.xlsx.load(x.body as never);
    const about = wb.getWorksheet('About')!;
    expect(String(about.getCell('B1').value)).toBe('META_OLD: Old title');
    expect(String(about.getCell('B2').value)).toBe('EUR mn');
    const audit = await t.db('audit_log').where({ action: 'series.update', target_id: String(s.id) }).first();
    expect(JSON.parse(audit.details).changes).toEqual({ code: { from: 'META_OLD', to: 'META_NEW' }, unit: { from: 'EUR mn', to: 'EUR bn' }, title: { from: 'Old title', to: 'New title' } });
    // The record of a vintage's metadata cannot be changed, by the API or in the database.
    const v = await t.db('vintages').where({ series_id: s.id, number: 1 }).first();
    await expect(t.db('vintage_metadata').where('vintage_id', v.id).update({ unit: 'x' })).rejects.toThrow(/immutable/);
  });
});

describe('exports and formulas', () => {
  /** Every cell of a CSV as a spreadsheet splitting on `delimiter` would read it. */
  const cells = (text: string, delimiter: string) => (Papa.parse<string[]>(text.trim(), { delimiter }).data as string[][]).flat();
  const formula = /^[\s]*[=+\-@]/;
  const noFormula = (text: string, what: string) => {
    for (const d of [',', ';', '\t']) for (const c of cells(text, d)) if (!/^-?\d/.test(c)) expect(c, `${what} split on ${JSON.stringify(d)}: ${c}`).not.toMatch(formula);
  };

  it('no text field of any export becomes a formula, whatever the spreadsheet splits on', async () => {
    const s = (await steward.post('/api/v1/series').send({ code: 'FORMULA_T', title: '@SUM(A1:A9);=1+1', frequency: 'Q', unit: 'pct;=1+1', seasonalAdjustment: 'sa', source: 'x\t=2+2' }).expect(201)).body;
    await steward.post(`/api/v1/series/${s.id}/vintages`).attach('file', Buffer.from(['period,value', '2000-Q1,-1.5', '2000-Q2,2', '2000-Q3,3', '2000-Q4,4', '2001-Q1,5', '2001-Q2,6', '2001-Q3,7', '2001-Q4,8'].join('\n')), 'f.csv').expect(201);
    const csv = (await viewer.get(`/api/v1/series/${s.id}/vintages/1/export?format=csv`).expect(200)).text;
    expect(csv).toContain(`"pct;'=1+1"`);
    expect(csv).toContain(',-1.5,');
    noFormula(csv, 'vintage CSV');
    noFormula((await viewer.get(`/api/v1/series/${s.id}/vintages/1/export?format=sdmx-csv`).expect(200)).text, 'vintage SDMX-CSV');
    const study = (await author.post('/api/v1/studies').send({ title: '=cmd|calc!A1', seriesId: s.id, vintage: 'latest', transform: 'none', method: 'hp', params: { lambda: 1600 } }).expect(201)).body;
    noFormula((await author.get(`/api/v1/studies/${study.id}/export?format=csv`).expect(200)).text, 'study CSV');
    const ex = (await author.post('/api/v1/exhibits').send({ studyId: study.id, title: '+1+1', units: 'pct;=1+1', sourceLine: '-2+3;@x' }).expect(201)).body;
    noFormula((await author.get(`/api/v1/exhibits/${ex.id}/data?format=csv`).expect(200)).text, 'exhibit CSV');
  });

  it('csvLine: numbers bare, text guarded and quoted by RFC 4180 when a spreadsheet could split it', () => {
    expect(csvLine(['EST_GDP', '2024-Q1', -1.5, null, 'pct;=1+1', 'say "hi"', '=1+1', ' padded'])).toBe(`EST_GDP,2024-Q1,-1.5,,"pct;'=1+1","say ""hi""",'=1+1," padded"`);
    expect(csvLine([Number.NaN, '-'], ['number', 'text'])).toBe(",'-");
  });
});
