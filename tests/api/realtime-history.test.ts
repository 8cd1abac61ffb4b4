/**
 * Issue 12: the real-time revision analysis on a long release history (the demo's 84 releases of
 * real GDP, invented) against numpy and statsmodels: tests/fixtures/realtime-history.json, made by
 * scripts/make_realtime_history_reference.py from the same file the demo loads.
 */
import fs from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { makeTestApp, type TestApp } from '../helpers/app.js';
import { signedIn } from '../helpers/session.js';

const fixture = JSON.parse(fs.readFileSync(path.join(path.dirname(fileURLToPath(import.meta.url)), '..', 'fixtures', 'realtime-history.json'), 'utf8'));

let t: TestApp;
beforeAll(async () => {
  t = await makeTestApp({}, { seedDemo: true });
});
afterAll(async () => {
  await t.close();
});

const maxRelative = (a: number[], b: number[]) => Math.max(...a.map((x, i) => Math.abs(x - b[i]) / Math.max(1, Math.abs(b[i]))));

describe('real-time analysis of the demo history', () => {
  it('matches statsmodels on every release: end points, quasi-real-time estimates and the statistics', async () => {
    const economist = await signedIn(t, 'economist@demo.test');
    const demo = await t.db('studies as st').join('series as s', 's.id', 'st.series_id').where('s.code', 'EST_GDP_RT').first('st.id');
    expect(demo, 'the demo has a study on the history').toBeTruthy();
    const res = await economist.post(`/api/v1/studies/${demo.id}/realtime`).expect(200);
    expect(res.body.realTime).toHaveLength(84);
    expect(res.body.realTime.map((p: { period: string }) => p.period)).toEqual(fixture.realTime.map((p: { period: string }) => p.period));
    expect(maxRelative(res.body.realTime.map((p: { value: number }) => p.value), fixture.realTime.map((p: { value: number }) => p.value))).toBeLessThan(1e-8);
    expect(maxRelative(res.body.realTime.map((p: { final: number }) => p.final), fixture.realTime.map((p: { final: number }) => p.final))).toBeLessThan(1e-8);
    expect(res.body.quasiRealTime.map((q: { period: string }) => q.period)).toEqual(fixture.quasiRealTime.map((q: { period: string }) => q.period));
    expect(maxRelative(res.body.quasiRealTime.map((q: { value: number }) => q.value), fixture.quasiRealTime.map((q: { value: number }) => q.value))).toBeLessThan(1e-8);
    for (const which of ['realTime', 'quasiRealTime'] as const) {
      const ours = res.body.statistics[which];
      const ref = fixture.statistics[which];
      expect(ours.n, which).toBe(ref.n);
      for (const k of ['correlation', 'noiseToSignal', 'oppositeSign', 'meanAbsoluteRevision', 'meanRevision', 'rmseToSd']) {
        expect(Math.abs(ours[k] - ref[k]), `${which}.${k}`).toBeLessThan(1e-8 * Math.max(1, Math.abs(ref[k])));
      }
    }
  });
});
