/**
 * Range studies on boards and in exhibits (issue 13): a panel of a range study carries the range
 * across its methods; an exhibit drafted from it freezes the range in its snapshot, with the legend
 * naming the methods and both cautions; the snapshot's numbers equal POST /studies/range's; the
 * review diff shows a change of methods; the data download has the methods and the range.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { CAUTION_LINE, RANGE_CAUTION, REVISION_BAND_CAUTION } from '../../server/schemas/cautions.js';
import { exhibitChart } from '../../server/schemas/charts/figure.js';
import { makeTestApp, type TestApp } from '../helpers/app.js';
import { signedIn } from '../helpers/session.js';

let t: TestApp;
let author: Awaited<ReturnType<typeof signedIn>>;
let editor: Awaited<ReturnType<typeof signedIn>>;
let steward: Awaited<ReturnType<typeof signedIn>>;
let gdpId: number;
let rangeId: number;
let hpId: number;

const methods = [{ method: 'hp' }, { method: 'hamilton' }, { method: 'bn-filter', params: { delta: 0.3 } }];
const NAMES = ['Hodrick–Prescott', 'Hamilton regression filter', 'Beveridge–Nelson filter'];

beforeAll(async () => {
  t = await makeTestApp({}, { seedDemo: true });
  author = await signedIn(t, 'economist@demo.test');
  editor = await signedIn(t, 'editor@demo.test');
  steward = await signedIn(t, 'steward@demo.test');
  gdpId = (await t.db('series').where('code', 'EST_GDP_REAL').first()).id;
  rangeId = (await author.post('/api/v1/studies').send({ kind: 'range', title: 'Range of gaps', seriesId: gdpId, vintage: 'latest', transform: 'log100', methods }).expect(201)).body.id;
  hpId = (await author.post('/api/v1/studies').send({ title: 'HP gap', seriesId: gdpId, transform: 'log100', method: 'hp' }).expect(201)).body.id;
}, 120_000);
afterAll(async () => {
  await t.close();
});

const direct = async (body: Record<string, unknown> = {}) => (await author.post('/api/v1/studies/range').send({ seriesId: gdpId, vintage: 'latest', transform: 'log100', methods, ...body }).expect(200)).body;

describe('range studies on boards', () => {
  it('a panel of a range study carries the range across its methods; it is alone in its panel', async () => {
    const board = (await author.post('/api/v1/boards').send({ title: 'Range board', visibility: 'team' }).expect(201)).body;
    const panel = (await author.post(`/api/v1/boards/${board.id}/panels`).send({ title: 'Range', studyIds: [rangeId] }).expect(201)).body;
    const data = (await editor.get(`/api/v1/boards/${board.id}/panels/${panel.id}/data`).expect(200)).body;
    const d = await direct();
    for (const key of ['periods', 'median', 'min', 'max', 'items']) expect(data.range[key]).toEqual(d[key]);
    expect(data.lines.map((l: { label: string }) => l.label)).toEqual(NAMES);
    expect(data.cautions).toContain(RANGE_CAUTION);

    const before = await t.db('board_panels').count({ n: '*' });
    const mixed = await author.post(`/api/v1/boards/${board.id}/panels`).send({ title: 'x', studyIds: [rangeId, hpId], compareBy: 'methods' }).expect(400);
    expect(mixed.body.error.code).toBe('range_study_alone');
    await author.post(`/api/v1/boards/${board.id}/panels`).send({ title: 'x', studyIds: [rangeId], compareBy: 'vintages', vintages: [3, 4] }).expect(400);
    const hpPanel = (await author.post(`/api/v1/boards/${board.id}/panels`).send({ title: 'HP', studyIds: [hpId] }).expect(201)).body;
    await author.patch(`/api/v1/boards/${board.id}/panels/${hpPanel.id}`).send({ studyIds: [hpId, rangeId], compareBy: 'methods' }).expect(400);
    expect(await t.db('board_panels').count({ n: '*' })).toEqual([{ n: Number(before[0].n) + 1 }]);

    const ex = (await author.post('/api/v1/exhibits').send({ panelId: panel.id, title: 'Range from a panel' }).expect(201)).body;
    expect(ex.live).toMatchObject({ kind: 'panel', chartKind: 'range' });
    expect(ex.live.range).toEqual({ periods: d.periods, median: d.median, min: d.min, max: d.max });
  });
});

describe('range exhibits', () => {
  it('freezes the range at submission with the numbers of POST /studies/range, methods in the legend and both cautions', async () => {
    const e = (await author.post('/api/v1/exhibits').send({ studyId: rangeId, title: 'How far the estimates disagree' }).expect(201)).body;
    expect(e.units).toBe('% of trend');
    expect(e.sourceLine).toMatch(/Invented demo data/);
    const d = await direct();
    const submitted = (await author.post(`/api/v1/exhibits/${e.id}/transitions`).send({ to: 'in_review' }).expect(200)).body;
    const s = submitted.snapshot;
    expect(s).toMatchObject({ kind: 'study', chartKind: 'range', vintageStamp: `data as of ${d.asOf}, vintage ${d.vintage}` });
    expect(s.range).toEqual({ periods: d.periods, median: d.median, min: d.min, max: d.max });
    expect(s.lines.map((l: { label: string; values: unknown }) => [l.label, l.values])).toEqual(d.items.map((it: { name: string; cycle: unknown }, k: number) => [NAMES[k], it.cycle]));
    expect(s.caution).toBe(`${CAUTION_LINE} ${RANGE_CAUTION}`);
    expect(s.methodLine).toBe(`range across 3 methods: ${d.items.map((it: { methodLine: string }) => it.methodLine).join(' · ')}`);
    expect(s.studies).toEqual([expect.objectContaining({ id: rangeId, method: 'range', params: { methods: d.items.map((it: { method: string; params: unknown }) => ({ method: it.method, params: it.params })) } })]);

    // The chart drawn from the snapshot: a legend naming the band, the median and each method.
    const chart = exhibitChart(s) as { legend: { data: string[] } };
    expect(chart.legend.data).toEqual(['range across methods', 'median', ...NAMES]);

    // The download: each method's cycle, then the median, lowest and highest, and the caution.
    const csv = (await editor.get(`/api/v1/exhibits/${e.id}/data?format=csv`).expect(200)).text;
    for (const h of [...NAMES, 'median across methods', 'lowest across methods', 'highest across methods']) expect(csv).toContain(h);
    expect(csv).toContain('not a forecast');
    const pdf = await editor.get(`/api/v1/exhibits/${e.id}/pdf`).buffer(true).expect(200);
    expect(pdf.headers['content-type']).toMatch(/pdf/);
    if (process.env.RANGE_PDF_OUT) (await import('node:fs')).writeFileSync(process.env.RANGE_PDF_OUT, pdf.body);

    // Frozen: a new release changes the study's range but not the snapshot.
    const obs = (await steward.get(`/api/v1/series/${gdpId}/vintages/latest/observations`).expect(200)).body;
    const rows = ['period,value', ...obs.periods.map((p: string, i: number) => `${p},${i === obs.periods.length - 1 ? obs.values[i] * 1.01 : obs.values[i]}`)];
    await steward.post(`/api/v1/series/${gdpId}/vintages`).attach('file', Buffer.from(rows.join('\n')), 'rev.csv').expect(201);
    const later = (await editor.get(`/api/v1/exhibits/${e.id}`).expect(200)).body;
    expect(later.snapshot).toEqual(s);
    expect((await direct()).median).not.toEqual(d.median);

    // Returned, the study's methods changed, resubmitted: the diff names the change and the data that moved.
    await editor.post(`/api/v1/exhibits/${e.id}/transitions`).send({ to: 'returned', comment: 'Use λ = 400 for HP.' }).expect(200);
    const changed = [{ method: 'hp', params: { lambda: 400 } }, methods[1], methods[2]];
    await author.patch(`/api/v1/studies/${rangeId}`).send({ methods: changed }).expect(200);
    const again = (await author.post(`/api/v1/exhibits/${e.id}/transitions`).send({ to: 'in_review' }).expect(200)).body;
    const now = await direct({ methods: changed });
    expect(again.snapshot.range).toEqual({ periods: now.periods, median: now.median, min: now.min, max: now.max });
    const diff = (await editor.get(`/api/v1/exhibits/${e.id}/diff`).expect(200)).body.diff;
    expect(diff.studies.map((x: { what: string }) => x.what)).toEqual(expect.arrayContaining(['params', 'vintage']));
    const hp = diff.data.find((x: { line: string }) => x.line.startsWith('Hodrick–Prescott'));
    expect(hp.changedPeriods).toBeGreaterThan(0);
  });
});

describe('the band of past revisions as an exhibit option', () => {
  it('draws the band the real-time analysis gives around the end of the cycle, with its note; refused where it does not fit, storing nothing', async () => {
    const e = (await author.post('/api/v1/exhibits').send({ studyId: hpId, title: 'The gap and its past revisions', revisionBand: true }).expect(201)).body;
    expect(e.revisionBand).toBe(true);
    const realtime = (await author.post(`/api/v1/studies/${hpId}/realtime`).expect(200)).body;
    expect(realtime.revisionBand.length).toBe(8);
    expect(e.live.revisionBand).toEqual(realtime.revisionBand);
    // The band sits around the exhibit's own last estimates.
    const cycle = e.live.lines.find((l: { role: string }) => l.role === 'cycle');
    for (const b of e.live.revisionBand) expect(b.value).toBe(cycle.values[cycle.periods.indexOf(b.period)]);
    expect(e.live.caution).toBe(`${CAUTION_LINE} ${REVISION_BAND_CAUTION}`);
    const chart = exhibitChart(e.live) as { legend: { data: { name: string }[] }; series: { name: string }[] };
    expect(chart.legend.data.map((d) => d.name)).toEqual(['band of past revisions (not a forecast)']);
    expect(chart.series.map((x) => x.name)).toContain('band of past revisions (not a forecast): upper edge');

    // The download carries the band's edges beside the cycle, and its note.
    const csv = (await author.get(`/api/v1/exhibits/${e.id}/data?format=csv`).expect(200)).text;
    expect(csv).toContain('band of past revisions: lower edge, % of trend');
    expect(csv).toContain('a record of past revisions, not a forecast');
    const last = realtime.revisionBand.at(-1);
    const row = csv.split(/\r?\n/).find((l: string) => l.startsWith(`${last.period},`))!;
    expect(row).toContain(String(last.lower).slice(0, 6));

    // Frozen with the exhibit; turned off, the draft's live content has no band and the plain caution.
    const submitted = (await author.post(`/api/v1/exhibits/${e.id}/transitions`).send({ to: 'in_review' }).expect(200)).body;
    expect(submitted.snapshot.revisionBand).toEqual(realtime.revisionBand);
    const plain = (await author.post('/api/v1/exhibits').send({ studyId: hpId, title: 'No band' }).expect(201)).body;
    expect(plain.live.revisionBand).toBeUndefined();
    expect(plain.live.caution).toBe(CAUTION_LINE);
    const on = (await author.patch(`/api/v1/exhibits/${plain.id}`).send({ revisionBand: true }).expect(200)).body;
    expect(on.live.revisionBand).toEqual(realtime.revisionBand);
    const off = (await author.patch(`/api/v1/exhibits/${plain.id}`).send({ revisionBand: false }).expect(200)).body;
    expect(off.live.revisionBand).toBeUndefined();

    const before = Number((await t.db('exhibits').count({ n: '*' }))[0].n);
    expect((await author.post('/api/v1/exhibits').send({ studyId: rangeId, title: 'x', revisionBand: true }).expect(400)).body.error.code).toBe('revision_band_study_only');
    expect((await author.post('/api/v1/exhibits').send({ studyId: hpId, title: 'x', chartKind: 'trend', revisionBand: true }).expect(400)).body.error.code).toBe('revision_band_cycle_only');
    expect((await author.patch(`/api/v1/exhibits/${plain.id}`).send({ revisionBand: true, chartKind: 'trend' }).expect(400)).body.error.message).toMatch(/cycle chart/);
    expect(Number((await t.db('exhibits').count({ n: '*' }))[0].n)).toBe(before);
    expect((await author.get(`/api/v1/exhibits/${plain.id}`).expect(200)).body).toMatchObject({ revisionBand: false, chartKind: 'cycle' });
  });
});
