import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { EXHIBIT_STATES, type ExhibitState } from '../../server/schemas/exhibits.js';
import { makeTestApp, type TestApp } from '../helpers/app.js';
import { addPerson, signedIn } from '../helpers/session.js';

type Agent = Awaited<ReturnType<typeof signedIn>>;
let t: TestApp;
let author: Agent;
let economist2: Agent;
let editor: Agent;
let editor2: Agent;
let viewer: Agent;
let steward: Agent;
let admin: Agent;
let dual: Agent; // economist and editor at once
let gdpId: number;
let studyId: number;

const addUser = (email: string, name: string, roles: string[]) => addPerson(t, email, name, roles);

beforeAll(async () => {
  t = await makeTestApp({}, { seedDemo: true });
  author = await signedIn(t, 'economist@demo.test');
  editor = await signedIn(t, 'editor@demo.test');
  viewer = await signedIn(t, 'viewer@demo.test');
  steward = await signedIn(t, 'steward@demo.test');
  admin = await signedIn(t, 'admin@demo.test');
  economist2 = await addUser('second.economist@demo.test', 'Second Economist', ['economist']);
  editor2 = await addUser('second.editor@demo.test', 'Second Editor', ['editor']);
  dual = await addUser('dual@demo.test', 'Dana Dual', ['economist', 'editor']);
  gdpId = (await t.db('series').where('code', 'EST_GDP_REAL').first()).id;
  studyId = (await author.post('/api/v1/studies').send({ title: 'Output gap', seriesId: gdpId, vintage: 'latest', transform: 'log100', method: 'hp', params: { lambda: 1600 } }).expect(201)).body.id;
}, 120_000);
afterAll(async () => {
  await t.close();
});

const draft = async (who: Agent = author, title = 'The output gap of Estuary') => (await who.post('/api/v1/exhibits').send({ studyId, title, subtitle: 'Deviation of real GDP from its trend' }).expect(201)).body;
const move = (who: Agent, id: number, to: ExhibitState, comment?: string) => who.post(`/api/v1/exhibits/${id}/transitions`).send({ to, ...(comment ? { comment } : {}) });

/** Drives a new exhibit into `state` by the allowed moves (superseded needs an update: exhibit-updates.test.ts). */
async function inState(state: Exclude<ExhibitState, 'superseded'>) {
  const e = await draft();
  const path: [Agent, ExhibitState, string?][] = {
    draft: [],
    in_review: [[author, 'in_review']],
    returned: [[author, 'in_review'], [editor, 'returned', 'Label the axis.']],
    approved: [[author, 'in_review'], [editor, 'approved']],
    published: [[author, 'in_review'], [editor, 'approved'], [editor, 'published']],
    withdrawn: [[author, 'in_review'], [editor, 'approved'], [editor, 'published'], [editor, 'withdrawn', 'Superseded.']],
  }[state] as [Agent, ExhibitState, string?][];
  for (const [who, to, c] of path) await move(who, e.id, to, c).expect(200);
  return e.id as number;
}

describe('the exhibit state machine', () => {
  it('walks draft → in review → returned → in review → approved → published → withdrawn, with a complete history', async () => {
    const e = await draft();
    expect(e.status).toBe('draft');
    expect(e.snapshot).toBeNull();
    expect(e.live.methodLine).toBe('Hodrick–Prescott, λ = 1 600; 100 × log');
    expect(e.units).toBe('% of trend');
    expect(e.sourceLine).toMatch(/Invented demo data/);

    const submitted = (await move(author, e.id, 'in_review').expect(200)).body;
    expect(submitted.status).toBe('in_review');
    expect(submitted.revision).toBe(1);
    expect(submitted.snapshot.vintageStamp).toBe('data as of 2025-08-14, vintage 4');
    expect(submitted.snapshot.software).toEqual({ name: 'Tidegauge', version: '0.1.0' });
    expect(submitted.snapshot.studies[0].vintageChecksum).toMatch(/^[0-9a-f]{64}$/);
    expect(submitted.snapshotChecksum).toMatch(/^[0-9a-f]{64}$/);

    const noComment = await move(editor, e.id, 'returned').expect(400);
    expect(noComment.body.error.code).toBe('comment_required');
    await move(editor, e.id, 'returned', 'Please shorten the subtitle.').expect(200);
    await author.patch(`/api/v1/exhibits/${e.id}`).send({ subtitle: 'Output gap' }).expect(200);
    const again = (await move(author, e.id, 'in_review').expect(200)).body;
    expect(again.revision).toBe(2);
    const diff = (await editor.get(`/api/v1/exhibits/${e.id}/diff`).expect(200)).body.diff;
    expect(diff.text).toEqual([{ field: 'subtitle', before: 'Deviation of real GDP from its trend', after: 'Output gap' }]);
    expect(diff.data.every((d: { changedPeriods: number }) => d.changedPeriods === 0)).toBe(true);

    await move(editor, e.id, 'approved', 'Good.').expect(200);
    const frozen = await author.patch(`/api/v1/exhibits/${e.id}`).send({ title: 'Changed' }).expect(409);
    expect(frozen.body.error.code).toBe('exhibit_frozen');
    await move(editor2, e.id, 'published').expect(200);
    await author.patch(`/api/v1/exhibits/${e.id}`).send({ title: 'Changed' }).expect(409);
    await move(editor, e.id, 'withdrawn').expect(400);
    const done = (await move(editor, e.id, 'withdrawn', 'Superseded by the November estimate.').expect(200)).body;

    expect(done.events.map((ev: { to: string }) => ev.to)).toEqual(['draft', 'in_review', 'returned', 'in_review', 'approved', 'published', 'withdrawn']);
    expect(done.events.map((ev: { actor: { name: string } }) => ev.actor.name)).toEqual(['Erin Economist', 'Erin Economist', 'Eddie Editor', 'Erin Economist', 'Eddie Editor', 'Second Editor', 'Eddie Editor']);
    expect(done.events[2].comment).toBe('Please shorten the subtitle.');
    expect(done.events[6].comment).toBe('Superseded by the November estimate.');
    expect(done.events.every((ev: { at: string }) => !Number.isNaN(Date.parse(ev.at)))).toBe(true);
  });

  it('refuses every other move for every role with 403 or 409, changing nothing', async () => {
    const states = ['draft', 'in_review', 'returned', 'approved', 'published', 'withdrawn'] as const;
    const actors: [string, Agent][] = [
      ['author', author],
      ['another economist', economist2],
      ['editor', editor],
      ['viewer', viewer],
      ['steward', steward],
      ['admin', admin],
    ];
    // The moves the rules allow: (state, to) → who.
    const allowed = (state: ExhibitState, to: ExhibitState, who: string) =>
      (who === 'author' && to === 'in_review' && (state === 'draft' || state === 'returned')) ||
      (who === 'editor' && state === 'in_review' && (to === 'returned' || to === 'approved')) ||
      (who === 'editor' && state === 'approved' && to === 'published') ||
      (who === 'editor' && state === 'published' && to === 'withdrawn');
    let checked = 0;
    for (const state of states) {
      const id = await inState(state);
      for (const [who, agent] of actors) {
        for (const to of EXHIBIT_STATES) {
          if (allowed(state, to, who)) continue;
          const res = await move(agent, id, to, 'a comment');
          expect([403, 409], `${who}: ${state} → ${to} gave ${res.status} ${JSON.stringify(res.body.error)}`).toContain(res.status);
          expect(res.body.error.code).toBeTruthy();
          checked++;
        }
      }
      const after = await t.db('exhibits').where('id', id).first();
      expect(after.status, `state of the ${state} exhibit`).toBe(state);
    }
    expect(checked).toBeGreaterThan(150);
  });

  it('nobody approves their own exhibit, even an editor', async () => {
    const dualStudy = (await dual.post('/api/v1/studies').send({ title: 'mine', seriesId: gdpId, vintage: 4, transform: 'log100', method: 'hp', params: {} }).expect(201)).body.id;
    const e = (await dual.post('/api/v1/exhibits').send({ studyId: dualStudy, title: 'Dual exhibit' }).expect(201)).body;
    await move(dual, e.id, 'in_review').expect(200);
    const own = await move(dual, e.id, 'approved').expect(403);
    expect(own.body.error.code).toBe('own_exhibit');
    await move(editor, e.id, 'approved').expect(200);
  });

  it('an approved exhibit keeps its numbers when a new vintage is loaded', async () => {
    const id = await inState('approved');
    const before = (await editor.get(`/api/v1/exhibits/${id}`).expect(200)).body;
    const csvBefore = (await editor.get(`/api/v1/exhibits/${id}/data?format=csv`).expect(200)).text;
    const obs = (await steward.get(`/api/v1/series/${gdpId}/vintages/latest/observations`).expect(200)).body;
    const lines = ['period,value', ...obs.periods.map((p: string, i: number) => `${p},${obs.values[i] * (i > obs.periods.length - 6 ? 1.01 : 1)}`), '2025-Q3,351000'];
    await steward.post(`/api/v1/series/${gdpId}/vintages`).attach('file', Buffer.from(lines.join('\n')), 'new.csv').expect(201);
    const after = (await editor.get(`/api/v1/exhibits/${id}`).expect(200)).body;
    expect(after.snapshot).toEqual(before.snapshot);
    expect(after.snapshotChecksum).toBe(before.snapshotChecksum);
    expect((await editor.get(`/api/v1/exhibits/${id}/data?format=csv`).expect(200)).text).toBe(csvBefore);
    // The study itself follows the new vintage.
    const live = (await author.get(`/api/v1/studies/${studyId}/result`).expect(200)).body;
    expect(live.vintage).toBe(5);
  });

  it('tells editors of a submission and the author of a return, an approval and a publication, by mail', async () => {
    t.mail.clear();
    const e = await draft(author, 'Mail check');
    await move(author, e.id, 'in_review').expect(200);
    const toEditors = await t.mail.waitFor((m) => /For review: Mail check/.test(m.subject));
    expect(toEditors.to).toEqual(expect.arrayContaining(['editor@demo.test', 'second.editor@demo.test']));
    expect(toEditors.to).not.toContain('economist@demo.test');
    await move(editor, e.id, 'returned', 'Add the source.').expect(200);
    const returned = await t.mail.waitFor((m) => /Returned: Mail check/.test(m.subject));
    expect(returned.to).toEqual(['economist@demo.test']);
    expect(returned.text).toContain('Add the source.');
    await move(author, e.id, 'in_review').expect(200);
    await move(editor, e.id, 'approved').expect(200);
    await t.mail.waitFor((m) => /Approved: Mail check/.test(m.subject));
    await move(editor, e.id, 'published').expect(200);
    const published = await t.mail.waitFor((m) => /Published: Mail check/.test(m.subject));
    expect(published.text).toContain(`/exhibits/${e.id}`);
  });
});

describe('who sees what', () => {
  it('readers see published exhibits only; the Review desk is oldest first', async () => {
    const d = await draft(author, 'Hidden draft');
    await viewer.get(`/api/v1/exhibits/${d.id}`).expect(404);
    const p = await inState('published');
    const seen = (await viewer.get(`/api/v1/exhibits/${p}`).expect(200)).body;
    expect(seen.snapshot.text.title).toBe('The output gap of Estuary');
    expect(seen.moves).toEqual([]);
    const list = (await viewer.get('/api/v1/exhibits').expect(200)).body.items;
    expect(list.every((x: { status: string }) => x.status === 'published' || x.status === 'withdrawn')).toBe(true);
    const a = await inState('in_review');
    const b = await inState('in_review');
    const queue = (await editor.get('/api/v1/review').expect(200)).body.items.map((x: { id: number }) => x.id);
    expect(queue.indexOf(a)).toBeLessThan(queue.indexOf(b));
    await viewer.get('/api/v1/review').expect(403);
  });

  it('public links work only when an administrator allows them, and only for published exhibits', async () => {
    const id = await inState('published');
    const slug = (await t.db('exhibits').where('id', id).first()).public_slug;
    await request(t.app).get(`/api/v1/public/exhibits/${slug}`).expect(404);
    await admin.put('/api/v1/settings').send({ publicExhibitLinks: true }).expect(200);
    const pub = (await request(t.app).get(`/api/v1/public/exhibits/${slug}`).expect(200)).body;
    expect(pub.snapshot.vintageStamp).toMatch(/vintage/);
    const csv = await request(t.app).get(`/api/v1/public/exhibits/${slug}/data?format=csv`).expect(200);
    expect(csv.text.split('\n').find((l) => !l.startsWith('#'))).toMatch(/^period,"input, [^"]+","trend, [^"]+","cycle, % of trend \(100 × log\)"/);
    const withdrawn = await inState('withdrawn');
    const wslug = (await t.db('exhibits').where('id', withdrawn).first()).public_slug;
    await request(t.app).get(`/api/v1/public/exhibits/${wslug}`).expect(404);
    await admin.put('/api/v1/settings').send({ publicExhibitLinks: false }).expect(200);
    await request(t.app).get(`/api/v1/public/exhibits/${slug}`).expect(404);
  });
});

describe('boards', () => {
  it('composes a board of two panels, reorders and resizes them, and drafts an exhibit from a panel', async () => {
    const board = (await author.post('/api/v1/boards').send({ title: 'Monthly pack', visibility: 'team' }).expect(201)).body;
    const s2 = (await author.post('/api/v1/studies').send({ title: 'Hamilton gap', seriesId: gdpId, vintage: 'latest', transform: 'log100', method: 'hamilton' }).expect(201)).body.id;
    const p1 = (await author.post(`/api/v1/boards/${board.id}/panels`).send({ title: 'The gap', studyIds: [studyId] }).expect(201)).body;
    const p2 = (await author.post(`/api/v1/boards/${board.id}/panels`).send({ title: 'HP against Hamilton', studyIds: [studyId, s2], compareBy: 'methods', width: 2 }).expect(201)).body;
    const p3 = (await author.post(`/api/v1/boards/${board.id}/panels`).send({ title: 'Across vintages', studyIds: [studyId], compareBy: 'vintages', vintages: [1, 3, 4] }).expect(201)).body;
    await author.post(`/api/v1/boards/${board.id}/panels`).send({ title: 'x', studyIds: [studyId, s2] }).expect(400);
    const reordered = (await author.put(`/api/v1/boards/${board.id}/panels/order`).send({ panelIds: [p2.id, p1.id, p3.id] }).expect(200)).body;
    expect(reordered.panels.map((p: { id: number }) => p.id)).toEqual([p2.id, p1.id, p3.id]);
    await author.patch(`/api/v1/boards/${board.id}/panels/${p1.id}`).send({ height: 'l', width: 2 }).expect(200);
    await economist2.patch(`/api/v1/boards/${board.id}/panels/${p1.id}`).send({ height: 's' }).expect(403);
    const data = (await viewer.get(`/api/v1/boards/${board.id}/panels/${p2.id}/data`).expect(200)).body;
    expect(data.lines.map((l: { label: string }) => l.label)).toEqual(['Hodrick–Prescott, λ = 1 600', 'Hamilton regression filter, h = 8, p = 4']);
    expect(data.freshness[0].vintage).toBeGreaterThanOrEqual(4);
    const vint = (await viewer.get(`/api/v1/boards/${board.id}/panels/${p3.id}/data`).expect(200)).body;
    expect(vint.lines.map((l: { vintage: number }) => l.vintage)).toEqual([1, 3, 4]);
    const ex = (await author.post('/api/v1/exhibits').send({ panelId: p2.id, title: 'Two estimates of the gap' }).expect(201)).body;
    expect(ex.live.chartKind).toBe('compare');
    expect(ex.live.lines).toHaveLength(2);
    await move(author, ex.id, 'in_review').expect(200);
    // A private board is the owner's alone.
    const mine = (await author.post('/api/v1/boards').send({ title: 'Scratch', visibility: 'private' }).expect(201)).body;
    await viewer.get(`/api/v1/boards/${mine.id}`).expect(404);
    expect((await viewer.get('/api/v1/boards').expect(200)).body.items.map((b: { id: number }) => b.id)).not.toContain(mine.id);
  });

  it('says when a study that follows "latest" gets a new vintage', async () => {
    const board = (await author.post('/api/v1/boards').send({ title: 'Fresh', visibility: 'team' }).expect(201)).body;
    const p = (await author.post(`/api/v1/boards/${board.id}/panels`).send({ title: 'Gap', studyIds: [studyId] }).expect(201)).body;
    const before = (await author.get(`/api/v1/boards/${board.id}/panels/${p.id}/data`).expect(200)).body.freshness[0];
    expect(before.newSincePanel).toBe(false);
    const obs = (await steward.get(`/api/v1/series/${gdpId}/vintages/latest/observations`).expect(200)).body;
    const lines = ['period,value', ...obs.periods.map((x: string, i: number) => `${x},${obs.values[i]}`), '2025-Q4,352000'];
    await steward.post(`/api/v1/series/${gdpId}/vintages`).attach('file', Buffer.from(lines.join('\n')), 'q4.csv').expect(201);
    const after = (await author.get(`/api/v1/boards/${board.id}/panels/${p.id}/data`).expect(200)).body.freshness[0];
    expect(after.vintage).toBe(before.vintage + 1);
    expect(after.newSincePanel).toBe(true);
  });
});
