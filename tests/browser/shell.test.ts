import type { Server } from 'node:http';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { listen, makeTestApp, type TestApp } from '../helpers/app.js';
import { openBrowser, type BrowserSession } from '../helpers/browser.js';

let t: TestApp;
let server: Server;
let base: string;
let browser: BrowserSession;

beforeAll(async () => {
  t = await makeTestApp();
  ({ server, url: base } = await listen(t.app));
  browser = await openBrowser();
});
afterAll(async () => {
  await browser?.close();
  server?.close();
  await t?.close();
});

describe('the application shell in Chromium', () => {
  it('renders the header and the health status read from the API', async () => {
    const { page } = browser;
    await page.goto(base + '/');
    await expect.poll(() => page.getByTestId('health-status').getAttribute('data-state'), { timeout: 15_000 }).toBe('ok');
    const text = await page.getByTestId('health-status').innerText();
    expect(text).toMatch(/database online/i);
    expect(await page.locator('header').innerText()).toContain('Tidegauge');
  });

  it('shows the not-found page for an unknown address', async () => {
    const { page } = browser;
    await page.goto(base + '/no/such/page');
    await expect.poll(() => page.locator('h1').innerText()).toMatch(/does not exist/);
  });
});
