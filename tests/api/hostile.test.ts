/**
 * Hostile input: every file of the corpus gets a 4xx in the error shape and changes nothing;
 * markup and SQL-looking text are stored and returned as plain text.
 */
import ExcelJS from 'exceljs';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { makeTestApp, type TestApp } from '../helpers/app.js';
import { signedIn } from '../helpers/session.js';
import { zip } from '../helpers/zip.js';

let t: TestApp;
let steward: Awaited<ReturnType<typeof signedIn>>;
let seriesId: number;

beforeAll(async () => {
  t = await makeTestApp({ MAX_UPLOAD_MB: '12' }, { seedDemo: true });
  steward = await signedIn(t, 'steward@demo.test');
  seriesId = (await t.db('series').where('code', 'EST_GDP_REAL').first()).id;
});
afterAll(async () => {
  await t.close();
});

const snapshot = async () => {
  const tables = ['series', 'vintages', 'observations', 'loads', 'studies', 'exhibits'];
  const out: Record<string, number> = {};
  for (const table of tables) out[table] = Number((await t.db(table).count({ n: '*' }))[0].n);
  return out;
};

async function validXlsx() {
  const wb = new ExcelJS.Workbook();
  const ws = wb.addWorksheet('Data');
  ws.addRow(['period', 'value']);
  ws.addRow(['2030-Q1', 1]);
  return Buffer.from(await wb.xlsx.writeBuffer());
}

const CORPUS: [string, () => Buffer | Promise<Buffer>, string, string?][] = [
  ['an empty file', () => Buffer.alloc(0), 'x.csv'],
  ['binary junk', () => Buffer.from(Array.from({ length: 4096 }, (_, i) => (i * 7919) % 256)), 'junk.csv', 'binary_file'],
  ['UTF-16 with its byte-order mark', () => Buffer.concat([Buffer.from([0xff, 0xfe]), Buffer.from('period,value\n2030-Q1,1\n', 'utf16le')]), 'utf16.csv', 'wrong_encoding'],
  ['Latin-1 text', () => Buffer.from('period,value,unit\n2030-Q1,1,\xe9\xe8\n', 'latin1'), 'latin1.csv', 'wrong_encoding'],
  ['a 10 MB single line', () => Buffer.alloc(10 * 1024 * 1024, 'a'), 'long.csv', 'line_too_long'],
  ['an unclosed quote', () => Buffer.from('period,value\n"2030-Q1,1\n2030-Q2,2\n'), 'quote.csv'],
  ['a truncated XLSX', async () => (await validXlsx()).subarray(0, 300), 'cut.xlsx'],
  ['an XLSX zip bomb', () => zip([{ name: 'xl/worksheets/sheet1.xml', data: Buffer.alloc(40 * 1024 * 1024, 0x20) }]), 'bomb.xlsx', 'unsafe_workbook'],
  ['an XLSX that lies about its size', () => zip([{ name: 'xl/workbook.xml', data: Buffer.from('<x/>'), size: 0xfffffff0 }]), 'liar.xlsx', 'unsafe_workbook'],
  ['a zip that is not a workbook', () => zip([{ name: 'hello.txt', data: Buffer.from('hello') }]), 'hello.xlsx'],
  ['deeply nested SDMX keys', () => Buffer.from(`${Array.from({ length: 60 }, (_, i) => `D${i}`).join(',')},TIME_PERIOD,OBS_VALUE\n${Array.from({ length: 60 }, () => 'X').join(',')},2030-Q1,1\n`), 'deep.csv', 'key_too_deep'],
  ['an SDMX key longer than any code', () => Buffer.from(`REF,TIME_PERIOD,OBS_VALUE\n${'K'.repeat(500)},2030-Q1,1\n`), 'longkey.csv'],
  ['a formula in a cell', async () => {
    const wb = new ExcelJS.Workbook();
    const ws = wb.addWorksheet('Data');
    ws.addRow(['period', 'value']);
    ws.addRow(['2030-Q1', { formula: 'HYPERLINK("http://evil","x")' }]);
    return Buffer.from(await wb.xlsx.writeBuffer());
  }, 'formula.xlsx'],
  ['a huge number', () => Buffer.from('period,value\n2030-Q1,1e999\n'), 'huge.csv'],
  ['NaN spelled as text', () => Buffer.from('period,value\n2030-Q1,NaN\n'), 'nan.csv'],
  ['Infinity spelled as text', () => Buffer.from('period,value\n2030-Q1,-Infinity\n'), 'inf.csv'],
  ['HTML instead of data', () => Buffer.from('<html><script>alert(1)</script></html>\n'), 'page.csv'],
  ['SQL where a value should be', () => Buffer.from("period,value\n2030-Q1,1); DROP TABLE observations; --\n"), 'sql.csv'],
];

describe('the hostile corpus', () => {
  for (const [name, make, filename, code] of CORPUS) {
    it(`${name} → 4xx with the error shape, nothing changed`, async () => {
      const before = await snapshot();
      const file = await make();
      for (const path of [`/api/v1/series/${seriesId}/vintages`, '/api/v1/loads']) {
        const res = await steward.post(path).attach('file', file, filename);
        expect(res.status, `${path}: ${res.status} ${JSON.stringify(res.body).slice(0, 200)}`).toBeGreaterThanOrEqual(400);
        expect(res.status).toBeLessThan(500);
        expect(res.body.error.code).toMatch(/^[a-z_]+$/);
        if (code) expect(res.body.error.code).toBe(code);
        expect(res.body.error.message.length).toBeGreaterThan(10);
        expect(JSON.stringify(res.body)).not.toMatch(/at \S+ \(|\.ts:\d+|ER_[A-Z_]+|SELECT |INSERT INTO/);
      }
      expect(await snapshot()).toEqual(before);
    });
  }

  it('a UTF-8 byte-order mark is read correctly (and a dry run stores nothing)', async () => {
    const before = await snapshot();
    const obs = (await steward.get(`/api/v1/series/${seriesId}/vintages/latest/observations`).expect(200)).body;
    const text = '\ufeffperiod,value\n' + obs.periods.map((p: string, i: number) => `${p},${obs.values[i]}`).join('\n') + '\n2030-Q1,1\n';
    const res = await steward.post(`/api/v1/series/${seriesId}/vintages?dryRun=1`).attach('file', Buffer.from(text), 'bom.csv').expect(200);
    expect(res.body.preview.series[0].changes.new).toBeGreaterThan(0);
    expect(res.body.preview.errors).toBe(0);
    expect(await snapshot()).toEqual(before);
  });

  it('answers 413 to an upload over the limit and to a JSON body over the limit', async () => {
    const res = await steward.post(`/api/v1/series/${seriesId}/vintages`).attach('file', Buffer.alloc(13 * 1024 * 1024, 'x'), 'big.csv');
    expect(res.status).toBe(413);
    expect(res.body.error.code).toBe('file_too_large');
  });
});

describe('text fields keep markup and SQL as text', () => {
  const NASTY = [`<img src=x onerror="alert('x')">`, `'; DROP TABLE series; --`, `" OR 1=1 --`, `Robert'); DELETE FROM users; --`, '<script>document.cookie</script>'];
  it('stores and returns them exactly, and every table is still there', async () => {
    for (const [i, text] of NASTY.entries()) {
      const res = await steward
        .post('/api/v1/series')
        .send({ code: `NASTY_${i}`, title: text, frequency: 'Q', unit: text.slice(0, 100), seasonalAdjustment: 'sa', source: text, notes: text })
        .expect(201);
      expect(res.body.title).toBe(text);
      const back = (await steward.get(`/api/v1/series/${res.body.id}`).expect(200)).body;
      expect(back.notes).toBe(text);
      expect(back.source).toBe(text);
    }
    const economist = await signedIn(t, 'economist@demo.test');
    const study = await economist.post('/api/v1/studies').send({ title: NASTY[0], notes: NASTY[1], seriesId, vintage: 'latest', transform: 'log100', method: 'hp' }).expect(201);
    await economist.post('/api/v1/exhibits').send({ studyId: study.body.id, title: NASTY[4], subtitle: NASTY[2], notes: NASTY[3] }).expect(201);
    const ex = (await economist.post('/api/v1/exhibits').send({ studyId: study.body.id, title: NASTY[1], units: NASTY[2], sourceLine: NASTY[0] }).expect(201)).body;
    expect(ex.units).toBe(NASTY[2]);
    expect(ex.sourceLine).toBe(NASTY[0]);
    const board = (await economist.post('/api/v1/boards').send({ title: NASTY[1], description: NASTY[0], visibility: 'team' }).expect(201)).body;
    expect(board.title).toBe(NASTY[1]);
    const panel = (await economist.post(`/api/v1/boards/${board.id}/panels`).send({ title: NASTY[3], notes: NASTY[4], studyIds: [study.body.id] }).expect(201)).body;
    expect(panel.notes).toBe(NASTY[4]);
    const token = (await economist.post('/api/v1/tokens').send({ name: NASTY[1] }).expect(201)).body;
    expect(token.name).toBe(NASTY[1]);
    const admin = await signedIn(t, 'admin@demo.test');
    await admin.post('/api/v1/invitations').send({ email: 'nasty@demo.test', roles: ['viewer'] }).expect(201);
    const mail = await t.mail.waitFor((m) => m.to.includes('nasty@demo.test'));
    const inviteToken = /\/invite\/(\S+)/.exec(mail.text)![1];
    const joined = (await request(t.app).post('/api/v1/invitations/accept').set('Origin', t.config.publicOrigin).send({ token: inviteToken, name: NASTY[3], password: 'a-long-new-password' }).expect(201)).body;
    expect(joined.user.name).toBe(NASTY[3]);
    const search = await steward.get(`/api/v1/series?q=${encodeURIComponent(NASTY[1])}`).expect(200);
    expect(search.body.items.map((s: { title: string }) => s.title)).toEqual([NASTY[1]]);
    for (const table of ['users', 'series', 'observations', 'vintages']) expect(await t.db.schema.hasTable(table)).toBe(true);
    expect(Number((await t.db('users').count({ n: '*' }))[0].n)).toBeGreaterThanOrEqual(5);
  });
  it('refuses a SQL-looking code with a message, storing nothing', async () => {
    const before = await snapshot();
    const res = await steward.post('/api/v1/series').send({ code: "X'; DROP TABLE series; --", title: 'x', frequency: 'Q', unit: 'x', seasonalAdjustment: 'sa' }).expect(400);
    expect(res.body.error.details[0].path).toBe('code');
    expect(await snapshot()).toEqual(before);
  });
});
