/**
 * Exhibit updates (issue 15): an economist prepares an update of a published exhibit (a new draft
 * linked to it, same settings, newer vintage); the Review desk compares it with the published
 * one; publishing it supersedes the old one, which stays readable and unchanged, points to its
 * successor, and the successor points back. Readers see no review talk of either.
 */
import JSZip from 'jszip';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { makeTestApp, type TestApp } from '../helpers/app.js';
import { asBytes } from '../helpers/parsers.js';
import { addPerson, signedIn } from '../helpers/session.js';

type Agent = Awaited<ReturnType<typeof signedIn>>;
let t: TestApp;
let author: Agent;
let economist2: Agent;
let editor: Agent;
let viewer: Agent;
let steward: Agent;
let admin: Agent;
let gdpId: number;

const move = (who: Agent, id: number, to: string, comment?: string) => who.post(`/api/v1/exhibits/${id}/transitions`).send({ to, ...(comment ? { comment } : {}) });
async function publish(id: number, by: Agent = author) {
  await move(by, id, 'in_review').expect(200);
  await move(editor, id, 'approved').expect(200);
  return (await move(editor, id, 'published').expect(200)).body;
}

beforeAll(async () => {
  t = await makeTestApp({}, { seedDemo: true });
  author = await signedIn(t, 'economist@demo.test');
  editor = await signedIn(t, 'editor@demo.test');
  viewer = await signedIn(t, 'viewer@demo.test');
  steward = await signedIn(t, 'steward@demo.test');
  admin = await signedIn(t, 'admin@demo.test');
  economist2 = await addPerson(t, 'second.economist@demo.test', 'Second Economist', ['economist']);
  gdpId = (await t.db('series').where('code', 'EST_GDP_REAL').first()).id;
}, 120_000);
afterAll(async () => {
  await t?.close();
});

describe('an update of an exhibit whose study pins an older vintage', () => {
  let oldId: number;
  let oldChecksum: string;
  let updateId: number;

  it('is a new draft with the same settings on the newest vintage; one update at a time; only of a published exhibit', async () => {
    const studyId = (await author.post('/api/v1/studies').send({ title: 'Gap as of vintage 3', seriesId: gdpId, vintage: 3, transform: 'log100', method: 'hp', params: { lambda: 1600 } }).expect(201)).body.id;
    const old = (await author.post('/api/v1/exhibits').send({ studyId, title: 'The gap, spring report', subtitle: 'As published in spring', number: 'Chart 2', notes: 'Internal note' }).expect(201)).body;
    oldId = old.id;
    const draftUpdate = await author.post(`/api/v1/exhibits/${oldId}/update`).expect(409);
    expect(draftUpdate.body.error.code).toBe('not_published');
    // Someone else's draft is not there for them.
    await economist2.post(`/api/v1/exhibits/${oldId}/update`).expect(404);
    const published = await publish(oldId);
    expect(published.snapshot.vintageStamp).toMatch(/vintage 3$/);
    oldChecksum = published.snapshotChecksum;

    await viewer.post(`/api/v1/exhibits/${oldId}/update`).expect(403);
    const u = (await economist2.post(`/api/v1/exhibits/${oldId}/update`).expect(201)).body;
    updateId = u.id;
    expect(u).toMatchObject({ status: 'draft', updateOf: oldId, vintagePin: 4, title: 'The gap, spring report', subtitle: 'As published in spring', number: 'Chart 2', notes: 'Internal note', studyId, author: { name: 'Second Economist' } });
    expect(u.predecessor).toMatchObject({ id: oldId, status: 'published' });
    expect(u.live.vintageStamp).toMatch(/vintage 4$/);
    expect(u.live.studies[0]).toMatchObject({ id: studyId, vintage: 4 });
    // The study itself still pins vintage 3.
    expect((await author.get(`/api/v1/studies/${studyId}`).expect(200)).body.vintage).toBe(3);

    const again = await author.post(`/api/v1/exhibits/${oldId}/update`).expect(409);
    expect(again.body.error).toMatchObject({ code: 'update_in_progress', details: { exhibitId: updateId } });
    // A draft update is the author's: readers and other economists do not see it.
    await viewer.get(`/api/v1/exhibits/${updateId}`).expect(404);
    expect((await viewer.get(`/api/v1/exhibits/${oldId}`).expect(200)).body).toMatchObject({ status: 'published', successor: null, updatesInProgress: [] });
    // The update in progress shows on the published exhibit to whoever may see the draft: its author only, for now.
    expect((await economist2.get(`/api/v1/exhibits/${oldId}`).expect(200)).body.updatesInProgress).toEqual([{ id: updateId, status: 'draft', author: { id: u.author.id, name: 'Second Economist' } }]);
    expect((await author.get(`/api/v1/exhibits/${oldId}`).expect(200)).body.updatesInProgress).toEqual([]);
    expect((await editor.get(`/api/v1/exhibits/${oldId}`).expect(200)).body.updatesInProgress).toEqual([]);
  });

  it('the Review desk shows the change against the published exhibit: data, parameters, text', async () => {
    await economist2.patch(`/api/v1/exhibits/${updateId}`).send({ subtitle: 'As revised in summer' }).expect(200);
    await move(economist2, updateId, 'in_review').expect(200);
    expect((await editor.get(`/api/v1/exhibits/${oldId}`).expect(200)).body.updatesInProgress).toEqual([{ id: updateId, status: 'in_review', author: expect.objectContaining({ name: 'Second Economist' }) }]);
    expect((await viewer.get(`/api/v1/exhibits/${oldId}`).expect(200)).body.updatesInProgress).toEqual([]);
    const queue = (await editor.get('/api/v1/review').expect(200)).body.items;
    expect(queue.find((e: { id: number }) => e.id === updateId)).toMatchObject({ updateOf: oldId });
    const d = (await editor.get(`/api/v1/exhibits/${updateId}/diff`).expect(200)).body;
    expect(d.published.exhibitId).toBe(oldId);
    expect(d.published.snapshot.vintageStamp).toMatch(/vintage 3$/);
    expect(d.published.diff.text).toEqual([{ field: 'subtitle', before: 'As published in spring', after: 'As revised in summer' }]);
    expect(d.published.diff.studies).toEqual([expect.objectContaining({ what: 'vintage', before: 3, after: 4 })]);
    const cycle = d.published.diff.data.find((x: { line: string }) => x.line === 'cycle');
    const v3 = (await steward.get(`/api/v1/series/${gdpId}/vintages/3/observations`).expect(200)).body;
    const v4 = (await steward.get(`/api/v1/series/${gdpId}/vintages/4/observations`).expect(200)).body;
    expect(cycle.newPeriods).toBe(v4.periods.length - v3.periods.length);
    expect(cycle.changedPeriods).toBeGreaterThan(0);
    expect(cycle.maxAbsChange).toBeGreaterThan(0);
    // Returned once with a comment that is review talk.
    await move(editor, updateId, 'returned', 'REVIEW TALK: tighten the subtitle').expect(200);
    await move(economist2, updateId, 'in_review').expect(200);
  });

  it('publishing supersedes the old exhibit: unchanged, readable, pointing to its successor, which points back', async () => {
    await move(editor, updateId, 'approved').expect(200);
    const pub = (await move(editor, updateId, 'published').expect(200)).body;
    expect(pub.status).toBe('published');
    expect(pub.predecessor).toMatchObject({ id: oldId, status: 'superseded' });

    const old = (await viewer.get(`/api/v1/exhibits/${oldId}`).expect(200)).body;
    expect(old.status).toBe('superseded');
    expect(old.successor).toMatchObject({ id: updateId, title: 'The gap, spring report' });
    expect(old.snapshotChecksum).toBe(oldChecksum);
    expect(old.snapshot.vintageStamp).toMatch(/vintage 3$/);
    expect(old.events.map((e: { to: string }) => e.to)).toEqual(['published', 'superseded']);
    // The old exhibit's own row is as it was published; the link is a row of its own, written once.
    expect((await t.db('exhibits').where('id', oldId).first()).status).toBe('published');
    expect(await t.db('exhibit_supersessions').where('exhibit_id', oldId).first()).toMatchObject({ successor_id: updateId });
    await expect(t.db('exhibit_supersessions').where('exhibit_id', oldId).update({ successor_id: oldId })).rejects.toThrow(/written once/);
    await expect(t.db('exhibit_supersessions').where('exhibit_id', oldId).delete()).rejects.toThrow(/written once/);

    // A reader sees the update and its publication record, never the review talk.
    const seen = await viewer.get(`/api/v1/exhibits/${updateId}`).expect(200);
    expect(seen.body.predecessor).toMatchObject({ id: oldId });
    expect(JSON.stringify(seen.body)).not.toContain('REVIEW TALK');
    expect(JSON.stringify(old)).not.toContain('REVIEW TALK');
    await viewer.get(`/api/v1/exhibits/${updateId}/diff`).expect(403);

    // Lists: published and superseded apart.
    const published = (await viewer.get('/api/v1/exhibits?status=published').expect(200)).body.items.map((e: { id: number }) => e.id);
    const superseded = (await viewer.get('/api/v1/exhibits?status=superseded').expect(200)).body.items.map((e: { id: number }) => e.id);
    expect(published).toContain(updateId);
    expect(published).not.toContain(oldId);
    expect(superseded).toEqual([oldId]);
  });

  it('a superseded exhibit is not withdrawn, updated again or moved to superseded by hand; its public link says where its successor is', async () => {
    expect((await move(editor, oldId, 'withdrawn', 'no').expect(409)).body.error.code).toBe('move_not_allowed');
    expect((await author.post(`/api/v1/exhibits/${oldId}/update`).expect(409)).body.error).toMatchObject({ code: 'already_superseded', details: { successorId: updateId } });
    expect((await move(editor, updateId, 'superseded').expect(409)).body.error.message).toMatch(/prepare an update/);
    await admin.put('/api/v1/settings').send({ publicExhibitLinks: true }).expect(200);
    const slugOld = (await t.db('exhibits').where('id', oldId).first()).public_slug;
    const slugNew = (await t.db('exhibits').where('id', updateId).first()).public_slug;
    const pub = (await request(t.app).get(`/api/v1/public/exhibits/${slugOld}`).expect(200)).body;
    expect(pub).toMatchObject({ status: 'superseded', successorSlug: slugNew });
    expect(JSON.stringify(pub)).not.toContain('Internal note');
  });
});

describe('an update of an exhibit whose study follows the latest vintage', () => {
  it('draws on the vintage loaded after publication', async () => {
    const demo = (await t.db('exhibits').where({ title: 'The output gap of Estuary', status: 'published' }).first()).id;
    const v4 = (await steward.get(`/api/v1/series/${gdpId}/vintages/4/observations`).expect(200)).body;
    const rows = v4.periods.map((p: string, i: number) => `${p},${v4.values[i] ?? ''}`);
    const last = v4.periods[v4.periods.length - 1] as string;
    const [y, q] = last.split('-Q').map(Number);
    rows.push(`${q === 4 ? y + 1 : y}-Q${q === 4 ? 1 : q + 1},${(v4.values[v4.values.length - 1] * 1.004).toFixed(1)}`);
    await steward.post(`/api/v1/series/${gdpId}/vintages`).attach('file', Buffer.from(['period,value', ...rows].join('\n') + '\n'), 'v5.csv').expect(201);
    const u = (await author.post(`/api/v1/exhibits/${demo}/update`).expect(201)).body;
    expect(u.vintagePin).toBeNull();
    expect(u.live.vintageStamp).toMatch(/vintage 5$/);
    expect((await author.get(`/api/v1/exhibits/${demo}`).expect(200)).body.snapshot.vintageStamp).toMatch(/vintage 4$/);
  });
});

describe('an update of an exhibit drafted from a board panel', () => {
  it('replaces the old exhibit in the board’s publication pack once published', async () => {
    const board = (await author.post('/api/v1/boards').send({ title: 'Pack board', visibility: 'team' }).expect(201)).body;
    const studyId = (await author.post('/api/v1/studies').send({ title: 'Panel study', seriesId: gdpId, vintage: 'latest', transform: 'log100', method: 'hp', params: {} }).expect(201)).body.id;
    const panel = (await author.post(`/api/v1/boards/${board.id}/panels`).send({ title: 'Gap', studyIds: [studyId], width: 1, height: 'm' }).expect(201)).body;
    const old = (await author.post('/api/v1/exhibits').send({ panelId: panel.id, title: 'Panel gap, first edition' }).expect(201)).body.id;
    await publish(old);
    const files = async () => Object.keys((await JSZip.loadAsync((await viewer.get(`/api/v1/boards/${board.id}/pack.zip`).buffer(true).parse(asBytes as never).expect(200)).body as Buffer)).files).sort();
    expect(await files()).toEqual(['chart-01-Panel_gap_first_edition.csv', 'chart-01-Panel_gap_first_edition.xlsx']);
    const u = (await author.post(`/api/v1/exhibits/${old}/update`).expect(201)).body;
    expect(u).toMatchObject({ panelId: panel.id, vintagePin: null, updateOf: old });
    await author.patch(`/api/v1/exhibits/${u.id}`).send({ title: 'Panel gap, second edition' }).expect(200);
    // While the update is in review, the pack still prints the published exhibit.
    await move(author, u.id, 'in_review').expect(200);
    expect(await files()).toEqual(['chart-01-Panel_gap_first_edition.csv', 'chart-01-Panel_gap_first_edition.xlsx']);
    await move(editor, u.id, 'approved').expect(200);
    await move(editor, u.id, 'published').expect(200);
    expect(await files()).toEqual(['chart-01-Panel_gap_second_edition.csv', 'chart-01-Panel_gap_second_edition.xlsx']);
    // Chosen by id, the superseded exhibit is refused from a pack like any exhibit that is not published.
    expect((await viewer.post('/api/v1/exhibits/pack').send({ ids: [old] }).expect(409)).body.error.message).toMatch(/is superseded/);
  }, 60_000);
});

describe('an exhibit whose study is gone', () => {
  it('cannot be updated, and says what to do instead; nothing is stored', async () => {
    const studyId = (await author.post('/api/v1/studies').send({ title: 'Short-lived study', seriesId: gdpId, vintage: 'latest', transform: 'log100', method: 'hp', params: {} }).expect(201)).body.id;
    const id = (await author.post('/api/v1/exhibits').send({ studyId, title: 'Orphan exhibit' }).expect(201)).body.id;
    await publish(id);
    await author.delete(`/api/v1/studies/${studyId}`).expect(204);
    const before = Number((await t.db('exhibits').count({ n: '*' }))[0].n);
    const res = await author.post(`/api/v1/exhibits/${id}/update`).expect(409);
    expect(res.body.error).toMatchObject({ code: 'exhibit_source_gone', message: expect.stringMatching(/draft a new exhibit/) });
    expect(Number((await t.db('exhibits').count({ n: '*' }))[0].n)).toBe(before);
    // The published exhibit itself still reads from its snapshot.
    expect((await viewer.get(`/api/v1/exhibits/${id}`).expect(200)).body.snapshot.text.title).toBe('Orphan exhibit');
  });
});
