/** Debian's Chromium driven by playwright-core, headless, with a fresh profile for every test file. */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { chromium, type BrowserContext, type Page } from 'playwright-core';

export const CHROMIUM_ARGS = [
  '--no-sandbox',
  '--disable-gpu',
  '--disable-background-networking',
  '--disable-component-update',
  '--disable-sync',
  '--no-first-run',
  '--disable-quic',
  '--disable-dev-shm-usage',
];

export interface BrowserSession {
  context: BrowserContext;
  page: Page;
  downloadsDir: string;
  close(): Promise<void>;
}

export async function openBrowser(): Promise<BrowserSession> {
  const userDataDir = fs.mkdtempSync(path.join(os.tmpdir(), 'tidegauge-chromium-'));
  const downloadsDir = fs.mkdtempSync(path.join(os.tmpdir(), 'tidegauge-downloads-'));
  const context = await chromium.launchPersistentContext(userDataDir, {
    executablePath: process.env.CHROMIUM_PATH || '/usr/bin/chromium',
    headless: true,
    args: CHROMIUM_ARGS,
    acceptDownloads: true,
    downloadsPath: downloadsDir,
    viewport: { width: 1400, height: 1000 },
  });
  const page = context.pages()[0] ?? (await context.newPage());
  const errors: string[] = [];
  page.on('pageerror', (e) => errors.push(String(e)));
  return {
    context,
    page,
    downloadsDir,
    async close() {
      await context.close();
      fs.rmSync(userDataDir, { recursive: true, force: true });
      fs.rmSync(downloadsDir, { recursive: true, force: true });
    },
  };
}

export async function signInAs(page: Page, base: string, email: string, password = 'tidegauge-demo') {
  await page.goto(`${base}/sign-in`);
  await page.getByLabel('E-mail').fill(email);
  await page.getByLabel('Password').fill(password);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.getByTestId('user-menu').waitFor({ timeout: 15_000 });
}

export async function signOut(page: Page) {
  await page.getByRole('button', { name: 'Sign out' }).click();
  await page.waitForURL(/sign-in/, { timeout: 15_000 });
}

export interface Suite {
  t: import('./app.js').TestServer;
  browser: BrowserSession;
  close(): Promise<void>;
}

/** A server on the demo workspace and a fresh Chromium profile, for one browser test file. */
export async function openSuite(): Promise<Suite> {
  const { startServer } = await import('./app.js');
  const t = await startServer({}, { seedDemo: true });
  const browser = await openBrowser();
  return {
    t,
    browser,
    async close() {
      await browser.close();
      await t.close();
    },
  };
}
