import fs from 'node:fs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { TestServer } from '../helpers/app.js';
import { openSuite, signInAs, signOut, type BrowserSession, type Suite } from '../helpers/browser.js';
import { signedIn } from '../helpers/session.js';

let t: TestServer;
let browser: BrowserSession;
let suite: Suite | undefined;

beforeAll(async () => {
  ({ t, browser } = suite = await openSuite());
  const economist = await signedIn(t, 'economist@demo.test');
  const gdp = (await t.db('series').where('code', 'EST_GDP_REAL').first()).id;
  await economist.post('/api/v1/studies').send({ title: 'Output gap (HP)', seriesId: gdp, vintage: 'latest', transform: 'log100', method: 'hp', params: { lambda: 1600 } }).expect(201);
  await economist.post('/api/v1/studies').send({ title: 'Output gap (Hamilton)', seriesId: gdp, vintage: 'latest', transform: 'log100', method: 'hamilton', params: {} }).expect(201);
});
afterAll(() => suite?.close());

describe('from a board to a published exhibit', () => {
  it('economist composes a board and drafts an exhibit; editor returns, then approves and publishes; a reader downloads it', async () => {
    const { page } = browser;
    await signInAs(page, t.url, 'economist@demo.test');
    await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Boards' }).click();
    await page.locator('#board-title').fill('Quarterly gap pack');
    await page.getByRole('button', { name: 'Compose the board' }).click();
    await page.waitForURL(/\/boards\/\d+$/);

    await page.getByRole('button', { name: 'Add a panel' }).click();
    await page.getByLabel('Panel title').fill('The output gap');
    await page.locator('label.tag', { hasText: 'Output gap (HP)' }).click();
    await page.getByRole('button', { name: 'Add the panel' }).click();
    await expect.poll(() => page.getByTestId('board-panel').count()).toBe(1);

    await page.getByRole('button', { name: 'Add a panel' }).click();
    await page.getByLabel('Panel title').fill('HP and Hamilton');
    await page.locator('label.tag', { hasText: 'Output gap (HP)' }).click();
    await page.locator('label.tag', { hasText: 'Output gap (Hamilton)' }).click();
    await page.getByRole('button', { name: 'Add the panel' }).click();
    await expect.poll(() => page.getByTestId('board-panel').count()).toBe(2);
    await page.getByTestId('panel-chart').nth(1).locator('canvas').first().waitFor();
    expect(await page.getByTestId('panel-freshness').first().innerText()).toMatch(/vintage 4 loaded on/);

    const second = page.getByTestId('board-panel').nth(1);
    await second.getByRole('link', { name: 'Draft an exhibit from this panel' }).click();
    await page.locator('#nx-title').fill('Two estimates of the Estuary output gap');
    await page.locator('#nx-subtitle').fill('Percent of trend, first draft');
    await page.getByRole('button', { name: 'Draft the exhibit' }).click();
    await page.waitForURL(/\/exhibits\/\d+$/);
    const exhibitUrl = page.url();
    await page.getByTestId('exhibit-chart').locator('canvas').first().waitFor();
    await page.getByRole('button', { name: 'Submit for review' }).click();
    await expect.poll(() => page.getByTestId('exhibit-state').innerText()).toBe('in review');
    await signOut(page);

    await signInAs(page, t.url, 'editor@demo.test');
    await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Review desk' }).click();
    await page.getByTestId('review-queue').getByRole('link', { name: 'Two estimates of the Estuary output gap' }).click();
    await page.getByLabel('Comment (required to return)').fill('Drop "first draft" from the subtitle.');
    await page.getByRole('button', { name: 'Return to the author' }).click();
    await expect.poll(() => page.getByTestId('exhibit-state').innerText()).toBe('returned');
    await signOut(page);

    await signInAs(page, t.url, 'economist@demo.test');
    await page.goto(exhibitUrl);
    await page.getByText('Drop "first draft" from the subtitle.').first().waitFor();
    await page.locator('#ex-subtitle').fill('Percent of trend');
    await page.getByRole('button', { name: 'Save the text' }).click();
    await page.getByRole('button', { name: 'Text saved' }).waitFor();
    await page.getByRole('button', { name: 'Submit for review' }).click();
    await expect.poll(() => page.getByTestId('exhibit-state').innerText()).toBe('in review');
    await signOut(page);

    await signInAs(page, t.url, 'editor@demo.test');
    await page.goto(exhibitUrl);
    const diff = page.getByTestId('review-diff');
    await diff.waitFor();
    expect(await diff.innerText()).toMatch(/subtitle.*Percent of trend, first draft.*Percent of trend/s);
    await page.getByRole('button', { name: 'Approve' }).click();
    await expect.poll(() => page.getByTestId('exhibit-state').innerText()).toBe('approved');
    await page.getByRole('button', { name: 'Publish' }).click();
    await expect.poll(() => page.getByTestId('exhibit-state').innerText()).toBe('published');
    const history = await page.getByTestId('exhibit-history').innerText();
    expect(history.match(/moved it to/g)).toHaveLength(5);
    await signOut(page);

    await signInAs(page, t.url, 'viewer@demo.test');
    await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Exhibits' }).click();
    await page.getByTestId('exhibits-table').getByRole('link', { name: 'Two estimates of the Estuary output gap' }).click();
    await page.getByTestId('exhibit-chart').locator('canvas').first().waitFor();
    const stamp = await page.getByTestId('exhibit-stamp').innerText();
    expect(stamp).toMatch(/data as of 2025-08-14, vintage 4/);

    const [png] = await Promise.all([page.waitForEvent('download'), page.getByRole('button', { name: 'PNG' }).click()]);
    const pngBytes = fs.readFileSync((await png.path())!);
    expect(pngBytes.subarray(1, 4).toString()).toBe('PNG');
    expect(pngBytes.readUInt32BE(16)).toBe(3600); // 1200 px wide at 3×: print resolution
    // The figure is as tall as its text needs (title, chart, notes, source, stamps, caution), at 3×.
    expect(pngBytes.readUInt32BE(20) % 3).toBe(0);
    expect(pngBytes.readUInt32BE(20)).toBeGreaterThan(1800);

    const [csv] = await Promise.all([page.waitForEvent('download'), page.getByRole('link', { name: 'Data (CSV)' }).click()]);
    const text = fs.readFileSync((await csv.path())!, 'utf8');
    const [header, firstRow] = text.split('\n').filter((l) => !l.startsWith('#'));
    expect(text).toMatch(/^# Exhibit: Two estimates of the Estuary output gap$/m);
    expect(header).toBe('period,"Hodrick–Prescott, λ = 1 600, % of trend","Hamilton regression filter, h = 8, p = 4, % of trend",vintage,method');
    expect(firstRow).toMatch(/^1995-Q1,/);
    expect(firstRow).toContain('data as of 2025-08-14, vintage 4');
  });
});
