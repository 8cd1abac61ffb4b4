/**
 * The Catalogue search through its index of three-character pieces (migration 0070): for every
 * query, the API's answer is exactly what the plain LIKE over every series gives (the search as
 * it was before the index, run here straight against MariaDB), after series are defined through
 * the API and written directly, renamed and deleted. A vintage's observations, read in one query,
 * are the rows the database holds, and the 404s still say what is missing.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { makeTestApp, type TestApp } from '../helpers/app.js';
import { signedIn } from '../helpers/session.js';
import { searchPieces } from '../../server/services/catalogue/search.js';

let t: TestApp;
let steward: Awaited<ReturnType<typeof signedIn>>;

const TITLES: [string, string][] = [
  ['EMIGRE_Q', 'Émigré remittances, quarterly'],
  ['STRASSE', 'Straßenbau (road building), Straße'],
  ['UP_LOWER', 'MiXeD CaSe Title with 100% coverage'],
  ['PCT_1', 'Share of GDP, 50_50 split'],
  ['EMOJI', 'Growth 📈 chart 📈📈 series'],
  ['QUOTE', "O'Neil's index \\ with a backslash"],
  ['SPACES', 'Real   output  (three spaces)'],
  ['CJK', '国内生产总值 季度'],
];

beforeAll(async () => {
  t = await makeTestApp({}, { seedDemo: true });
  steward = await signedIn(t, 'steward@demo.test');
  for (const [code, title] of TITLES.slice(0, 4)) await steward.post('/api/v1/series').send({ code, title, frequency: 'Q', unit: 'index', seasonalAdjustment: 'sa', source: 'test' }).expect(201);
  // Written directly too, as seeds and scripts do: the triggers index these as well.
  await t.db('series').insert(TITLES.slice(4).map(([code, title]) => ({ code, title, frequency: 'Q', unit: 'index', seasonal_adjustment: 'sa', source: 'test' })));
  await t.db('series').insert(Array.from({ length: 300 }, (_, s) => ({ code: `SC_${String(s).padStart(5, '0')}`, title: `Scale-test series ${s} (invented)`, frequency: 'Q', unit: 'index', seasonal_adjustment: 'sa', source: 'test' })));
});
afterAll(async () => {
  await t.close();
});

const QUERIES = ['SC_0012', 'sc_001', 'series 12', 'GDP', 'gdp', 'émi', 'EMI', 'emigre', 'Straße', 'strasse', 'STRASSE', 'mixed case', '100%', '50_50', '50\\_50', '📈', '📈📈 s', "o'neil", 'backslash', '\\', 'Real   output', 'real output', '国内生产', '产总值 季', 'a', 'ab', '%', '_', '__', 'abc', 'zzzz-nothing', 'est_', 'Real GDP', '(invented)', 'ies 29'];

/** The plain LIKE over every series, the text escaped so that % and _ are found as typed. */
async function reference(q: string): Promise<string[]> {
  const text = q.replace(/[\\%_]/g, (c) => `\\${c}`);
  const rows = await t.db('series').where((w) => w.where('code', 'like', `%${text}%`).orWhere('title', 'like', `%${text}%`)).orderBy('code').select('code');
  return rows.map((r) => r.code);
}

async function search(q: string): Promise<string[]> {
  const res = await steward.get(`/api/v1/series?q=${encodeURIComponent(q)}`).expect(200);
  return res.body.items.map((s: { code: string }) => s.code);
}

describe('Catalogue search through the index of pieces', () => {
  it('answers every query exactly as the LIKE over every series does', async () => {
    for (const q of QUERIES) expect({ q, codes: await search(q) }).toEqual({ q, codes: await reference(q) });
    // The queries found something where they should: the comparison is not between two empty lists.
    expect(await search('émi')).toEqual(['EMIGRE_Q']);
    expect(await search('SC_0012')).toHaveLength(10);
    expect((await search('国内生产')).length).toBe(1);
    // % and _ are found as typed, not as wildcards: "est_" is not "test " and "%" is not everything.
    expect(await search('%')).toEqual(await search('100%'));
    expect((await search('%')).length).toBeGreaterThan(0);
    expect((await search('est_')).every((code) => code.toLowerCase().includes('est_'))).toBe(true);
  });

  it('follows renames and deletions', async () => {
    const id = (await t.db('series').where('code', 'UP_LOWER').first()).id;
    await steward.patch(`/api/v1/series/${id}`).send({ title: 'Renamed: terms of trade' }).expect(200);
    expect(await search('terms of trade')).toEqual(['UP_LOWER']);
    expect(await search('coverage')).toEqual([]);
    await steward.patch(`/api/v1/series/${id}`).send({ code: 'TOT_Q' }).expect(200);
    expect(await search('TOT_')).toEqual(['TOT_Q']);
    expect(await search('UP_low')).toEqual([]);
    await steward.delete(`/api/v1/series/${id}`).expect(204);
    expect(await search('terms of trade')).toEqual([]);
    expect(Number((await t.db('series_grams').where('series_id', id).count({ n: '*' }))[0].n)).toBe(0);
    for (const q of ['TOT', 'trade', 'SC_00', 'series 1']) expect({ q, codes: await search(q) }).toEqual({ q, codes: await reference(q) });
  });

  it('looks up pieces of the text between wildcards, none across them', () => {
    expect(searchPieces('SC_0123')).toEqual(['012', '123']);
    expect(searchPieces('ab')).toEqual([]);
    expect(searchPieces('a%bcd_ef')).toEqual(['bcd']);
    expect(searchPieces('50\\_50')).toEqual([]);
    expect(searchPieces('📈📈 s')).toEqual(['📈📈 ', '📈 s']);
  });

});

describe('a vintage read in one query', () => {
  it('answers each vintage, and "latest", with its stored rows as the database holds them', async () => {
    const gdp = (await t.db('series').where('code', 'EST_GDP_REAL').first()).id;
    const stored = await t.db('vintages').where('series_id', gdp).orderBy('number').select('id', 'number', 'as_of');
    expect(stored.length).toBeGreaterThan(1);
    for (const v of [...stored, { ...stored.at(-1), number: 'latest' }]) {
      const rows = await t.db('observations').where('vintage_id', v.id).orderBy('period').select('period', 'value');
      const res = await steward.get(`/api/v1/series/${gdp}/vintages/${v.number}/observations`).expect(200);
      expect(res.body).toEqual({ vintage: stored.find((s) => s.id === v.id)!.number, asOf: new Date(v.as_of).toISOString().slice(0, 10), periods: rows.map((r) => r.period), values: rows.map((r) => r.value) });
    }
  });

  it('says which is missing: the series, the vintage, any vintage; and what a vintage is', async () => {
    const empty = (await t.db('series').where('code', 'EMOJI').first()).id;
    const gdp = (await t.db('series').where('code', 'EST_GDP_REAL').first()).id;
    expect((await steward.get(`/api/v1/series/${gdp}/vintages/99/observations`).expect(404)).body.error.message).toMatch(/^Vintage 99 of this series/);
    expect((await steward.get(`/api/v1/series/${empty}/vintages/latest/observations`).expect(404)).body.error.message).toMatch(/^A vintage of this series \(none is loaded yet\)/);
    expect((await steward.get(`/api/v1/series/99999999/vintages/1/observations`).expect(404)).body.error.message).toMatch(/^The series/);
    expect((await steward.get(`/api/v1/series/${gdp}/vintages/first/observations`).expect(400)).body.error.code).toBe('invalid_vintage');
  });
});
