/**
 * A steward's path through Feeds in Chromium, against the local fake SDMX source: the form
 * refuses a bad schedule in words and reads a good one back in words; the feed is registered,
 * run now from the keyboard (progress, then the outcome announced and focused), and its run
 * records show the vintages stored; a failed run shows its problems by series. At 390 px the page
 * does not scroll sideways. Its schedule is paused and resumed, and the feed deleted after asking.
 */
import os from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startFakeSdmxSource, type FakeSdmxSource } from '../../server/sdmx/fake-source.js';
import type { TestServer } from '../helpers/app.js';
import { openSuite, signInAs, type BrowserSession, type Suite } from '../helpers/browser.js';
import { pickSeries } from '../helpers/picker.js';

let t: TestServer;
let browser: BrowserSession;
let suite: Suite | undefined;
let source: FakeSdmxSource;

beforeAll(async () => {
  source = await startFakeSdmxSource(0);
  ({ t, browser } = suite = await openSuite());
  await t.db('series').insert({ code: 'FK_HOURS', title: 'Hours worked (invented, from the fake source)', frequency: 'Q', unit: 'millions of hours', seasonal_adjustment: 'sa', source: 'fake SDMX source' });
});
afterAll(async () => {
  await suite?.close();
  await source.close();
});

describe('a steward registers and runs a feed', () => {
  it('registers a feed through the form, with the schedule read back in words', async () => {
    const { page } = browser;
    await signInAs(page, t.url, 'steward@demo.test');
    await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Catalogue' }).click();
    await page.getByRole('link', { name: 'Feeds' }).click();
    await page.getByRole('heading', { name: 'Feeds', level: 1 }).waitFor();
    // The list of feeds comes after the heading: wait for it rather than read it at once.
    await expect.poll(() => page.getByText('No feeds yet').count()).toBe(1);
    await page.getByLabel('Name', { exact: true }).fill('Estuary hours worked');
    await page.getByLabel('SDMX data address').fill(`${source.url}/data/EST_STATS,NA_MAIN,1.0/Q.EST.HOURS`);
    await page.getByLabel('Key 1', { exact: true }).fill('Q.EST.HOURS');
    await pickSeries(page.getByLabel('Series 1', { exact: true }), 'hours', 'FK_HOURS', 'click');
    await page.getByLabel('Schedule (cron, UTC)').fill('30 25 * * 1-5');
    await page.getByRole('button', { name: 'Register the feed' }).click();
    expect(await page.getByRole('alert').filter({ hasText: /hour/i }).first().innerText()).toMatch(/hour/i);
    expect(Number((await t.db('feeds').count({ n: '*' }))[0].n)).toBe(0);
    await page.getByLabel('Schedule (cron, UTC)').fill('30 9 * * 1-5');
    await expect.poll(() => page.getByText('At 09:30, Monday through Friday (UTC)').count()).toBeGreaterThan(0);
    await page.getByRole('button', { name: 'Register the feed' }).click();
    const card = page.getByRole('listitem').filter({ has: page.getByRole('heading', { name: 'Estuary hours worked' }) });
    await card.waitFor();
    expect(await card.innerText()).toMatch(/Schedule: At 09:30, Monday through Friday \(UTC\)/);
    expect(await card.innerText()).toContain('Q.EST.HOURS → FK_HOURS');
  });

  it('runs it now from the keyboard and shows the vintage stored in its runs', async () => {
    const { page } = browser;
    const card = page.getByRole('listitem').filter({ has: page.getByRole('heading', { name: 'Estuary hours worked' }) });
    await card.getByRole('button', { name: 'Run now' }).focus();
    await page.keyboard.press('Enter');
    const result = card.getByTestId('feed-run-result');
    await result.waitFor({ timeout: 30_000 });
    expect(await result.innerText()).toMatch(/^1 new vintage stored \(FK_HOURS 1\)\.$/);
    expect(await result.evaluate((el) => el === document.activeElement)).toBe(true);
    expect(await result.innerText()).toContain('FK_HOURS 1');
    const runs = card.getByTestId('feed-runs');
    await runs.waitFor();
    expect(await runs.innerText()).toMatch(/FK_HOURS 1/);
    const stored = await t.db('vintages as v').join('series as s', 's.id', 'v.series_id').where('s.code', 'FK_HOURS').select('v.number');
    expect(stored.map((r) => r.number)).toEqual([1]);
  });

  it('a failed run shows why and the problems by series, and stores nothing', async () => {
    const { page } = browser;
    source.publish();
    source.setFault({ kind: 'bad-value', key: 'Q.EST.HOURS' });
    const card = page.getByRole('listitem').filter({ has: page.getByRole('heading', { name: 'Estuary hours worked' }) });
    await card.getByRole('button', { name: 'Run now' }).click();
    await expect.poll(() => card.getByTestId('feed-run-result').innerText(), { timeout: 30_000 }).toMatch(/^Failed: nothing stored\. The answer has 1 problem to fix at the source; nothing was stored\.$/);
    source.setFault(null);
    await expect.poll(() => card.getByText('"n/a" is not a number.').count()).toBe(1);
    expect(await card.getByText('Problems by series', { exact: false }).count()).toBe(1);
    const stored = await t.db('vintages as v').join('series as s', 's.id', 'v.series_id').where('s.code', 'FK_HOURS').select('v.number');
    expect(stored).toHaveLength(1);
  });

  it('fits a phone: no sideways scrolling at 390 px', async () => {
    const { page } = browser;
    await page.setViewportSize({ width: 390, height: 844 });
    await page.reload();
    await page.getByRole('heading', { name: 'Feeds', level: 1 }).waitFor();
    expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(390);
    await page.setViewportSize({ width: 1440, height: 900 });
  });

  it('pauses and resumes its schedule, then deletes it after asking; the vintage it stored stays', async () => {
    const { page } = browser;
    const card = page.getByRole('listitem').filter({ has: page.getByRole('heading', { name: 'Estuary hours worked' }) });
    await card.getByRole('button', { name: 'Pause schedule' }).focus();
    await page.keyboard.press('Enter');
    await expect.poll(() => card.innerText()).toMatch(/— paused/);
    // Focus stays on the button, which now resumes.
    expect(await card.getByRole('button', { name: 'Resume schedule' }).evaluate((el) => el === document.activeElement)).toBe(true);
    expect(await card.innerText()).toMatch(/Next run: —/);
    expect((await t.db('feeds').where('name', 'Estuary hours worked').first()).enabled).toBeFalsy();
    await page.screenshot({ path: path.join(os.tmpdir(), 'tg-feeds-paused-1440.png'), fullPage: true });
    await page.setViewportSize({ width: 390, height: 844 });
    expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(390);
    await page.screenshot({ path: path.join(os.tmpdir(), 'tg-feeds-paused-390.png'), fullPage: true });
    await page.setViewportSize({ width: 1440, height: 900 });
    await card.getByRole('button', { name: 'Resume schedule' }).focus();
    await page.keyboard.press('Enter');
    await expect.poll(() => card.innerText()).not.toMatch(/— paused/);
    expect(await card.innerText()).not.toMatch(/Next run: —/);
    page.once('dialog', (d) => void d.accept());
    await card.getByRole('button', { name: 'Delete Estuary hours worked' }).click();
    await expect.poll(() => page.getByText('No feeds yet').count()).toBe(1);
    expect(await t.db('feeds').where('name', 'Estuary hours worked').first()).toBeUndefined();
    const stored = await t.db('vintages as v').join('series as s', 's.id', 'v.series_id').where('s.code', 'FK_HOURS').select('v.number');
    expect(stored).toHaveLength(1);
  });
});
