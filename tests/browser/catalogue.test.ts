import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { TestServer } from '../helpers/app.js';
import { openSuite, signInAs, type BrowserSession, type Suite } from '../helpers/browser.js';

let t: TestServer;
let browser: BrowserSession;
let suite: Suite | undefined;

beforeAll(async () => {
  ({ t, browser } = suite = await openSuite());
});
afterAll(() => suite?.close());

describe('a steward loads a revised release', () => {
  it('uploads, reads the preview, confirms, and sees vintage n+1 and its revisions chart', async () => {
    const { page } = browser;
    const series = await t.db('series').where('code', 'EST_UNEMP').first();
    const latest = await t.db('vintages').where('series_id', series.id).max({ n: 'number' }).first();
    const n = Number(latest!.n);
    // The revised release: the latest vintage with its last three months revised and one month added.
    const vid = (await t.db('vintages').where({ series_id: series.id, number: n }).first()).id;
    const obs = await t.db('observations').where('vintage_id', vid).orderBy('period');
    const lines = ['period,value', ...obs.map((o, i) => `${o.period},${i >= obs.length - 3 ? (Number(o.value) + 0.2).toFixed(1) : o.value}`), '2025-07,5.9'];
    const file = path.join(fs.mkdtempSync(path.join(os.tmpdir(), 'tg-')), 'unemployment-2025-08.csv');
    fs.writeFileSync(file, lines.join('\n') + '\n');

    await signInAs(page, t.url, 'steward@demo.test');
    await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Catalogue' }).click();
    await page.getByRole('link', { name: 'EST_UNEMP' }).click();
    await page.getByRole('tab', { name: 'Load a release' }).click();
    await page.getByLabel('File (CSV, XLSX or SDMX-CSV)').setInputFiles(file);
    await page.getByLabel('Note').fill('July 2025 release');
    await page.getByRole('button', { name: 'Check the file' }).click();
    const preview = page.getByTestId('load-preview');
    await preview.waitFor();
    const text = await preview.innerText();
    expect(text).toMatch(/New periods\s*1/i);
    expect(text).toMatch(/Revised\s*3/i);
    expect(await t.db('vintages').where('series_id', series.id).count({ c: '*' }).first()).toEqual({ c: n });
    await page.getByRole('button', { name: `Store as vintage ${n + 1}` }).click();
    // The page moves to the revisions tab, comparing vintage n with n+1.
    await page.getByTestId('revision-summary').waitFor();
    expect(await page.getByTestId('revision-summary').innerText()).toMatch(/3 revised, 1 new/);
    await page.getByTestId('revision-chart').locator('canvas').first().waitFor();
    expect(await page.getByLabel('To vintage').inputValue()).toBe(String(n + 1));
    await page.getByRole('tab', { name: /Vintages/ }).click();
    const table = await page.getByTestId('vintage-table').innerText();
    expect(table).toContain('July 2025 release');
    expect(table).toContain('Sam Steward');
    await page.screenshot({ path: path.join(os.tmpdir(), 'tg-catalogue.png') });
  });
});
