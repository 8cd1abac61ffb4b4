/**
 * A range study in Chromium (issue 13): an economist shows the range across methods on the Range
 * page, saves it as a study, reads it on the study page (chart, per-method table, caution), and
 * changes its methods, and drafts an exhibit from it whose figure names the methods and says that a range is not a
 * forecast; at 1440 and 390 px. Screenshots go to the temporary directory.
 */
import os from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { TestServer } from '../helpers/app.js';
import { openSuite, type BrowserSession, type Suite } from '../helpers/browser.js';
import { showRange } from '../helpers/range.js';

let t: TestServer;
let browser: BrowserSession;
let suite: Suite | undefined;

beforeAll(async () => {
  ({ t, browser } = suite = await openSuite());
});
afterAll(() => suite?.close());

const shot = (name: string) => path.join(os.tmpdir(), name);

describe('range studies', () => {
  it('an economist saves the range as a study, reads it, and drafts a range exhibit from it; fits a phone', async () => {
    const { page } = browser;
    const errors = await showRange(page, t.url, 'GDP_RE', 'EST_GDP_REAL', 'click');
    await page.getByLabel('Study title').fill('Estuary: how far the gap estimates disagree');
    await page.getByRole('button', { name: 'Save as study' }).click();

    // The study page of the range study.
    await page.waitForURL(/\/studies\/\d+$/);
    const studyId = Number(new URL(page.url()).pathname.split('/').pop());
    await page.getByRole('heading', { level: 1, name: 'Estuary: how far the gap estimates disagree' }).waitFor();
    await page.getByTestId('range-chart').locator('canvas').first().waitFor({ timeout: 30_000 });
    const methods = await page.getByTestId('range-methods').innerText();
    for (const name of ['Hodrick–Prescott', 'Hamilton regression filter', 'Averaged Hamilton filter', 'Beveridge–Nelson filter']) expect(methods).toContain(name);
    expect(methods).not.toContain('Unobserved components');
    expect(await page.getByTestId('range-caution').innerText()).toMatch(/not a forecast/);
    const saved = await t.db('studies').where('id', studyId).first();
    expect(saved.kind).toBe('range');
    expect(JSON.parse(saved.methods)).toHaveLength(5);
    await page.waitForTimeout(1200); // the chart's drawing animation, for the screenshot
    await page.screenshot({ path: shot('tg-range-study-1440.png'), fullPage: true });
    await page.setViewportSize({ width: 390, height: 844 });
    await expect.poll(() => page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(390);
    await page.screenshot({ path: shot('tg-range-study-390.png'), fullPage: true });
    await page.setViewportSize({ width: 1440, height: 1000 });

    // The owner drops a method: the range is recomputed without it.
    const form = page.getByRole('form', { name: 'Methods of the range' });
    await form.getByRole('checkbox', { name: 'Averaged Hamilton filter' }).uncheck();
    await form.getByRole('button', { name: 'Save the methods' }).click();
    await expect.poll(() => page.getByTestId('range-methods').innerText(), { timeout: 30_000 }).not.toContain('Averaged Hamilton filter');
    expect(JSON.parse((await t.db('studies').where('id', studyId).first()).methods).map((m: { method: string }) => m.method).sort()).toEqual(['bn-filter', 'hamilton', 'hp', 'hp-forecast']);

    // A range exhibit drafted from it: the figure's legend and text alternative name the methods; both cautions.
    await page.getByRole('link', { name: 'Draft an exhibit' }).click();
    // No cycle-or-trend choice for a range: the form says what the chart draws.
    await page.getByText(/Chart: the range of gap estimates across the study’s 4 methods/).waitFor();
    expect(await page.getByLabel('Chart').count()).toBe(0);
    await page.getByRole('button', { name: 'Draft the exhibit' }).click();
    await page.waitForURL(/\/exhibits\/\d+$/);
    const figure = page.getByTestId('exhibit-figure');
    await figure.getByTestId('exhibit-chart').locator('canvas').first().waitFor({ timeout: 30_000 });
    await figure.getByRole('button', { name: /Data table/ }).click();
    const table = await figure.locator('table').first().innerText();
    for (const name of ['range across methods: lower edge', 'range across methods: upper edge', 'median', 'Hodrick–Prescott', 'Beveridge–Nelson filter']) expect(table).toContain(name);
    const text = await figure.innerText();
    expect(text).toMatch(/range across 4 methods/);
    expect(text).toMatch(/it is not a forecast and not a confidence interval/);
    expect(text).toMatch(/end-of-sample estimates are revised/);
    await page.screenshot({ path: shot('tg-range-exhibit-1440.png'), fullPage: true });
    await page.setViewportSize({ width: 390, height: 844 });
    await expect.poll(() => page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(390);
    await page.screenshot({ path: shot('tg-range-exhibit-390.png'), fullPage: true });
    expect(errors).toEqual([]);
  }, 180_000);

  it('the author of a draft from one study ticks the band of past revisions; the figure names it and prints its note', async () => {
    const { page } = browser;
    await page.setViewportSize({ width: 1440, height: 1000 });
    const study = await t.db('studies').where('title', 'Estuary output gap, Hodrick–Prescott').first();
    await page.goto(`${t.url}/exhibits/new?studyId=${study.id}&title=${encodeURIComponent('The gap and its past revisions')}`);
    await page.getByRole('button', { name: 'Draft the exhibit' }).click();
    await page.waitForURL(/\/exhibits\/\d+$/);
    await page.getByRole('checkbox', { name: /band of past revisions/ }).check();
    await page.getByRole('button', { name: 'Save the text' }).click();
    const figure = page.getByTestId('exhibit-figure');
    await expect.poll(() => figure.innerText(), { timeout: 30_000 }).toMatch(/a record of past revisions, not a forecast/);
    await figure.getByRole('button', { name: /Data table/ }).click();
    expect(await figure.locator('table').first().innerText()).toContain('band of past revisions (not a forecast): upper edge');
    await page.waitForTimeout(500);
    await page.screenshot({ path: shot('tg-band-exhibit-1440.png'), fullPage: true });
    await page.setViewportSize({ width: 390, height: 844 });
    await expect.poll(() => page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(390);
    await page.screenshot({ path: shot('tg-band-exhibit-390.png'), fullPage: true });
  }, 120_000);
});
