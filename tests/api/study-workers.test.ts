/**
 * Studies, comparisons, board panels and exhibit drafts compute a slow method (unobserved
 * components) on the worker threads and a cheap one (HP at macro sizes) on the request thread, with
 * the same numbers either way; the worker's JSON answer turns back into the result exactly.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { decompose, fromJsonResponse, toJsonResponse } from '../../server/analysis/index.js';
import { createApp } from '../../server/app.js';
import { createLogger } from '../../server/lib/logger.js';
import { computeSpec } from '../../server/services/studies/results.js';
import { createAnalysisPool, type AnalysisPool } from '../../server/workers/pool.js';
import { makeTestApp, type TestApp } from '../helpers/app.js';
import { signedIn } from '../helpers/session.js';

let t: TestApp;
let pool: AnalysisPool;
let app: ReturnType<typeof createApp>;
let economist: Awaited<ReturnType<typeof signedIn>>;
let gdpId: number;

beforeAll(async () => {
  t = await makeTestApp({}, { seedDemo: true });
  pool = createAnalysisPool(1);
  app = createApp({ config: t.config, db: t.db, logger: createLogger('silent'), pool });
  economist = await signedIn({ app, config: t.config }, 'economist@demo.test');
  gdpId = (await t.db('series').where('code', 'EST_GDP_REAL').first()).id;
});
afterAll(async () => {
  await app.locals.shutdown();
  await t.close();
});

const spec = (over: Record<string, unknown>) => ({ seriesId: gdpId, vintage: 4, transform: 'log100', ...over });
/** The pool's finished tasks while `work` runs. */
async function onWorkers<T>(work: () => Promise<T>): Promise<[T, number]> {
  const before = pool.completed;
  const out = await work();
  return [out, pool.completed - before];
}

describe('where a study is computed', () => {
  it('a study of unobserved components on a worker thread, with the numbers the request thread gives', async () => {
    // Saving checks the specification by computing it once: on a worker too, as is a change.
    const [created, saving] = await onWorkers(() => economist.post('/api/v1/studies').send({ title: 'UC gap', ...spec({ method: 'uc', params: { trend: 'local-linear' } }) }).expect(201));
    expect(saving).toBe(1);
    const s = created.body;
    expect((await onWorkers(() => economist.patch(`/api/v1/studies/${s.id}`).send({ title: 'UC gap, renamed' }).expect(200)))[1]).toBe(1);
    const [res, tasks] = await onWorkers(() => economist.get(`/api/v1/studies/${s.id}/result`).expect(200));
    expect(tasks).toBe(1);
    const inline = JSON.parse(JSON.stringify(await computeSpec(t.db, { ...s, asOf: null })));
    for (const key of ['periods', 'input', 'trend', 'cycle', 'extra', 'statistics', 'turningPoints', 'methodLine', 'diagnostics']) expect(res.body[key], key).toEqual(inline[key]);
  });

  it('an HP study stays on the request thread', async () => {
    const s = (await economist.post('/api/v1/studies').send({ title: 'HP gap', ...spec({ method: 'hp', params: {} }) }).expect(201)).body;
    const [, tasks] = await onWorkers(() => economist.get(`/api/v1/studies/${s.id}/result`).expect(200));
    expect(tasks).toBe(0);
  });

  it('a comparison computes its slow items on the workers, side by side, and lists them in the order asked', async () => {
    const items = [spec({ method: 'hp', params: {}, label: 'first' }), spec({ method: 'uc', params: { trend: 'local-linear' }, label: 'second' }), spec({ method: 'uc', params: { trend: 'random-walk-drift' }, label: 'third' })];
    const [res, tasks] = await onWorkers(() => economist.post('/api/v1/studies/compare').send({ items }).expect(200));
    expect(tasks).toBe(2);
    expect(res.body.items.map((i: { label: string }) => i.label)).toEqual(['first', 'second', 'third']);
  });

  it('a board panel and an exhibit draft of a slow study use the workers too', async () => {
    const s = (await economist.post('/api/v1/studies').send({ title: 'UC for a board', ...spec({ method: 'uc', params: { trend: 'local-linear' } }) }).expect(201)).body;
    const board = (await economist.post('/api/v1/boards').send({ title: 'Workers' }).expect(201)).body;
    const panel = (await economist.post(`/api/v1/boards/${board.id}/panels`).send({ title: 'UC panel', studyIds: [s.id] }).expect(201)).body;
    const [, panelTasks] = await onWorkers(() => economist.get(`/api/v1/boards/${board.id}/panels/${panel.id}/data`).expect(200));
    expect(panelTasks).toBe(1);
    const [, draftTasks] = await onWorkers(() => economist.post('/api/v1/exhibits').send({ studyId: s.id, title: 'UC exhibit' }).expect(201));
    expect(draftTasks).toBeGreaterThanOrEqual(1);
  });
});

describe('a result through JSON and back', () => {
  it('is the result: NaN where values are missing, extra series by name, the extension', () => {
    const values: (number | null)[] = Array.from({ length: 80 }, (_, i) => 100 + i * 0.5 + Math.sin(i / 3));
    const gap = values.map((v, i) => (i === 10 ? null : v));
    for (const request of [
      { frequency: 'Q' as const, start: '2000-Q1', values: gap, transform: 'log100' as const, method: 'uc', params: { trend: 'local-linear' } },
      { frequency: 'Q' as const, start: '2000-Q1', values, transform: 'log100' as const, method: 'hp-forecast', params: {} },
    ]) {
      const r = decompose(request);
      if (request.method === 'uc') expect(Number.isNaN(r.input[10])).toBe(true);
      const back = fromJsonResponse(JSON.parse(JSON.stringify(toJsonResponse(r))));
      expect(Object.keys(back.series).sort()).toEqual(Object.keys(r.series).sort());
      for (const k of ['input', 'trend', 'cycle'] as const) expect(Array.from(back[k])).toEqual(Array.from(r[k]));
      for (const k of Object.keys(r.series)) expect(Array.from(back.series[k])).toEqual(Array.from(r.series[k]));
      expect([back.method, back.params, back.periods, back.extension, back.warnings]).toEqual([r.method, r.params, r.periods, r.extension, r.warnings]);
    }
  });
});
