/**
 * "Rerun as a script" (issue 15): the study's Python script, run with Debian's /usr/bin/python3
 * against a real test server, fetches the exact vintage with a token from the environment,
 * recomputes with statsmodels (hpfilter, bkfilter, cffilter, UnobservedComponents) or through
 * POST /decompose, and agrees with the numbers the study showed; a changed number makes it fail.
 */
import { execFile } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startServer, type TestServer } from '../helpers/app.js';
import { signedIn } from '../helpers/session.js';

type Agent = Awaited<ReturnType<typeof signedIn>>;
let t: TestServer;
let economist: Agent;
let token: string;
let gdpId: number;
const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'tidegauge-scripts-'));

/** Runs a script with python3 without blocking this process (the server answers it). */
function python(file: string, env: Record<string, string>) {
  return new Promise<{ code: number; stdout: string; stderr: string }>((resolve) => {
    execFile('/usr/bin/python3', [file], { env: { PATH: '/usr/bin:/bin', ...env }, timeout: 120_000 }, (error, stdout, stderr) =>
      resolve({ code: error ? ((error as { code?: number }).code ?? 1) : 0, stdout, stderr }),
    );
  });
}

async function scriptOf(studyId: number) {
  const res = await economist.get(`/api/v1/studies/${studyId}/script`).buffer(true).parse((r, cb) => {
    let s = '';
    r.on('data', (c: Buffer) => (s += c.toString('utf8')));
    r.on('end', () => cb(null, s));
  });
  expect(res.status).toBe(200);
  expect(res.headers['content-type']).toMatch(/^text\/x-python/);
  expect(res.headers['content-disposition']).toBe(`attachment; filename="study-${studyId}.py"`);
  return res.body as string;
}

const result = (stdout: string) => JSON.parse(/^RESULT (.*)$/m.exec(stdout)![1]) as { engine: string; periods: number; largestDifference: number; tolerance: number; ok: boolean };

beforeAll(async () => {
  t = await startServer({}, { seedDemo: true });
  economist = await signedIn(t, 'economist@demo.test');
  token = (await economist.post('/api/v1/tokens').send({ name: 'scripts' }).expect(201)).body.token;
  gdpId = (await t.db('series').where('code', 'EST_GDP_REAL').first()).id;
}, 120_000);
afterAll(async () => {
  await t?.close();
  fs.rmSync(dir, { recursive: true, force: true });
});

const CASES: { method: string; params: Record<string, unknown>; vintage: number | 'latest'; engine: RegExp; by: string }[] = [
  { method: 'hp', params: { lambda: 1600 }, vintage: 3, engine: /^statsmodels\.tsa\.filters\.hp_filter\.hpfilter/, by: 'hpfilter' },
  { method: 'baxter-king', params: {}, vintage: 'latest', engine: /^statsmodels\.tsa\.filters\.bk_filter\.bkfilter/, by: 'bkfilter' },
  { method: 'christiano-fitzgerald', params: {}, vintage: 'latest', engine: /^statsmodels\.tsa\.filters\.cf_filter\.cffilter/, by: 'cffilter' },
  { method: 'uc', params: { trend: 'local-linear' }, vintage: 'latest', engine: /^statsmodels UnobservedComponents smoothed at the study's fitted parameters/, by: 'UnobservedComponents' },
  { method: 'hamilton', params: {}, vintage: 'latest', engine: /^Tidegauge POST \/api\/v1\/decompose/, by: 'POST /decompose' },
];

describe('the study as a Python script', () => {
  for (const c of CASES) {
    it(`${c.method}: recomputed with ${c.by}, agrees with the study`, async () => {
      const study = (await economist.post('/api/v1/studies').send({ title: `Script's ${c.method} gap`, seriesId: gdpId, vintage: c.vintage, transform: 'log100', method: c.method, params: c.params }).expect(201)).body;
      const text = await scriptOf(study.id);
      expect(text).not.toContain(token);
      expect(text).toContain('os.environ.get("TIDEGAUGE_TOKEN")');
      const file = path.join(dir, `study-${study.id}.py`);
      fs.writeFileSync(file, text);
      const run = await python(file, { TIDEGAUGE_TOKEN: token, TIDEGAUGE_URL: t.url });
      expect(run.stderr.replace(/^.*Warning.*\n(\s+.*\n)*/gm, '')).toBe('');
      expect(run.code, run.stdout).toBe(0);
      const r = result(run.stdout);
      expect(r.engine).toMatch(c.engine);
      const shown = (await economist.get(`/api/v1/studies/${study.id}/result`).expect(200)).body;
      expect(r.periods).toBe(shown.cycle.filter((v: number | null) => v !== null).length);
      expect(r.largestDifference).toBeLessThan(1e-6);
      if (process.env.SHOW_SCRIPT_RESULTS) console.info(c.method, r.largestDifference, r.periods);
      expect(run.stdout).toContain(`vintage ${shown.vintage} (data as of ${shown.asOf})`);
    }, 120_000);
  }

  it('a series with a gap goes through POST /decompose, and says why', async () => {
    const steward = await signedIn(t, 'steward@demo.test');
    const id = (await steward.post('/api/v1/series').send({ code: 'T_SCRIPT_GAP', title: 'A series with a gap (invented)', frequency: 'Q', unit: 'index', seasonalAdjustment: 'sa', source: 'test' }).expect(201)).body.id;
    const rows = Array.from({ length: 60 }, (_, i) => `${2000 + Math.floor(i / 4)}-Q${(i % 4) + 1},${i === 30 ? '' : (100 * Math.exp(0.005 * i + 0.02 * Math.sin(i / 4))).toFixed(3)}`);
    await steward.post(`/api/v1/series/${id}/vintages`).attach('file', Buffer.from(['period,value', ...rows].join('\n') + '\n'), 'gap.csv').expect(201);
    const study = (await economist.post('/api/v1/studies').send({ title: 'Gap with a gap', seriesId: id, vintage: 'latest', transform: 'log100', method: 'hp', params: { lambda: 1600 } }).expect(201)).body;
    const file = path.join(dir, `study-${study.id}.py`);
    fs.writeFileSync(file, await scriptOf(study.id));
    const run = await python(file, { TIDEGAUGE_TOKEN: token, TIDEGAUGE_URL: t.url });
    expect(run.code, run.stdout + run.stderr).toBe(0);
    const r = result(run.stdout);
    expect(r.engine).toBe("Tidegauge POST /api/v1/decompose (the data have gaps, which statsmodels' filters do not take)");
    expect(r.periods).toBe(59);
    expect(r.largestDifference).toBe(0);
  }, 120_000);

  it('fails with the difference when a number the study showed is changed, and without a token says what to set', async () => {
    const study = (await economist.post('/api/v1/studies').send({ title: "O'Brien's gap \"quoted\" $& \\ '''", seriesId: gdpId, vintage: 4, transform: 'log100', method: 'hp', params: { lambda: 1600 } }).expect(201)).body;
    const text = await scriptOf(study.id);
    const file = path.join(dir, 'tampered.py');
    const shown = (await economist.get(`/api/v1/studies/${study.id}/result`).expect(200)).body;
    const k = shown.cycle.length - 3;
    const original = JSON.stringify(shown.cycle[k]);
    expect(text).toContain(original);
    const tampered = text.replace(`,${original},`, `,${JSON.stringify(shown.cycle[k] + 0.25)},`);
    expect(tampered).not.toBe(text);
    fs.writeFileSync(file, tampered);
    const run = await python(file, { TIDEGAUGE_TOKEN: token, TIDEGAUGE_URL: t.url });
    expect(run.code).toBe(1);
    const r = result(run.stdout);
    expect(r.largestDifference).toBeCloseTo(0.25, 6);
    expect(run.stdout).toContain(`at ${shown.periods[k]}`);
    expect(run.stdout).toContain(`Study ${study.id}: O'Brien's gap "quoted" $& \\ '''`);

    const noToken = await python(file, { TIDEGAUGE_URL: t.url });
    expect(noToken.code).toBe(2);
    expect(noToken.stderr).toMatch(/Set TIDEGAUGE_TOKEN/);
    const badToken = await python(file, { TIDEGAUGE_TOKEN: 'not-a-token', TIDEGAUGE_URL: t.url });
    expect(badToken.code).toBe(2);
    expect(badToken.stderr).toMatch(/answered 401/);
  }, 120_000);
});
