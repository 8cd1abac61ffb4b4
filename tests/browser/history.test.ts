/** Issue 12 in the browser: a steward loads a workbook history; an economist analyses it in real time. */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { openSuite, signInAs, signOut, type BrowserSession, type Suite } from '../helpers/browser.js';
import type { TestServer } from '../helpers/app.js';
import { signedIn } from '../helpers/session.js';
import { describeFindings, runAxe } from '../helpers/axe.js';
import { utc, workbook, type Cell } from '../helpers/history-files.js';

let t: TestServer;
let browser: BrowserSession;
let suite: Suite | undefined;

beforeAll(async () => {
  ({ t, browser } = suite = await openSuite());
});
afterAll(() => suite?.close());

/** 24 quarterly releases (2016-Q1 to 2021-Q4) of an invented output series, each revising the last quarters a little. */
function releaseTable(): Cell[][] {
  const n0 = 60;
  const releases = 24;
  const level = (i: number) => 100 * Math.exp(0.005 * i) * (1 + 0.02 * Math.sin(i / 5));
  const rows: Cell[][] = [['Real output, invented for the test'], ['Quarterly releases; values in index points'], ['release date'], ['period']];
  for (let r = 0; r < releases; r++) {
    const q = n0 + r; // quarters published by this release
    rows[2].push(utc(`${1991 + Math.floor(q / 4)}-${String((q % 4) * 3 + 2).padStart(2, '0')}-20`));
    rows[3].push(`release ${r + 1}`);
  }
  for (let i = 0; i < n0 + releases; i++) {
    const row: Cell[] = [`${1991 + Math.floor(i / 4)}-Q${(i % 4) + 1}`];
    for (let r = 0; r < releases; r++) {
      const q = n0 + r;
      const age = q - 1 - i; // quarters since this period was first published
      row.push(i < q ? Number((level(i) * (1 + (age < 4 ? 0.002 * (4 - age) * Math.cos(r + i) : 0))).toFixed(3)) : null);
    }
    rows.push(row);
  }
  return rows;
}

describe('a history load in the browser', () => {
  it('the steward picks the sheet, reads the preview and stores; the economist runs the real-time analysis on it', async () => {
    const steward = await signedIn(t, 'steward@demo.test');
    const s = (await steward.post('/api/v1/series').send({ code: 'T_HIST_BROWSER', title: 'Real output (history test)', frequency: 'Q', unit: 'index', seasonalAdjustment: 'sa', source: 'invented' }).expect(201)).body;
    const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'tg-history-'));
    const file = path.join(dir, 'output-releases.xlsx');
    fs.writeFileSync(file, await workbook([{ name: 'Notes', rows: [['All figures are invented.'], ['See the sheet Real output.']] }, { name: 'Real output', rows: releaseTable(), merge: ['A1:H1'] }]));

    const { page } = browser;
    await signInAs(page, t.url, 'steward@demo.test');
    await page.goto(`${t.url}/catalogue/${s.id}`);
    await page.getByRole('tab', { name: 'Load a history' }).click();
    await page.getByLabel('History file (CSV or XLSX)').setInputFiles(file);
    await page.getByRole('button', { name: 'Check the history' }).click();
    const preview = page.getByTestId('history-preview');
    await preview.waitFor();
    // The first sheet holds notes only: the sheet with periods down its first column is read instead.
    expect(await page.getByLabel('Sheet').inputValue()).toBe('Real output');
    // Picking the notes sheet shows there is nothing to store there; picking the data again reads it.
    await page.getByLabel('Sheet').selectOption('Notes');
    await expect.poll(() => preview.innerText(), { timeout: 15_000 }).toMatch(/Nothing to store|Fix the errors/);
    await page.getByLabel('Sheet').selectOption('Real output');
    await expect.poll(() => page.getByTestId('history-layout').innerText(), { timeout: 15_000 }).toMatch(/Header row\s*4 \(found\)/i);
    expect(await page.getByTestId('history-layout').innerText()).toMatch(/Release-date row\s*3 \(found\)/i);
    expect(await page.getByTestId('history-headers').innerText()).toContain('released 2006-02-20 (row 3)');
    expect(await page.getByTestId('history-vintages').innerText()).toMatch(/2006-02-20/);
    await page.setViewportSize({ width: 1440, height: 1000 });
    await page.screenshot({ path: path.join(os.tmpdir(), 'tg-history-preview-1440.png'), fullPage: true });
    const axe = await runAxe(page);
    expect(axe.failures, describeFindings('history preview', axe.failures)).toEqual([]);
    await page.setViewportSize({ width: 390, height: 844 });
    await page.screenshot({ path: path.join(os.tmpdir(), 'tg-history-preview-390.png'), fullPage: true });
    expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(390);
    const phone = await runAxe(page);
    expect(phone.failures, describeFindings('history preview at 390 px', phone.failures)).toEqual([]);
    await page.setViewportSize({ width: 1440, height: 1000 });
    expect(await t.db('vintages').where('series_id', s.id).count({ n: '*' }).first()).toEqual({ n: 0 });
    await page.getByRole('button', { name: 'Store 24 vintages (1 to 24)' }).click();
    await page.getByTestId('history-stored').waitFor();
    expect(await page.getByTestId('history-stored').innerText()).toMatch(/Stored 24 vintages \(1 to 24/);
    expect(await t.db('vintages').where('series_id', s.id).count({ n: '*' }).first()).toEqual({ n: 24 });
    await signOut(page);

    await signInAs(page, t.url, 'economist@demo.test');
    await page.goto(`${t.url}/studies/new?seriesId=${s.id}`);
    await page.getByTestId('cycle-chart').locator('canvas').first().waitFor();
    await page.getByLabel('Title').fill('Real output gap in real time');
    await page.getByRole('button', { name: 'Save the study' }).click();
    await page.waitForURL(/\/studies\/\d+$/);
    await page.getByRole('tab', { name: 'Real-time revisions' }).click();
    await page.getByRole('button', { name: 'Run the revision analysis' }).click();
    await page.getByTestId('fan-chart').locator('canvas').first().waitFor({ timeout: 30_000 });
    const table = await page.getByTestId('reliability-table').innerText();
    expect(table).toMatch(/Periods compared\s*2[0-9]/);
    await page.screenshot({ path: path.join(os.tmpdir(), 'tg-history-realtime-1440.png'), fullPage: true });

    // A study may pin a date: the vintage in force then (releases every 20th of Feb, May, Aug, Nov from 2006).
    await page.getByRole('tab', { name: 'Decomposition' }).click();
    await page.getByLabel('Vintage').selectOption('date');
    await page.getByLabel('Data as of').fill('2008-01-01');
    await expect.poll(() => page.getByTestId('vintage-stamp').innerText(), { timeout: 15_000 }).toMatch(/data as of 2007-11-20, vintage 8 \(pinned\)/);
    await page.getByRole('button', { name: 'Save the changes' }).click();
    await expect.poll(async () => (await t.db('studies').where('title', 'Real output gap in real time').first()).vintage_as_of, { timeout: 10_000 }).toBeTruthy();
    await page.reload();
    await expect.poll(() => page.getByTestId('vintage-stamp').innerText(), { timeout: 15_000 }).toMatch(/vintage 8 \(pinned\)/);
    expect(await page.getByLabel('Data as of').inputValue()).toBe('2008-01-01');
  });
});
