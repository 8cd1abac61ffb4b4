import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startServer, type TestServer } from '../helpers/app.js';
import { openBrowser, signInAs, type BrowserSession } from '../helpers/browser.js';

let t: TestServer;
let browser: BrowserSession;

beforeAll(async () => {
  t = await startServer({}, { seedDemo: true });
  browser = await openBrowser();
});
afterAll(async () => {
  await browser?.close();
  await t?.close();
});

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

  it('shows the not-found page for an unknown address', async () => {
    const { page } = browser;
    await page.goto(t.url + '/no/such/page');
    await expect.poll(() => page.locator('h1').innerText()).toMatch(/does not exist/);
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
