import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { decompose } from '../../server/analysis/index.js';
import { makeTestApp, type TestApp } from '../helpers/app.js';
import { references as R } from '../helpers/references.js';
import { signedIn } from '../helpers/session.js';
import { asText, ndjsonEvents } from '../helpers/parsers.js';

let t: TestApp;
let agent: Awaited<ReturnType<typeof signedIn>>;
beforeAll(async () => {
  t = await makeTestApp({}, { seedDemo: true });
  agent = await signedIn(t, 'economist@demo.test');
});
afterAll(async () => {
  await t.close();
});

describe('POST /api/v1/decompose', () => {
  it('answers the API.md example with periods, nulls for missing values and the parameters used', async () => {
    const res = await agent
      .post('/api/v1/decompose')
      .send({ frequency: 'Q', start: '1990-Q1', values: [101.2, 102.0, null, 103.9], transform: 'log100', method: 'hp', params: { lambda: 1600 } })
      .expect(200);
    expect(res.body).toMatchObject({ method: 'hp', params: { lambda: 1600 }, transform: 'log100', periods: ['1990-Q1', '1990-Q2', '1990-Q3', '1990-Q4'] });
    expect(res.body.input[0]).toBeCloseTo(461.71, 2);
    expect(res.body.input[2]).toBeNull();
    expect(res.body.cycle[2]).toBeNull();
    expect(typeof res.body.trend[2]).toBe('number'); // the trend runs through the gap
    expect(res.body.warnings.length).toBeGreaterThan(0);
  });

  it('fills in defaults by frequency and needs no start', async () => {
    const res = await agent.post('/api/v1/decompose').send({ frequency: 'M', values: R.series.unemp, method: 'hamilton' }).expect(200);
    expect(res.body.params).toEqual({ h: 24, p: 12 });
    expect(res.body.periods).toBeUndefined();
    expect(res.body.cycle.slice(0, 35).every((v: unknown) => v === null)).toBe(true);
  });

  it('agrees with the library (and so with the statsmodels fixtures)', async () => {
    const c = R.hp[0];
    const res = await agent.post('/api/v1/decompose').send({ frequency: 'Q', values: c.y, method: 'hp', params: { lambda: c.lambda } }).expect(200);
    const lib = decompose({ frequency: 'Q', values: c.y, method: 'hp', params: { lambda: c.lambda } });
    expect(res.body.trend).toEqual(Array.from(lib.trend));
  });

  const bad: [string, object, string][] = [
    ['an unknown method', { frequency: 'Q', values: [1, 2, 3], method: 'magic' }, 'invalid_input'],
    ['λ ≤ 0', { frequency: 'Q', values: [1, 2, 3, 4], method: 'hp', params: { lambda: -1 } }, 'invalid_parameter'],
    ['order 4', { frequency: 'Q', values: [1, 2, 3, 4, 5, 6], method: 'whittaker', params: { order: 4 } }, 'invalid_parameter'],
    ['a string among the values', { frequency: 'Q', values: [1, 'x', 3], method: 'hp' }, 'invalid_values'],
    ['a log of a negative value', { frequency: 'Q', values: [1, -2, 3], method: 'hp', transform: 'log' }, 'log_of_non_positive'],
    ['too short for hp', { frequency: 'Q', values: [1, 2], method: 'hp' }, 'series_too_short'],
    ['too short for hamilton', { frequency: 'Q', values: Array.from({ length: 12 }, (_, i) => i), method: 'hamilton' }, 'series_too_short'],
    ['too short for baxter-king', { frequency: 'Q', values: Array.from({ length: 20 }, (_, i) => i), method: 'baxter-king' }, 'series_too_short'],
    ['a bad frequency', { frequency: 'W', values: [1, 2, 3], method: 'hp' }, 'invalid_input'],
  ];
  for (const [name, body, code] of bad) {
    it(`refuses ${name} with 400 and a message`, async () => {
      const res = await agent.post('/api/v1/decompose').send(body).expect(400);
      expect(res.body.error.code).toBe(code);
      expect(res.body.error.message.length).toBeGreaterThan(10);
    });
  }

  it('refuses more than 1 000 000 values with 400', async () => {
    const res = await agent.post('/api/v1/decompose').send({ frequency: 'M', values: new Array(1_000_001).fill(1), method: 'hp' }).expect(400);
    expect(res.body.error.message).toMatch(/at most 1,000,000/);
  });

  it('answers 413 to a body over the limit', async () => {
    const small = await makeTestApp({ MAX_JSON_MB: '1' }, { seedDemo: true });
    try {
      const a = await signedIn(small, 'economist@demo.test');
      const res = await a.post('/api/v1/decompose').send({ frequency: 'M', values: new Array(300_000).fill(1.2345), method: 'hp' }).expect(413);
      expect(res.body.error.code).toBe('too_large');
    } finally {
      await small.close();
    }
  });
});

describe('POST /api/v1/decompose/batch', () => {
  it('decomposes stored series by id and vintage, and values sent inline, in order', async () => {
    const gdp = await t.db('series').where('code', 'EST_GDP_REAL').first();
    const res = await agent
      .post('/api/v1/decompose/batch')
      .send({
        items: [
          { id: 'v3', seriesId: gdp.id, vintage: 3, transform: 'log100', method: 'hp' },
          { id: 'latest', seriesId: gdp.id, vintage: 'latest', transform: 'log100', method: 'hamilton' },
          { id: 'inline', frequency: 'A', values: [1, 2, 4, 7, 11], method: 'hp', params: { lambda: 1 } },
          { id: 'missing', seriesId: 999999, method: 'hp' },
          { id: 'bad', frequency: 'Q', values: [1], method: 'hp' },
        ],
      })
      .expect(200);
    const [a, b, c, d, e] = res.body.items;
    expect(a).toMatchObject({ id: 'v3', seriesId: gdp.id, vintage: 3, method: 'hp' });
    expect(a.periods[a.periods.length - 1]).toBe('2025-Q1');
    expect(b.vintage).toBe(4);
    expect(c.trend[0]).toBeCloseTo(13 / 24, 12);
    expect(d.error.code).toBe('not_found');
    expect(e.error.code).toBe('series_too_short');
  });

  it('runs a large batch on worker threads with the same numbers as the library', async () => {
    const items = Array.from({ length: 1500 }, (_, k) => ({ id: String(k), frequency: 'Q', values: Array.from({ length: 200 }, (_, i) => Math.sin(i / (5 + (k % 7))) + 0.01 * i), method: 'hp' }));
    const res = await agent.post('/api/v1/decompose/batch').send({ items }).expect(200);
    expect(res.body.items).toHaveLength(1500);
    for (const k of [0, 777, 1499]) {
      const lib = decompose(items[k] as never);
      expect(res.body.items[k].id).toBe(String(k));
      expect(res.body.items[k].cycle).toEqual(Array.from(lib.cycle));
    }
  });

  it('reads large batches of stored series on the worker threads, with the same answers', async () => {
    const ids = (await t.db('series').select('id')).map((r) => r.id as number);
    const items = Array.from({ length: 260 }, (_, k) => ({ id: `s${k}`, seriesId: ids[k % ids.length], method: 'hp' }));
    const res = await agent.post('/api/v1/decompose/batch').send({ items }).expect(200);
    expect(res.body.items).toHaveLength(260);
    const one = await agent.post('/api/v1/decompose/batch').send({ items: [items[7]] }).expect(200);
    expect(res.body.items[7]).toEqual(one.body.items[0]);
    const missing = await agent.post('/api/v1/decompose/batch').send({ items: [...items, { id: 'gone', seriesId: 999999, method: 'hp' }] }).expect(200);
    expect(missing.body.items[260].error.code).toBe('not_found');
  });

  it('streams progress as NDJSON and answers summaries', async () => {
    const items = Array.from({ length: 1200 }, (_, k) => ({ frequency: 'Q', values: Array.from({ length: 200 }, (_, i) => Math.cos(i / 9) + k), method: 'hp' }));
    const res = await agent
      .post('/api/v1/decompose/batch')
      .set('Accept', 'application/x-ndjson')
      .send({ items, output: 'summary' })
      .buffer(true)
      .parse(asText as never)
      .expect(200);
    const events = ndjsonEvents(res.body);
    const progress = events.filter((e) => e.type === 'progress');
    expect(progress.length).toBeGreaterThan(0);
    expect(progress[progress.length - 1].done).toBe(1200);
    const result = events.find((e) => e.type === 'result').result;
    expect(result.items).toHaveLength(1200);
    expect(result.items[0].last.index).toBe(199);
    expect(result.items[0].statistics.sd).toBeGreaterThan(0);
  });
});

describe('methods, gain and λ', () => {
  it('lists the methods with their conventional parameters and the λ presets', async () => {
    const res = await agent.get('/api/v1/methods').expect(200);
    expect(res.body.methods.map((m: { id: string }) => m.id)).toContain('christiano-fitzgerald');
    expect(res.body.presets.Q.map((p: { lambda: number }) => p.lambda)).toEqual([1600, 1600, 400000]);
    expect(res.body.presets.M.find((p: { id: string }) => p.id === 'ravn-uhlig').lambda).toBe(129600);
    // The parameter editor renders from these descriptions: Whittaker's order is a choice with labels.
    const whittaker = res.body.methods.find((m: { id: string }) => m.id === 'whittaker');
    expect(whittaker.params.find((p: { name: string }) => p.name === 'order').options.map((o: { value: number }) => o.value)).toEqual([1, 2, 3]);
    expect(res.body.methods.find((m: { id: string }) => m.id === 'l1-trend').initial.Q).toEqual({ lambda: 10 });
    // OpenAPI reads the same registry: the body's method list and each method's params.
    const doc = (await agent.get('/api/v1/openapi.json').expect(200)).body;
    const body = doc.paths['/api/v1/decompose'].post.requestBody.content['application/json'].schema;
    expect(body.properties.method.enum).toEqual(res.body.methods.map((m: { id: string }) => m.id));
    expect(doc.components.schemas.Params_whittaker.properties.order.anyOf.map((o: { const: number }) => o.const)).toEqual([1, 2, 3]);
  });
  it('converts λ to the cut-off period and back', async () => {
    const a = await agent.get('/api/v1/lambda?lambda=1600').expect(200);
    expect(a.body.cutoffPeriod).toBeCloseTo(39.7, 1);
    const b = await agent.get(`/api/v1/lambda?cutoff=${a.body.cutoffPeriod}`).expect(200);
    expect(b.body.lambda).toBeCloseTo(1600, 6);
  });
  it('draws the gain of a filter with its cut-off', async () => {
    const res = await agent.get('/api/v1/gain?method=hp&frequency=Q&params=' + encodeURIComponent('{"lambda":1600}')).expect(200);
    expect(res.body.cutoff).toBeCloseTo(39.7, 1);
    expect(res.body.gain.length).toBe(res.body.periods.length);
    const bk = await agent.get('/api/v1/gain?method=baxter-king&frequency=Q').expect(200);
    expect(bk.body.band).toEqual([6, 32]);
  });
});
