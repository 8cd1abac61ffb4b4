/**
 * Issue 14 in the browser: an editor keeps a reference chronology (started from the Harding–Pagan
 * dates of a series); an economist numbers an exhibit and shades the chronology; once published,
 * its PNG, SVG (parsed as XML) and PDF (poppler: pages, embedded fonts, text) carry it all.
 * Then: every page fits a phone (390 px), a study asks before unsaved changes are lost, the stale
 * chart says it is being recomputed, and no page asks for series 0.
 */
import { execFileSync } from 'node:child_process';
import fs from 'node:fs';
import { SaxesParser } from 'saxes';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { TestServer } from '../helpers/app.js';
import { openSuite, signInAs, signOut, type BrowserSession, type Suite } from '../helpers/browser.js';
import { pickSeries } from '../helpers/picker.js';

let t: TestServer;
let browser: BrowserSession;
let suite: Suite | undefined;
beforeAll(async () => {
  ({ t, browser } = suite = await openSuite());
});
afterAll(() => suite?.close());

const nav = (name: string) => browser.page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name });

describe('an exhibit fit to print', () => {
  it('publishes an exhibit with a chronology and opens its PNG, SVG and PDF', async () => {
    const { page } = browser;
    await signInAs(page, t.url, 'editor@demo.test');
    await nav('Chronology').click();
    await page.getByRole('button', { name: 'New chronology' }).click();
    await page.locator('#chr-name').fill('Staff chronology (invented)');
    await page.locator('#chr-area').fill('Estuary');
    await pickSeries(page.locator('#chr-series'), 'EST_GDP_R', 'EST_GDP_REAL');
    await page.getByRole('button', { name: 'Use its dates' }).click();
    await expect.poll(async () => page.getByTestId('chronology-turns').locator('tbody tr').count()).toBeGreaterThan(1);
    // Keep one recession of the starting point, as the institution dates it.
    while ((await page.getByTestId('chronology-turns').locator('tbody tr').count()) > 0) await page.getByRole('button', { name: 'Remove turning point 1', exact: true }).click();
    await page.getByRole('button', { name: 'Add a turning point' }).click();
    await page.getByLabel('Period of turning point 1', { exact: true }).fill('2008-Q2');
    await page.getByRole('button', { name: 'Add a turning point' }).click();
    await page.getByLabel('Period of turning point 2', { exact: true }).fill('2009-Q2');
    await page.getByRole('button', { name: 'Create the chronology' }).click();
    await page.getByRole('button', { name: 'Save the chronology' }).waitFor();
    await signOut(page);

    await signInAs(page, t.url, 'economist@demo.test');
    await nav('Exhibits').click();
    await page.getByTestId('exhibits-table').getByRole('link', { name: 'Output gap for the next report (draft)' }).click();
    await page.locator('#ex-title').fill('The output gap and the staff chronology');
    await page.locator('#ex-number').fill('Chart 3');
    await page.locator('#ex-chronology').selectOption({ label: 'Staff chronology (invented) (Estuary)' });
    await page.getByRole('button', { name: 'Save the text' }).click();
    await page.getByRole('button', { name: 'Text saved' }).waitFor();
    await expect.poll(() => page.getByTestId('exhibit-chronology').innerText()).toContain('Staff chronology (invented)');
    await page.getByRole('button', { name: 'Submit for review' }).click();
    await expect.poll(() => page.getByTestId('exhibit-state').innerText()).toBe('in review');
    const url = page.url();
    await signOut(page);
    await signInAs(page, t.url, 'editor@demo.test');
    await page.goto(url);
    await page.getByRole('button', { name: 'Approve' }).click();
    await expect.poll(() => page.getByTestId('exhibit-state').innerText()).toBe('approved');
    await page.getByRole('button', { name: 'Publish' }).click();
    await expect.poll(() => page.getByTestId('exhibit-state').innerText()).toBe('published');
    await signOut(page);

    await signInAs(page, t.url, 'viewer@demo.test');
    await page.goto(url);
    await page.getByTestId('exhibit-chart').locator('canvas').first().waitFor();
    expect(await page.getByTestId('exhibit-number').innerText()).toBe('Chart 3');
    const stamp = await page.getByTestId('exhibit-stamp').innerText();
    const vintageLine = stamp.split(' · ')[0];
    expect(vintageLine).toMatch(/^data as of \d{4}-\d\d-\d\d, vintage \d+$/);

    const download = async (name: string) => {
      const [d] = await Promise.all([page.waitForEvent('download'), page.getByRole(name === 'PDF' ? 'link' : 'button', { name, exact: true }).click()]);
      return fs.readFileSync((await d.path())!);
    };
    const png = await download('PNG');
    expect(png.subarray(1, 4).toString()).toBe('PNG');
    expect(png.readUInt32BE(16)).toBe(3600);

    const svg = (await download('SVG')).toString('utf8');
    const parser = new SaxesParser({ xmlns: true });
    const errors: string[] = [];
    parser.on('error', (e) => errors.push(e.message));
    parser.write(svg).close();
    expect(errors).toEqual([]);
    for (const text of ['Chart 3', 'The output gap and the staff chronology', vintageLine, 'Staff chronology (invented)']) expect(svg).toContain(text);

    const pdf = await download('PDF');
    const file = `${browser.downloadsDir}/exhibit.pdf`;
    fs.writeFileSync(file, pdf);
    expect(execFileSync('pdfinfo', [file], { encoding: 'utf8' })).toMatch(/Pages:\s+1\n/);
    const fontRows = execFileSync('pdffonts', [file], { encoding: 'utf8' }).trim().split('\n').slice(2);
    expect(fontRows.length).toBeGreaterThan(0);
    expect(fontRows.every((l) => / yes +yes +yes /.test(l))).toBe(true);
    const text = execFileSync('pdftotext', [file, '-'], { encoding: 'utf8' });
    for (const line of ['Chart 3', 'The output gap and the staff chronology', vintageLine, 'Staff chronology (invented)']) expect(text).toContain(line);
    await signOut(page);
  });
});

describe('phones, guards and states', () => {
  it('every page fits 390 px: no sideways scrolling, the navigation folds behind Menu', async () => {
    const { page } = browser;
    const pages: Record<string, string[]> = {
      'economist@demo.test': ['/', '/catalogue', '/catalogue/1', '/studies', '/studies/new', '/studies/1', '/boards', '/boards/1', '/exhibits', '/exhibits/1', '/exhibits/new?studyId=1', '/chronology', '/profile'],
      'steward@demo.test': ['/catalogue/new', '/catalogue/loads', '/catalogue/1/edit'],
      'editor@demo.test': ['/review'],
      'admin@demo.test': ['/people', '/people/mailbox'],
    };
    const wide: string[] = [];
    await browser.context.clearCookies();
    for (const [who, paths] of Object.entries(pages)) {
      await page.setViewportSize({ width: 1400, height: 1000 });
      await signInAs(page, t.url, who);
      await page.setViewportSize({ width: 390, height: 844 });
      for (const path of paths) {
        await page.goto(t.url + path);
        await page.locator('main').waitFor();
        await page.waitForLoadState('networkidle');
        const tabs = page.getByRole('tab');
        const count = path === '/studies/1' || path === '/catalogue/1' ? await tabs.count() : 1;
        for (let i = 0; i < count; i++) {
          if (path === '/studies/1' || path === '/catalogue/1') await tabs.nth(i).click();
          await page.waitForTimeout(400);
          const w = await page.evaluate(() => document.documentElement.scrollWidth);
          if (w > 390) wide.push(`${who} ${path}${count > 1 ? ` tab ${i + 1}` : ''}: ${w}px`);
        }
      }
      expect(await page.getByRole('navigation', { name: 'Main' }).isVisible()).toBe(false);
      await page.getByTestId('menu-button').click();
      expect(await page.getByRole('navigation', { name: 'Main' }).isVisible()).toBe(true);
      await page.getByRole('button', { name: 'Sign out' }).click();
      await page.waitForURL(/sign-in/);
    }
    await page.goto(t.url + '/sign-in');
    if ((await page.evaluate(() => document.documentElement.scrollWidth)) > 390) wide.push('/sign-in');
    expect(wide).toEqual([]);
    await page.setViewportSize({ width: 1400, height: 1000 });
  });

  it('asks before an edited study is left, greys a stale chart, and never asks for series 0', async () => {
    const { page } = browser;
    const asked: string[] = [];
    page.on('request', (r) => asked.push(new URL(r.url()).pathname));
    await browser.context.clearCookies();
    await page.setViewportSize({ width: 1400, height: 1000 });
    await signInAs(page, t.url, 'economist@demo.test');
    await page.goto(`${t.url}/studies/new`);
    await page.locator('#series').waitFor();
    await page.goto(`${t.url}/boards/1`);
    await page.getByRole('button', { name: 'Add a panel' }).click();
    await page.getByTestId('board-panel').first().waitFor();
    expect(asked.filter((p) => p.startsWith('/api/v1/series/0'))).toEqual([]);

    await page.goto(`${t.url}/studies/1`);
    await page.getByTestId('cycle-chart').locator('canvas').first().waitFor();
    // Method texts (defect 5): the last value names its period; λ stays λ in an upper-case label.
    expect(await page.getByTestId('cycle-stats').innerText()).toMatch(/Last value \(\d{4}-Q[1-4]\)/);
    expect(await page.getByText(/Smoothing parameter/).first().innerText()).toMatch(/SMOOTHING PARAMETER λ/);
    expect(await page.getByTestId('end-warning').innerText()).toBe('last 8 quarters (2 years): estimates will be revised');
    // A new λ: the old chart stays, greyed and said to be stale, until the new result arrives.
    await page.getByLabel('λ', { exact: true }).fill('400');
    await expect.poll(() => page.getByTestId('decomposition-charts').getAttribute('data-stale')).toBe('true');
    expect(await page.getByTestId('recomputing').isVisible()).toBe(true);
    await expect.poll(() => page.getByTestId('decomposition-charts').getAttribute('data-stale'), { timeout: 15_000 }).toBe('false');
    await page.getByTestId('unsaved').waitFor();

    let prompts = 0;
    page.once('dialog', (d) => {
      prompts++;
      void d.dismiss();
    });
    await nav('Boards').click();
    await expect.poll(() => prompts).toBe(1);
    expect(new URL(page.url()).pathname).toBe('/studies/1');
    page.once('dialog', (d) => {
      prompts++;
      void d.accept();
    });
    await nav('Boards').click();
    await page.waitForURL(/\/boards$/);
    expect(prompts).toBe(2);

    // ℓ1 trend filtering has no Hodrick–Prescott cut-off or presets (defect 5).
    await page.goto(`${t.url}/studies/new?seriesId=1`);
    await page.locator('#method').selectOption('l1-trend');
    await page.getByText(/Try 10 for quarterly data/).waitFor();
    expect(await page.getByTestId('cutoff').count()).toBe(0);
    expect(await page.getByRole('button', { name: /Hodrick–Prescott convention/ }).count()).toBe(0);
  });
});
