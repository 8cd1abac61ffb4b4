/**
 * The start of the Range & reliability walks: an economist opens the page, chooses a series
 * through the picker (typing `typed`, then by keyboard or a click), leaves out unobserved
 * components (slow, and not what these walks look at) and shows the range until its chart is drawn.
 */
import type { Page } from 'playwright-core';
import { signInAs } from './browser.js';
import { pickSeries } from './picker.js';

/** Returns the page errors seen from here on (a walk ends by checking there were none). */
export async function showRange(page: Page, base: string, typed: string, code: string, how: 'keyboard' | 'click'): Promise<string[]> {
  const errors: string[] = [];
  page.on('pageerror', (e) => errors.push(String(e)));
  await page.setViewportSize({ width: 1440, height: 1000 });
  await signInAs(page, base, 'economist@demo.test');
  await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Range & reliability' }).click();
  await pickSeries(page.getByLabel('Series'), typed, code, how);
  await page.getByRole('checkbox', { name: 'Unobserved components' }).uncheck();
  await page.getByRole('button', { name: 'Show the range' }).click();
  await page.getByTestId('range-chart').locator('canvas').first().waitFor({ timeout: 30_000 });
  return errors;
}
