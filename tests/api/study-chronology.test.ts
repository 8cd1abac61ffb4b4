/**
 * A study keeps the reference chronology its charts shade: saved, read back, changed, cleared,
 * kept by a duplicate and by changes that do not mention it; an unknown chronology is refused and
 * changes nothing; an exhibit drafted from the study shades the same chronology unless told
 * otherwise.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { makeTestApp, type TestApp } from '../helpers/app.js';
import { signedIn } from '../helpers/session.js';

let t: TestApp;
let economist: Awaited<ReturnType<typeof signedIn>>;
let gdpId: number;
let chronologyId: number;

beforeAll(async () => {
  t = await makeTestApp({}, { seedDemo: true });
  economist = await signedIn(t, 'economist@demo.test');
  gdpId = (await t.db('series').where('code', 'EST_GDP_REAL').first()).id;
  chronologyId = (await t.db('chronologies').first('id')).id;
});
afterAll(async () => {
  await t.close();
});

const create = (over: Record<string, unknown> = {}) => economist.post('/api/v1/studies').send({ title: 'Gap with shading', seriesId: gdpId, transform: 'log100', method: 'hp', params: {}, ...over });

describe('a study’s chronology', () => {
  it('is saved, read back, kept by other changes and by a duplicate, and cleared with null', async () => {
    const s = (await create({ chronologyId }).expect(201)).body;
    expect(s.chronologyId).toBe(chronologyId);
    expect((await economist.get(`/api/v1/studies/${s.id}`).expect(200)).body.chronologyId).toBe(chronologyId);
    expect((await economist.patch(`/api/v1/studies/${s.id}`).send({ title: 'Renamed' }).expect(200)).body.chronologyId).toBe(chronologyId);
    const copy = (await economist.post(`/api/v1/studies/${s.id}/duplicate`).expect(201)).body;
    expect(copy.chronologyId).toBe(chronologyId);
    expect((await economist.patch(`/api/v1/studies/${s.id}`).send({ chronologyId: null }).expect(200)).body.chronologyId).toBeNull();
    expect((await create().expect(201)).body.chronologyId).toBeNull();
  });

  it('refuses a chronology that does not exist and changes nothing', async () => {
    const s = (await create({ chronologyId }).expect(201)).body;
    const res = await economist.patch(`/api/v1/studies/${s.id}`).send({ chronologyId: 999_999 }).expect(404);
    expect(res.body.error.message).toMatch(/reference chronology/);
    expect((await t.db('studies').where('id', s.id).first()).chronology_id).toBe(chronologyId);
    expect((await create({ chronologyId: 999_999 }).expect(404)).body.error.code).toBe('not_found');
  });

  it('an exhibit drafted from the study shades it, unless the draft says none', async () => {
    const s = (await create({ chronologyId }).expect(201)).body;
    const shaded = (await economist.post('/api/v1/exhibits').send({ studyId: s.id, title: 'Shaded like its study' }).expect(201)).body;
    expect((await t.db('exhibits').where('id', shaded.id).first()).chronology_id).toBe(chronologyId);
    expect(shaded.live.chronology).toMatchObject({ name: 'Staff reference chronology (invented)' });
    const plain = (await economist.post('/api/v1/exhibits').send({ studyId: s.id, title: 'Not shaded', chronologyId: null }).expect(201)).body;
    expect((await t.db('exhibits').where('id', plain.id).first()).chronology_id).toBeNull();
  });
});
