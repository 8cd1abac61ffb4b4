/**
 * Release day end to end (issue 15): a steward registers a feed on the local fake SDMX source and
 * runs it; the source publishes a new release and the next run stores a new vintage, which the
 * series page shows; the release alert is in the Mailbox; an economist prepares an update of the
 * published exhibit, an editor reviews it against the published one and publishes it; the old
 * exhibit says it is superseded and points to its successor. Every request stays on 127.0.0.1.
 */
import fs from 'node:fs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startFakeSdmxSource, type FakeSdmxSource } from '../../server/sdmx/fake-source.js';
import type { TestServer } from '../helpers/app.js';
import { openSuite, signInAs, signOut, type BrowserSession, type Suite } from '../helpers/browser.js';
import { pickSeries } from '../helpers/picker.js';
import { signedIn } from '../helpers/session.js';

let t: TestServer;
let browser: BrowserSession;
let suite: Suite | undefined;
let source: FakeSdmxSource;
let seriesId: number;
let exhibitId: number;

beforeAll(async () => {
  source = await startFakeSdmxSource(0);
  ({ t, browser } = suite = await openSuite());
  const steward = await signedIn(t, 'steward@demo.test');
  seriesId = (await steward.post('/api/v1/series').send({ code: 'FK_GDP', title: 'Estuary real GDP from the statistics office (invented)', frequency: 'Q', unit: 'EST$ million', seasonalAdjustment: 'sa', source: 'Estuary statistics office (invented)' }).expect(201)).body.id;
}, 120_000);
afterAll(async () => {
  await suite?.close();
  await source?.close();
});

describe('release day', () => {
  it('a feed run brings a new vintage, the alert and an exhibit update that supersedes the published one', async () => {
    const { page } = browser;
    // The steward registers the feed on the Feeds page and runs it: the first release becomes vintage 1.
    await signInAs(page, t.url, 'steward@demo.test');
    await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Catalogue' }).click();
    await page.getByRole('link', { name: 'Feeds' }).click();
    await page.getByRole('heading', { name: 'Feeds', level: 1 }).waitFor();
    await page.getByLabel('Name', { exact: true }).fill('Estuary national accounts');
    await page.getByLabel('SDMX data address').fill(`${source.url}/data/EST_STATS,NA_MAIN,1.0/Q.EST.GDP_VOL`);
    await page.getByLabel('Key 1', { exact: true }).fill('Q.EST.GDP_VOL');
    await pickSeries(page.getByLabel('Series 1', { exact: true }), 'FK_G', 'FK_GDP');
    await page.getByRole('button', { name: 'Register the feed' }).click();
    const card = page.getByRole('listitem').filter({ has: page.getByRole('heading', { name: 'Estuary national accounts' }) });
    await card.waitFor();
    await card.getByRole('button', { name: 'Run now' }).click();
    await expect.poll(() => card.getByTestId('feed-run-result').innerText(), { timeout: 30_000 }).toMatch(/1 new vintage stored \(FK_GDP 1\)/);

    // An economist follows the series; an exhibit drawn from the study is published (set up through the API).
    const economist = await signedIn(t, 'economist@demo.test');
    const editor = await signedIn(t, 'editor@demo.test');
    const study = (await economist.post('/api/v1/studies').send({ title: 'Gap from the office’s GDP', seriesId, vintage: 'latest', transform: 'log100', method: 'hp', params: { lambda: 1600 } }).expect(201)).body;
    exhibitId = (await economist.post('/api/v1/exhibits').send({ studyId: study.id, title: 'The Estuary output gap', subtitle: 'Percent of trend' }).expect(201)).body.id;
    await economist.post(`/api/v1/exhibits/${exhibitId}/transitions`).send({ to: 'in_review' }).expect(200);
    await editor.post(`/api/v1/exhibits/${exhibitId}/transitions`).send({ to: 'approved' }).expect(200);
    await editor.post(`/api/v1/exhibits/${exhibitId}/transitions`).send({ to: 'published' }).expect(200);
    expect((await t.db('vintages').where('series_id', seriesId)).length).toBe(1);

    // The office publishes; Run now stores vintage 2, shown in the feed's runs and on the series page.
    source.publish();
    await card.getByRole('button', { name: 'Run now' }).click();
    await expect.poll(() => card.getByTestId('feed-run-result').innerText(), { timeout: 30_000 }).toMatch(/1 new vintage stored \(FK_GDP 2\)/);
    await expect.poll(() => card.getByTestId('feed-runs').innerText()).toMatch(/FK_GDP 2/);
    await page.goto(`${t.url}/catalogue/${seriesId}`);
    await expect.poll(() => page.getByTestId('vintage-stamp').innerText()).toMatch(/vintage 2$/);
    await signOut(page);

    // The alert to the economist is in the Mailbox.
    await (t.app.locals.background as { idle(): Promise<void> }).idle();
    await signInAs(page, t.url, 'admin@demo.test');
    await page.goto(`${t.url}/people/mailbox`);
    const alert = page.getByTestId('mailbox').getByRole('button', { name: /New data: FK_GDP \(vintage 2\).*economist@demo\.test/ });
    await alert.first().click();
    const body = await page.getByTestId('mailbox').locator('pre').first().innerText();
    expect(body).toContain('“Gap from the office’s GDP”');
    expect(body).toMatch(/through the feed “Estuary national accounts”/);
    expect(body).toMatch(/Last gap estimate: [+−][0-9.]+ in \d{4}-Q\d on vintage 1, now [+−][0-9.]+ in \d{4}-Q\d on vintage 2/);
    const studyLink = await page.getByTestId('mailbox').getByRole('link', { name: /\/studies\/\d+/ }).first().getAttribute('href');
    expect(studyLink).toBe(`${t.url}/studies/${study.id}`);
    await signOut(page);

    // The economist follows the mail's link to the study and takes it away as a Python script.
    await signInAs(page, t.url, 'economist@demo.test');
    await page.goto(studyLink!);
    const [script] = await Promise.all([page.waitForEvent('download'), page.getByRole('link', { name: 'Rerun as a script' }).click()]);
    expect(script.suggestedFilename()).toBe(`study-${study.id}.py`);
    const text = fs.readFileSync((await script.path())!, 'utf8');
    expect(text.startsWith('#!/usr/bin/env python3')).toBe(true);
    expect(text).toContain('os.environ.get("TIDEGAUGE_TOKEN")');
    expect(text).toContain('"vintage":2');

    // The economist prepares an update of the published exhibit and submits it.
    await page.goto(`${t.url}/exhibits/${exhibitId}`);
    await page.getByRole('button', { name: 'Prepare an update' }).click();
    await page.waitForURL((u) => /\/exhibits\/\d+$/.test(u.pathname) && !u.pathname.endsWith(`/${exhibitId}`));
    const updateUrl = page.url();
    await expect.poll(() => page.getByTestId('update-of-note').innerText()).toMatch(/An update of The Estuary output gap \(exhibit \d+, published\)/);
    await page.getByTestId('exhibit-chart').locator('canvas').first().waitFor();
    await page.getByRole('button', { name: 'Submit for review' }).click();
    await expect.poll(() => page.getByTestId('exhibit-state').innerText()).toBe('in review');
    await signOut(page);

    // The editor sees it on the Review desk as an update, compares it with the published exhibit, and publishes it.
    await signInAs(page, t.url, 'editor@demo.test');
    await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Review desk' }).click();
    const row = page.getByTestId('review-queue').getByRole('row', { name: new RegExp(`update of exhibit ${exhibitId}`) });
    await row.getByRole('link', { name: 'The Estuary output gap' }).click();
    const against = page.getByTestId('update-diff');
    await against.waitFor();
    expect(await against.innerText()).toMatch(/vintage of study \d+: 1 → 2/);
    await page.getByRole('button', { name: 'Approve' }).click();
    await expect.poll(() => page.getByTestId('exhibit-state').innerText()).toBe('approved');
    await page.getByRole('button', { name: 'Publish' }).click();
    await expect.poll(() => page.getByTestId('exhibit-state').innerText()).toBe('published');
    await signOut(page);

    // A reader opens the old exhibit: superseded, pointing to its successor, which points back.
    await signInAs(page, t.url, 'viewer@demo.test');
    await page.goto(`${t.url}/exhibits/${exhibitId}`);
    await expect.poll(() => page.getByTestId('exhibit-state').innerText()).toBe('superseded');
    const note = page.getByTestId('superseded-note');
    expect(await note.innerText()).toMatch(/Superseded .*by its update: The Estuary output gap \(exhibit \d+\)/);
    await note.getByRole('link').click();
    await page.waitForURL(updateUrl);
    await expect.poll(() => page.getByTestId('update-of-note').innerText()).toMatch(new RegExp(`exhibit ${exhibitId}, superseded`));

    // Its public link (when links are allowed) says the same and leads to the update's.
    await (await signedIn(t, 'admin@demo.test')).put('/api/v1/settings').send({ publicExhibitLinks: true }).expect(200);
    const slugs = await t.db('exhibits').whereIn('id', [exhibitId, Number(updateUrl.split('/').pop())]).orderBy('id').pluck('public_slug');
    await page.goto(`${t.url}/p/${slugs[0]}`);
    await page.getByTestId('superseded-note').getByRole('link', { name: 'read the update' }).click();
    await page.waitForURL(`${t.url}/p/${slugs[1]}`);
    await page.getByTestId('exhibit-chart').locator('canvas').first().waitFor();
    expect(await page.getByTestId('superseded-note').count()).toBe(0);
    expect(source.requests().every((r) => r.url.startsWith('/'))).toBe(true);
  }, 240_000);
});
