/**
 * The Catalogue's list in pages (`GET /series?limit=&offset=`, answering `total`): pages laid end
 * to end are the whole list, in code order, each series once; `total` is the number of matching
 * series as MariaDB counts them directly; the search and the filters page the same way; the list
 * without the new parameters is what it always was; bad values answer 400 in the error shape.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { makeTestApp, type TestApp } from '../helpers/app.js';
import { signedIn } from '../helpers/session.js';

let t: TestApp;
let reader: Awaited<ReturnType<typeof signedIn>>;

type Item = { id: number; code: string; frequency: string; latestVintage: unknown };

beforeAll(async () => {
  t = await makeTestApp({}, { seedDemo: true });
  reader = await signedIn(t, 'viewer@demo.test');
  // Written in reverse code order, so that id order and code order differ; three frequencies.
  const rows = Array.from({ length: 130 }, (_, k) => 129 - k).map((k) => ({
    code: `PG_${String(k).padStart(3, '0')}`,
    title: `Paging test series ${k} (invented)`,
    frequency: ['Q', 'M', 'A'][k % 3],
    unit: k % 2 ? 'index' : 'percent',
    seasonal_adjustment: 'sa',
    source: 'test',
  }));
  await t.db('series').insert(rows);
});
afterAll(async () => {
  await t.close();
});

/** The codes MariaDB holds, in code order, matching `where` (straight from the table). */
async function reference(where: (q: ReturnType<TestApp['db']>) => unknown = () => undefined): Promise<string[]> {
  const query = t.db('series').orderBy('code').select('code');
  where(query);
  return (await query).map((r: { code: string }) => r.code);
}

/** Every page of `params` at `limit` series a page, laid end to end, and the totals answered. */
async function allPages(params: string, limit: number) {
  const items: Item[] = [];
  const totals = new Set<number>();
  for (let offset = 0; offset < 1000; offset += limit) {
    const res = await reader.get(`/api/v1/series?${params}&limit=${limit}&offset=${offset}`).expect(200);
    expect(res.body.items.length).toBeLessThanOrEqual(limit);
    totals.add(res.body.total);
    items.push(...res.body.items);
    if (res.body.items.length < limit) break;
  }
  return { items, totals: [...totals] };
}

describe('The Catalogue in pages', () => {
  it('answers the whole list without limit or offset, as before, with total beside it', async () => {
    const res = await reader.get('/api/v1/series').expect(200);
    const codes = await reference();
    expect(codes.length).toBeGreaterThan(130);
    expect(res.body.items.map((s: Item) => s.code)).toEqual(codes);
    expect(res.body.total).toBe(codes.length);
    expect(Object.keys(res.body).sort()).toEqual(['items', 'total']);
    expect(res.body.items[0]).toEqual(expect.objectContaining({ id: expect.any(Number), code: expect.any(String), title: expect.any(String), frequency: expect.any(String), unit: expect.any(String) }));
    // The demo series have vintages: the list still says which is the latest.
    expect(res.body.items.filter((s: Item) => s.latestVintage).length).toBeGreaterThan(0);
  });

  it('pages laid end to end are the whole list, each series once, in code order, with the same total', async () => {
    const whole = (await reader.get('/api/v1/series').expect(200)).body.items as Item[];
    for (const limit of [1, 37, 50, 500]) {
      const { items, totals } = await allPages('', limit);
      expect({ limit, totals }).toEqual({ limit, totals: [whole.length] });
      // The same series with the same latest vintages as the unpaged list.
      expect(items).toEqual(whole);
    }
  });

  it('pages a search and the filters, total counting every match', async () => {
    const cases: [string, (q: any) => unknown][] = [
      ['q=PG_0', (q) => q.where((w: any) => w.where('code', 'like', '%PG_0%').orWhere('title', 'like', '%PG_0%'))],
      ['q=series%201', (q) => q.where((w: any) => w.where('code', 'like', '%series 1%').orWhere('title', 'like', '%series 1%'))],
      ['frequency=M', (q) => q.where('frequency', 'M')],
      ['q=paging&frequency=A&unit=index', (q) => q.where('title', 'like', '%paging%').where('frequency', 'A').where('unit', 'index')],
    ];
    for (const [params, where] of cases) {
      const codes = await reference(where);
      expect(codes.length).toBeGreaterThan(10);
      const { items, totals } = await allPages(params, 10);
      expect({ params, codes: items.map((s) => s.code), totals }).toEqual({ params, codes, totals: [codes.length] });
    }
  });

  it('answers an empty page past the end, and zero for a search that finds nothing', async () => {
    const total = (await reference()).length;
    expect((await reader.get(`/api/v1/series?limit=50&offset=${total}`).expect(200)).body).toEqual({ items: [], total });
    expect((await reader.get('/api/v1/series?q=zzzz-nothing&limit=20').expect(200)).body).toEqual({ items: [], total: 0 });
    const second = (await reader.get('/api/v1/series?q=PG_&limit=2&offset=2').expect(200)).body;
    expect(second.items.map((s: Item) => s.code)).toEqual(['PG_002', 'PG_003']);
    expect(second.total).toBe(130);
  });

  it('refuses a bad limit or offset with the error shape, naming the parameter', async () => {
    for (const [params, path] of [
      ['limit=0', 'limit'],
      ['limit=501', 'limit'],
      ['limit=abc', 'limit'],
      ['limit=2.5', 'limit'],
      ['limit=', 'limit'],
      ['offset=-1', 'offset'],
      ['limit=10&offset=x', 'offset'],
    ]) {
      const res = await reader.get(`/api/v1/series?${params}`).expect(400);
      expect(res.body.error.code).toBe('invalid_input');
      expect(res.body.error.message).toContain(path);
      expect(res.body.error.details.map((d: { path: string }) => d.path)).toContain(path);
    }
  });

  it('sorts by title, frequency or unit (then code), either way, on every page alike', async () => {
    const pg = (await reference((q) => (q as any).where('code', 'like', 'PG\\_%'))).length;
    for (const [sort, order] of [['title', 'asc'], ['unit', 'desc'], ['frequency', 'asc'], ['code', 'desc']] as const) {
      const { items } = await allPages(`q=PG_&sort=${sort}&order=${order}`, 25);
      expect(items).toHaveLength(pg);
      const rows = await t.db('series').where('code', 'like', 'PG\\_%').orderBy([{ column: sort, order }, { column: 'code', order }]).select('code');
      expect(items.map((s: Item) => s.code), `${sort} ${order}`).toEqual(rows.map((r: { code: string }) => r.code));
    }
    const bad = await reader.get('/api/v1/series?sort=notes').expect(400);
    expect(bad.body.error.details.map((d: { path: string }) => d.path)).toContain('sort');
  });

  it('lists the units with how many series each, and filters by one', async () => {
    const units = (await reader.get('/api/v1/catalogue/units').expect(200)).body.items as { unit: string; series: number }[];
    const counted = await t.db('series').groupBy('unit').orderBy('unit').select('unit').count({ n: '*' });
    expect(units).toEqual((counted as { unit: string; n: number }[]).map((r) => ({ unit: r.unit, series: Number(r.n) })));
    const percent = units.find((u) => u.unit === 'percent')!;
    expect((await reader.get('/api/v1/series?unit=percent&limit=1').expect(200)).body.total).toBe(percent.series);
  });
});
