import { chromium } from 'playwright-core';
import { startServer } from '../tests/helpers/app.ts';
import { signInAs } from '../tests/helpers/browser.ts';
const t = await startServer({}, { seedDemo: true });
const browser = await chromium.launch({ executablePath: '/usr/bin/chromium', headless: true, args: ['--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync'] });
for (const width of [1440, 390]) {
  const page = await browser.newPage({ viewport: { width, height: 1100 } });
  await signInAs(page, t.url, 'admin@demo.test');
  await page.goto(`${t.url}/profile`);
  await page.getByLabel('Current password').waitFor();
  await page.getByRole('button', { name: 'Change the password' }).click();
  await page.waitForTimeout(300);
  await page.screenshot({ path: `/tmp/profile-${width}.png`, fullPage: true });
  await page.goto(`${t.url}/reset-password/abcdefghijklmnop`);
  await page.waitForTimeout(800);
  await page.screenshot({ path: `/tmp/reset-${width}.png`, fullPage: true });
  await page.goto(`${t.url}/`);
  await page.waitForTimeout(1500);
  await page.screenshot({ path: `/tmp/home-${width}.png` });
  await page.close();
}
await browser.close();
await t.close();
process.exit(0);
