/**
 * The product by keyboard alone, in Chromium: sign in, open a study, change λ and read what a screen
 * reader says for it (aria-valuetext), switch tabs with the arrow keys, scroll the cross-correlation
 * table, open a chart's data table; draft and submit an exhibit; as an editor return it, and after
 * its resubmission approve and publish it. After every review move the focus is on the new state and
 * the live region says it. No mouse, no clicks: only Tab, arrows, Enter, Space and typing.
 */
import fs from 'node:fs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { cutoffPeriod } from '../../server/schemas/methods.js';
import type { TestServer } from '../helpers/app.js';
import { openSuite, type BrowserSession, type Suite } from '../helpers/browser.js';

let t: TestServer;
let browser: BrowserSession;
let suite: Suite | undefined;

beforeAll(async () => {
  ({ t, browser } = suite = await openSuite());
});
afterAll(() => suite?.close());

type Page = BrowserSession['page'];

interface Focused {
  tag: string;
  name: string;
  role: string | null;
  testId: string | null;
  visible: boolean;
}

/** What has the focus: its tag, accessible name as the page gives it, and whether its focus is drawn. */
const focused = (page: Page): Promise<Focused> =>
  page.evaluate(() => {
    const el = document.activeElement as HTMLElement;
    const style = getComputedStyle(el);
    return {
      tag: el.tagName.toLowerCase(),
      name: (el.getAttribute('aria-label') || (el.id && document.querySelector(`label[for="${el.id}"]`)?.textContent) || el.textContent || '').trim(),
      role: el.getAttribute('role'),
      testId: el.getAttribute('data-testid'),
      visible: (style.outlineStyle !== 'none' && parseFloat(style.outlineWidth) >= 1) || style.boxShadow !== 'none',
    };
  });

const unseen: string[] = [];

/** Presses Tab (or Shift+Tab) until the focused element matches; every element passed must show its focus. */
async function tabTo(page: Page, match: (f: Focused) => boolean, what: string, backwards = false) {
  for (let i = 0; i < 120; i++) {
    await page.keyboard.press(backwards ? 'Shift+Tab' : 'Tab');
    const f = await focused(page);
    if (f.tag !== 'body' && !f.visible) unseen.push(`${f.tag} “${f.name.slice(0, 40)}”`);
    if (match(f)) return f;
  }
  throw new Error(`Tab never reached ${what}`);
}
const named = (name: string | RegExp) => (f: Focused) => (typeof name === 'string' ? f.name === name : name.test(f.name));

async function signInByKeyboard(page: Page, email: string) {
  await page.goto(`${t.url}/sign-in`);
  // The e-mail field has the focus when the page opens.
  await expect.poll(async () => (await focused(page)).name).toMatch(/E-mail/);
  await page.keyboard.type(email);
  await page.keyboard.press('Tab');
  await page.keyboard.type('tidegauge-demo');
  await page.keyboard.press('Enter');
  await page.getByTestId('user-menu').waitFor({ timeout: 15_000 });
}

async function signOutByKeyboard(page: Page) {
  await tabTo(page, named('Sign out'), 'the Sign out button', true);
  await page.keyboard.press('Enter');
  await page.waitForURL(/sign-in/);
}

const valueText = (page: Page) => page.getByLabel('λ (logarithmic scale)').getAttribute('aria-valuetext');
const expectedText = (lambda: string, value: number) => {
  const c = cutoffPeriod(value)!;
  return `λ = ${lambda}; cut-off ${c.toFixed(1)} quarters (${(c / 4).toFixed(1)} years)`;
};

/** A review move by keyboard; then the focus is on the exhibit's state and the live region says it. */
async function moveByKeyboard(page: Page, button: string, state: string, said: RegExp) {
  await tabTo(page, named(button), `the “${button}” button`);
  await page.keyboard.press('Enter');
  await expect.poll(() => page.getByTestId('exhibit-state').innerText(), { timeout: 15_000 }).toBe(state);
  await expect.poll(async () => (await focused(page)).testId).toBe('exhibit-state-line');
  expect((await focused(page)).name).toBe(`State: ${state}`);
  await expect.poll(() => page.getByTestId('announcer').innerText()).toMatch(said);
  expect(await page.getByTestId('announcer').getAttribute('aria-live')).toBe('polite');
}

describe('by keyboard alone', () => {
  it('signs in, opens a study, changes λ hearing its value and cut-off, and switches tabs with the arrow keys', async () => {
    const { page } = browser;
    await signInByKeyboard(page, 'economist@demo.test');
    await tabTo(page, named('Studies'), 'the Studies entry of the navigation');
    await page.keyboard.press('Enter');
    await tabTo(page, named('Estuary output gap, Hodrick–Prescott'), 'the study’s link');
    await page.keyboard.press('Enter');
    await page.waitForURL(/\/studies\/\d+$/);
    await expect.poll(() => page.title()).toBe('Estuary output gap, Hodrick–Prescott — Tidegauge');
    await expect.poll(() => page.getByTestId('method-line').innerText(), { timeout: 15_000 }).toMatch(/λ = 1 600/);

    // λ by keyboard: the slider stops at round values and presets, and says λ and its cut-off.
    await tabTo(page, named('λ (logarithmic scale)'), 'the λ slider');
    expect(await valueText(page)).toBe(expectedText('1,600', 1600));
    expect(expectedText('1,600', 1600)).toBe('λ = 1,600; cut-off 39.7 quarters (9.9 years)');
    await page.keyboard.press('ArrowRight');
    expect(await valueText(page)).toBe(expectedText('2,000', 2000));
    expect(await page.getByLabel('λ', { exact: true }).inputValue()).toBe('2000');
    await page.keyboard.press('PageUp');
    expect(await valueText(page)).toBe(expectedText('20,000', 20000));
    await expect.poll(() => page.getByTestId('method-line').innerText(), { timeout: 15_000 }).toMatch(/λ = 20 000/);
    await page.keyboard.press('PageDown');
    expect(await valueText(page)).toBe(expectedText('2,000', 2000));
    await page.keyboard.press('ArrowLeft');
    expect(await valueText(page)).toBe(expectedText('1,600', 1600));
    await expect.poll(() => page.getByTestId('method-line').innerText(), { timeout: 15_000 }).toMatch(/λ = 1 600/);
    // Back where it started: nothing to save.
    expect(await page.getByRole('button', { name: 'Saved' }).isDisabled()).toBe(true);

    // The cycle chart's summary and its data table.
    expect(await page.getByTestId('cycle-chart-summary').innerText()).toMatch(/^\d+ periods from \d{4}-Q\d to \d{4}-Q\d\. Latest value \(cycle\): -?[\d.]+ % of trend, \d{4}-Q\d\. Last turning point: a (peak|trough) in \d{4}-Q\d/);
    await tabTo(page, named(/^Data table: The cycle/), 'the cycle chart’s data table button');
    await page.keyboard.press('Enter');
    await page.getByTestId('cycle-chart-table').waitFor();
    expect(await page.getByRole('button', { name: /^Data table: The cycle/ }).getAttribute('aria-expanded')).toBe('true');
    const rows = await page.getByTestId('cycle-chart-table').locator('tbody tr').count();
    expect(rows).toBeGreaterThan(100);

    // Tabs: Shift+Tab back to the chosen tab, then the arrow keys choose and focus the next ones.
    const tab = (name: string) => page.getByRole('tab', { name });
    await tabTo(page, (f) => f.role === 'tab', 'the tab list', true);
    expect((await focused(page)).name).toBe('Decomposition');
    await page.keyboard.press('ArrowRight');
    expect((await focused(page)).name).toBe('Compare');
    expect(await tab('Compare').getAttribute('aria-selected')).toBe('true');
    expect(await page.getByRole('tabpanel').getAttribute('aria-labelledby')).toBe(await tab('Compare').getAttribute('id'));
    await page.keyboard.press('ArrowRight');
    expect((await focused(page)).name).toBe('Real-time revisions');
    await page.keyboard.press('ArrowRight');
    expect((await focused(page)).name).toBe('Decomposition');
    await page.keyboard.press('End');
    expect((await focused(page)).name).toBe('Real-time revisions');
    await page.keyboard.press('ArrowLeft');
    expect((await focused(page)).name).toBe('Compare');
    expect(await tab('Compare').getAttribute('aria-selected')).toBe('true');
    expect(await tab('Decomposition').getAttribute('tabindex')).toBe('-1');

    // The cross-correlation table's box scrolls by keyboard.
    await page.getByTestId('compare-table').waitFor({ timeout: 30_000 });
    await page.setViewportSize({ width: 1100, height: 900 });
    const box = page.getByRole('region', { name: 'Statistics and cross-correlations' });
    await box.waitFor();
    await tabTo(page, (f) => f.role === 'region' && f.name === 'Statistics and cross-correlations', 'the cross-correlation box');
    for (let i = 0; i < 8; i++) await page.keyboard.press('ArrowRight');
    expect(await box.evaluate((el) => el.scrollLeft)).toBeGreaterThan(0);
    await page.setViewportSize({ width: 1400, height: 1000 });

    expect(unseen).toEqual([]);
  });

  it('submits an exhibit; an editor returns it, then approves and publishes it; focus and announcements follow', async () => {
    const { page } = browser;
    // Draft an exhibit from the study, by keyboard.
    await tabTo(page, named('Draft an exhibit'), 'the Draft an exhibit link', true);
    await page.keyboard.press('Enter');
    await page.waitForURL(/\/exhibits\/new/);
    await expect.poll(async () => (await focused(page)).name).toBe('Title');
    await page.keyboard.press('Control+A');
    await page.keyboard.type('The output gap, by keyboard');
    await page.keyboard.press('Enter');
    await page.waitForURL(/\/exhibits\/\d+$/);
    const exhibitUrl = page.url();
    await expect.poll(() => page.title()).toBe('The output gap, by keyboard — Tidegauge');

    await moveByKeyboard(page, 'Submit for review', 'in review', /“The output gap, by keyboard” is now in review \(revision 1\): its data, vintages, method and parameters are frozen\./);
    await signOutByKeyboard(page);

    // The editor finds it on the Review desk and returns it with a comment.
    await signInByKeyboard(page, 'editor@demo.test');
    await tabTo(page, named('Review desk'), 'the Review desk entry');
    await page.keyboard.press('Enter');
    await tabTo(page, named('The output gap, by keyboard'), 'the exhibit in the queue');
    await page.keyboard.press('Enter');
    await page.waitForURL(exhibitUrl);
    await tabTo(page, named(/^Comment/), 'the comment field');
    await page.keyboard.type('Say which vintage in the subtitle.');
    await moveByKeyboard(page, 'Return to the author', 'returned', /is now returned to the author\./);
    await signOutByKeyboard(page);

    // The author resubmits.
    await signInByKeyboard(page, 'economist@demo.test');
    await page.goto(exhibitUrl);
    await page.getByTestId('exhibit-chart').waitFor();
    await moveByKeyboard(page, 'Submit for review', 'in review', /is now in review \(revision 2\)/);
    await signOutByKeyboard(page);

    // The editor approves and publishes.
    await signInByKeyboard(page, 'editor@demo.test');
    await page.goto(exhibitUrl);
    await page.getByTestId('review-diff').waitFor({ timeout: 15_000 });
    await moveByKeyboard(page, 'Approve', 'approved', /is now approved: it can now be published\./);
    await moveByKeyboard(page, 'Publish', 'published', /“The output gap, by keyboard” is now published\./);

    // Its SVG carries a title and a description (the summary and the exhibit's lines).
    await tabTo(page, named('SVG'), 'the SVG download');
    const [download] = await Promise.all([page.waitForEvent('download'), page.keyboard.press('Enter')]);
    const svg = fs.readFileSync((await download.path())!, 'utf8');
    const title = /<svg\b[^>]*><title>([^<]*)<\/title><desc>([^<]*)<\/desc>/.exec(svg);
    expect(title?.[1]).toBe('The output gap, by keyboard');
    expect(title?.[2]).toMatch(/\d+ periods from \d{4}-Q\d to \d{4}-Q\d\. Latest value \(cycle\): -?[\d.]+ % of trend, \d{4}-Q\d\. Last turning point: a (peak|trough) in \d{4}-Q\d/);
    expect(title?.[2]).toMatch(/data as of \d{4}-\d\d-\d\d, vintage 4 · Hodrick–Prescott, λ = 1 600/);
    expect(title?.[2]).toMatch(/Caution: /);
    expect(unseen).toEqual([]);
  });
});
