/**
 * The Catalogue page at scale: it asks the server for one page of 50 series (never the whole
 * list), says which series it shows and of how many, pages by keyboard, searches and filters on
 * the server, sorts by a column header on the server, filters by unit, and keeps all of it in the
 * address; it fits a phone. The start page counts the
 * series without reading them all.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { openSuite, signInAs, type BrowserSession, type Suite } from '../helpers/browser.js';
import { pickSeries } from '../helpers/picker.js';
import type { TestServer } from '../helpers/app.js';

let t: TestServer;
let browser: BrowserSession;
let suite: Suite | undefined;
let total = 0;

beforeAll(async () => {
  ({ t, browser } = suite = await openSuite());
  const rows = Array.from({ length: 130 }, (_, k) => ({ code: `PG_${String(k).padStart(3, '0')}`, title: `Paging test series ${k} (invented)`, frequency: ['Q', 'M', 'A'][k % 3], unit: 'index', seasonal_adjustment: 'sa', source: 'invented for a test' }));
  await t.db('series').insert(rows);
  total = Number((await t.db('series').count({ n: '*' }))[0].n);
});
afterAll(() => suite?.close());

describe('Catalogue page in pages', () => {
  it('shows 50 series at a time, pages by keyboard, searches on the server, and never loads the whole list', async () => {
    const { page } = browser;
    const asked: string[] = [];
    page.on('request', (r) => {
      const url = new URL(r.url());
      if (url.pathname === '/api/v1/series') asked.push(url.search);
    });
    await page.setViewportSize({ width: 1440, height: 1000 });
    await signInAs(page, t.url, 'viewer@demo.test');
    // The start page counts every series from one small page.
    await page.getByText(`${total} series`).waitFor();
    await page.goto(`${t.url}/catalogue`);
    const status = page.getByTestId('catalogue-count');
    await expect.poll(() => status.innerText()).toBe(`Showing 1–50 of ${total} series`);
    expect(await status.getAttribute('role')).toBe('status');
    const rows = page.getByTestId('catalogue-table').locator('tbody tr');
    expect(await rows.count()).toBe(50);
    const codes = await page.getByTestId('catalogue-table').locator('tbody tr td:first-child').allInnerTexts();
    expect(codes).toEqual([...codes].sort());

    // Next page by keyboard: focus the button, Enter.
    const next = page.getByRole('button', { name: 'Next 50 →' });
    await next.focus();
    await page.keyboard.press('Enter');
    await expect.poll(() => status.innerText()).toBe(`Showing 51–100 of ${total} series`);
    expect(new URL(page.url()).searchParams.get('page')).toBe('2');
    // Focus moves to the new page's count, not to the top of the document.
    expect(await status.evaluate((el) => el === document.activeElement)).toBe(true);
    const second = await page.getByTestId('catalogue-table').locator('tbody tr td:first-child').allInnerTexts();
    expect(second[0] > codes[49]).toBe(true);
    // The last page is short and has no next page.
    const last = Math.ceil(total / 50);
    await page.goto(`${t.url}/catalogue?page=${last}`);
    await expect.poll(() => status.innerText()).toBe(`Showing ${(last - 1) * 50 + 1}–${total} of ${total} series`);
    expect(await rows.count()).toBe(total - (last - 1) * 50);
    expect(await page.getByRole('button', { name: 'Next 50 →' }).isDisabled()).toBe(true);
    await page.getByRole('button', { name: '← Previous 50' }).click();
    await expect.poll(() => status.innerText()).toBe(`Showing ${(last - 2) * 50 + 1}–${(last - 1) * 50} of ${total} series`);
    // A page past the end says so and leads back to the last one.
    await page.goto(`${t.url}/catalogue?page=999`);
    await expect.poll(() => status.innerText()).toBe(`Page 999 is past the last page, ${last}.`);
    await page.getByRole('button', { name: 'Go to the last page' }).click();
    await expect.poll(() => status.innerText()).toBe(`Showing ${(last - 1) * 50 + 1}–${total} of ${total} series`);

    // A search runs on the server and starts again at page 1; the frequency filter narrows it.
    await page.getByLabel('Search the Catalogue').fill('paging test series 1');
    await expect.poll(() => status.innerText()).toBe('Showing 1–41 of 41 series that match');
    expect(new URL(page.url()).searchParams.get('page')).toBeNull();
    await page.getByLabel('Filter by frequency').selectOption('A');
    // Annual series are every third (k % 3 = 2) among those the search finds.
    const expected = Array.from({ length: 130 }, (_, k) => k).filter((k) => `Paging test series ${k} `.includes('series 1') && k % 3 === 2).length;
    expect(expected).toBeGreaterThan(5);
    await expect.poll(() => status.innerText()).toBe(`Showing 1–${expected} of ${expected} series that match`);
    expect(new URL(page.url()).searchParams.get('frequency')).toBe('A');
    await page.getByLabel('Search the Catalogue').fill('nothing like this');
    await expect.poll(() => status.innerText()).toBe('No series match.');
    await page.getByText('No series match.', { exact: true }).last().waitFor();

    // Every request for the list asked for one page.
    expect(asked.length).toBeGreaterThan(4);
    expect(asked.filter((q) => !/limit=(50|20|1)\b/.test(q))).toEqual([]);
  });

  it('fits a phone: no sideways scrolling at 390 px, the page buttons in reach', async () => {
    const { page } = browser;
    await page.setViewportSize({ width: 390, height: 844 });
    await page.goto(`${t.url}/catalogue?page=2`);
    await expect.poll(() => page.getByTestId('catalogue-count').innerText()).toBe(`Showing 51–100 of ${total} series`);
    expect(await page.evaluate(() => document.documentElement.scrollWidth - window.innerWidth)).toBe(0);
    const box = await page.getByRole('button', { name: 'Next 50 →' }).boundingBox();
    expect(box!.x + box!.width).toBeLessThanOrEqual(390);
  });

  it('sorts on the server by a column header and filters by unit, both kept in the address', async () => {
    const { page } = browser;
    await page.setViewportSize({ width: 1440, height: 1000 });
    await page.goto(`${t.url}/catalogue`);
    const status = page.getByTestId('catalogue-count');
    await expect.poll(() => status.innerText()).toBe(`Showing 1–50 of ${total} series`);
    const firstCode = () => page.getByTestId('catalogue-table').locator('tbody tr td:first-child').first().innerText();
    const titleHeader = page.getByRole('columnheader', { name: 'Title' });
    for (const order of ['asc', 'desc'] as const) {
      await titleHeader.getByRole('button').click();
      const expected = (await t.db('series').orderBy([{ column: 'title', order }, { column: 'code', order }]).first('code')).code;
      await expect.poll(firstCode).toBe(expected);
      expect(new URL(page.url()).searchParams.get('sort')).toBe('title');
      expect(await titleHeader.getAttribute('aria-sort')).toBe(order === 'asc' ? 'ascending' : 'descending');
    }
    const index = Number((await t.db('series').where('unit', 'index').count({ n: '*' }))[0].n);
    await page.getByLabel('Filter by unit').selectOption({ label: `index (${index})` });
    await expect.poll(() => status.innerText()).toBe(`Showing 1–50 of ${index} series that match`);
    expect(new URL(page.url()).searchParams.get('unit')).toBe('index');
    expect(new URL(page.url()).searchParams.get('sort')).toBe('title');
  });

  it('the series picker: a combobox that searches the server, marks series without a release, closes on Escape', async () => {
    const { page } = browser;
    await browser.context.clearCookies();
    await page.setViewportSize({ width: 1440, height: 1000 });
    await signInAs(page, t.url, 'economist@demo.test');
    await page.goto(`${t.url}/analyses`);
    const box = page.getByRole('combobox', { name: 'Series' });
    expect(await box.getAttribute('aria-expanded')).toBe('false');
    await box.fill('PG_12');
    const listbox = page.getByRole('listbox');
    await expect.poll(async () => (await listbox.getAttribute('aria-busy')) === 'false' && (await listbox.getByRole('option').count())).toBe(10);
    expect(await box.getAttribute('aria-expanded')).toBe('true');
    expect(await page.getByRole('status').filter({ hasText: 'series match' }).innerText()).toBe('10 series match.');
    // None of them has a release: they are listed, marked, and Enter does not choose them.
    await box.press('ArrowDown');
    const active = page.locator(`#${await box.getAttribute('aria-activedescendant')}`);
    expect(await active.getAttribute('aria-disabled')).toBe('true');
    expect(await active.innerText()).toMatch(/^PG_120 .*no release loaded yet/);
    await box.press('ArrowUp');
    expect(await page.locator(`#${await box.getAttribute('aria-activedescendant')}`).innerText()).toMatch(/^PG_129 /);
    await box.press('Enter');
    expect(await box.inputValue()).toBe('PG_12');
    // …and says why.
    expect(await page.getByRole('status').filter({ hasText: 'cannot be chosen' }).innerText()).toBe('PG_129 cannot be chosen: no release of it is loaded yet.');
    // Escape closes the list; a second Escape gives back what the box showed before typing.
    await box.press('Escape');
    expect(await box.getAttribute('aria-expanded')).toBe('false');
    expect(await box.getAttribute('aria-activedescendant')).toBeNull();
    await box.press('Escape');
    expect(await box.inputValue()).toBe('');
    // More matches than it lists: it says so and lists the first 20.
    await box.fill('paging');
    await expect.poll(async () => (await listbox.getAttribute('aria-busy')) === 'false' && (await listbox.getByRole('option').count())).toBe(20);
    expect(await page.getByRole('status').filter({ hasText: 'series match' }).innerText()).toBe('130 series match; the first 20 are listed, type more to narrow.');
  });

  it('the Compare tab adds series through the picker, marks those already compared, and removes them', async () => {
    const { page } = browser;
    const errors: string[] = [];
    page.on('pageerror', (e) => errors.push(String(e)));
    const id = (await t.db('studies').where('title', 'Estuary output gap, Hodrick–Prescott').first()).id;
    await page.goto(`${t.url}/studies/${id}`);
    await page.getByRole('tab', { name: 'Compare' }).click();
    await page.getByLabel('This method across series').check();
    const refused: number[] = [];
    page.on('response', (r) => void (r.url().endsWith('/api/v1/studies/compare') && r.status() >= 400 && refused.push(r.status())));
    const add = page.getByLabel('Add a series');
    await pickSeries(add, 'est_ip', 'EST_IP', 'keyboard', true);
    await pickSeries(add, 'credit-to', 'EST_CREDIT_GDP', 'click', true);
    const compared = page.getByRole('list', { name: 'Series compared with this one' });
    expect(await compared.getByRole('button').evaluateAll((bs) => bs.map((b) => b.getAttribute('aria-label')))).toEqual(['Remove EST_IP', 'Remove EST_CREDIT_GDP']);
    // The study's own series and those added are listed but cannot be chosen again.
    await add.fill('Estuary');
    const listbox = page.getByRole('listbox');
    await expect.poll(async () => (await listbox.getAttribute('aria-busy')) === 'false' && (await listbox.getByRole('option', { disabled: true }).allInnerTexts()).map((x) => x.split(' ')[0])).toEqual(['EST_CREDIT_GDP', 'EST_GDP_REAL', 'EST_IP']);
    expect(await listbox.getByRole('option', { disabled: true }).first().innerText()).toMatch(/already chosen/);
    await add.press('Escape');
    // Monthly and quarterly lines: the question first, no refusal shown; compared once a common frequency is chosen.
    await page.getByTestId('common-frequency').waitFor();
    await page.getByLabel('Common frequency').selectOption('Q');
    await page.getByTestId('compare-chart').locator('canvas').first().waitFor({ timeout: 30_000 });
    await page.getByRole('button', { name: 'Remove EST_IP' }).click();
    expect(await page.getByTestId('common-frequency').count()).toBe(0);
    // Focus goes back to the box that adds series.
    expect(await add.evaluate((el) => el === document.activeElement)).toBe(true);
    // Nothing was asked of the server before the common frequency was chosen, so nothing was refused.
    expect(refused).toEqual([]);
    expect(errors).toEqual([]);
  });
});
