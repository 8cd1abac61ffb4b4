import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { TestServer } from '../helpers/app.js';
import { openSuite, signInAs, signOut, type BrowserSession, type Suite } from '../helpers/browser.js';
import { signedIn } from '../helpers/session.js';

let t: TestServer;
let browser: BrowserSession;
let suite: Suite | undefined;

beforeAll(async () => {
  ({ t, browser } = suite = await openSuite());
});
afterAll(() => suite?.close());

describe('the application shell in Chromium', () => {
  it('shows the health status read from the API on the sign-in page and in the shell', async () => {
    const { page } = browser;
    await page.goto(t.url + '/');
    await page.waitForURL(/\/sign-in\?next=/);
    await expect.poll(() => page.getByTestId('health-status').getAttribute('data-state'), { timeout: 15_000 }).toBe('ok');
    await signInAs(page, t.url, 'admin@demo.test');
    await expect.poll(() => page.getByTestId('health-status').getAttribute('data-state'), { timeout: 15_000 }).toBe('ok');
    expect(await page.getByTestId('health-status').innerText()).toMatch(/database online/i);
    const nav = await page.getByRole('navigation', { name: 'Main' }).innerText();
    for (const item of ['Catalogue', 'Studies', 'Boards', 'People']) expect(nav).toContain(item);
  });

  it('opens pages by the role map the server checks: studies for editors, not for stewards', async () => {
    const { page } = browser;
    await signOut(page);
    await signInAs(page, t.url, 'steward@demo.test');
    expect(await page.getByRole('navigation', { name: 'Main' }).innerText()).not.toContain('Studies');
    await page.goto(`${t.url}/studies`);
    await page.getByTestId('role-needed').waitFor();
    expect(await page.locator('h1').innerText()).toBe('You need the economist, editor or administrator role');
    await signOut(page);
    await signInAs(page, t.url, 'editor@demo.test');
    await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Studies' }).click();
    // The demo workspace's studies, listed by the API the editor may now read.
    await page.getByRole('link', { name: 'Estuary output gap, Hodrick–Prescott' }).click();
    await expect.poll(() => page.getByTestId('method-line').innerText(), { timeout: 15_000 }).toMatch(/Hodrick–Prescott, λ = 1 600/);
    expect(await page.getByTestId('role-needed').count()).toBe(0);
  });

  it('shows the not-found page for an unknown address', async () => {
    const { page } = browser;
    await page.goto(t.url + '/no/such/page');
    await expect.poll(() => page.locator('h1').innerText()).toMatch(/does not exist/);
  });

  it('renders titles and notes as text, never as markup', async () => {
    const { page } = browser;
    const steward = await signedIn(t, 'steward@demo.test');
    const nasty = `<img src=x onerror="window.__pwned=1"><b>bold</b>`;
    const s = (await steward.post('/api/v1/series').send({ code: 'MARKUP', title: nasty, frequency: 'Q', unit: 'index', seasonalAdjustment: 'sa', source: nasty, notes: `<script>window.__pwned=2</script>` }).expect(201)).body;
    await page.goto(`${t.url}/catalogue`);
    await page.getByTestId('catalogue-table').getByText(nasty).waitFor();
    await page.goto(`${t.url}/catalogue/${s.id}`);
    await page.getByText('<script>window.__pwned=2</script>').waitFor();
    expect(await page.locator('h1').innerText()).toBe(nasty);
    expect(await page.locator('img[src="x"]').count()).toBe(0);
    expect(await page.locator('main b').count()).toBe(0);
    expect(await page.evaluate(() => (window as unknown as { __pwned?: number }).__pwned)).toBeUndefined();
  });

  it('runs under the Content-Security-Policy without violations', async () => {
    const { page } = browser;
    const violations: string[] = [];
    page.on('console', (m) => {
      if (/Content Security Policy|Refused to/i.test(m.text())) violations.push(m.text());
    });
    await page.goto(t.url + '/catalogue');
    await page.getByTestId('user-menu').waitFor();
    expect(violations).toEqual([]);
  });
});
