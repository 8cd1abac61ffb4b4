/**
 * Range and reliability in Chromium: an economist shows the range of gap estimates across methods
 * on a series and reads the real-time reliability table with its progress, by mouse and by
 * keyboard, at desktop and phone widths. Screenshots go to the temporary directory.
 */
import os from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { TestServer } from '../helpers/app.js';
import { openSuite, type BrowserSession, type Suite } from '../helpers/browser.js';
import { showRange } from '../helpers/range.js';
import { signedIn } from '../helpers/session.js';

let t: TestServer;
let browser: BrowserSession;
let suite: Suite | undefined;

beforeAll(async () => {
  ({ t, browser } = suite = await openSuite());
});
afterAll(() => suite?.close());

describe('range and reliability', () => {
  it('shows the range across methods, then builds the reliability table by keyboard; fits a phone', async () => {
    const { page } = browser;
    // By keyboard: part of the code, the arrow keys to the series, Enter.
    const errors = await showRange(page, t.url, 'est_gdp', 'EST_GDP_REAL', 'keyboard');
    expect(await page.getByTestId('range-caution').innerText()).toMatch(/not a forecast/);
    // The text alternative names the band's edges, the median and every method, never the filled difference.
    await page.getByTestId('range-result').getByRole('button', { name: /Data table/ }).click();
    const table = await page.getByTestId('range-result').locator('table').first().innerText();
    for (const name of ['range across methods: lower edge', 'range across methods: upper edge', 'median', 'Hodrick–Prescott', 'Beveridge–Nelson filter', 'Averaged Hamilton filter']) expect(table).toContain(name);
    await page.screenshot({ path: path.join(os.tmpdir(), 'tg-range-1440.png'), fullPage: true });

    // The reliability tab by keyboard: focus the chosen tab, arrow to the next, Tab to the button, Enter.
    await page.getByRole('tab', { name: 'Range of estimates' }).focus();
    await page.keyboard.press('ArrowRight');
    expect(await page.getByRole('tab', { name: 'Reliability in real time' }).getAttribute('aria-selected')).toBe('true');
    // Tab moves to the tab panel, then into it: the button is the first control.
    const focused = () => page.evaluate(() => `${document.activeElement?.tagName} ${document.activeElement?.textContent?.trim()}`);
    for (let i = 0; i < 3 && !/^BUTTON Build the reliability table/.test(await focused()); i++) await page.keyboard.press('Tab');
    expect(await focused()).toBe('BUTTON Build the reliability table');
    await page.keyboard.press('Enter');
    await page.getByTestId('reliability-table').waitFor({ timeout: 60_000 });
    const rows = await page.getByTestId('reliability-table').innerText();
    expect(rows).toMatch(/Noise-to-signal/);
    expect(rows).toMatch(/Beveridge–Nelson filter/);
    expect(rows).toMatch(/\d\.\d\d/);
    await page.getByTestId('revision-band-chart').locator('canvas').first().waitFor();
    expect(await page.getByTestId('reliability-notes').innerText()).toMatch(/not a forecast/);
    await page.screenshot({ path: path.join(os.tmpdir(), 'tg-reliability-1440.png'), fullPage: true });

    await page.setViewportSize({ width: 390, height: 844 });
    await expect.poll(() => page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(390);
    await page.screenshot({ path: path.join(os.tmpdir(), 'tg-reliability-390.png'), fullPage: true });
    await page.getByRole('tab', { name: 'Range of estimates' }).click();
    await page.getByRole('button', { name: /Show the range/ }).click();
    await page.getByTestId('range-chart').locator('canvas').first().waitFor({ timeout: 30_000 });
    await expect.poll(() => page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(390);
    await page.screenshot({ path: path.join(os.tmpdir(), 'tg-range-390.png'), fullPage: true });
    expect(errors).toEqual([]);
  }, 180_000);

  it('a study’s real-time analysis shows the band of past revisions when asked, with its note', async () => {
    const { page } = browser;
    await page.setViewportSize({ width: 1440, height: 1000 });
    const economist = await signedIn(t, 'economist@demo.test');
    const gdp = (await economist.get('/api/v1/series/EST_GDP_REAL').expect(200)).body;
    const study = (await economist.post('/api/v1/studies').send({ title: 'Band check', seriesId: gdp.id, vintage: 'latest', transform: 'log100', method: 'hamilton' }).expect(201)).body;
    await page.goto(`${t.url}/studies/${study.id}`);
    await page.getByRole('tab', { name: 'Real-time revisions' }).click();
    await page.getByRole('button', { name: 'Run the revision analysis' }).click();
    await page.getByTestId('fan-chart').locator('canvas').first().waitFor({ timeout: 90_000 });
    expect(await page.getByTestId('study-revision-band').count()).toBe(0);
    await page.getByRole('checkbox', { name: /band of past revisions/ }).check();
    await page.getByTestId('study-revision-band').locator('canvas').first().waitFor();
    expect(await page.getByText(/a record of past revisions, not a forecast/).count()).toBe(1);
    await page.screenshot({ path: path.join(os.tmpdir(), 'tg-study-band-1440.png'), fullPage: true });
  }, 180_000);
});
