import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { TestServer } from '../helpers/app.js';
import { openSuite, signInAs, type BrowserSession, type Suite } from '../helpers/browser.js';
import { signedIn } from '../helpers/session.js';

let t: TestServer;
let browser: BrowserSession;
let suite: Suite | undefined;

beforeAll(async () => {
  ({ t, browser } = suite = await openSuite());
});
afterAll(() => suite?.close());

const sd = async (page: BrowserSession['page']) => (await page.getByTestId('cycle-stats').locator('tr', { hasText: 'Standard deviation' }).locator('td').innerText()).trim();

describe('the economist’s workspace', () => {
  it('changes λ, switches to Hamilton, saves, reopens and runs the revision analysis', async () => {
    const { page } = browser;
    await signInAs(page, t.url, 'economist@demo.test');
    await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Catalogue' }).click();
    await page.getByRole('link', { name: 'EST_GDP_REAL' }).click();
    await page.getByRole('link', { name: 'Decompose in a study' }).click();
    await page.getByTestId('cycle-chart').locator('canvas').first().waitFor();
    await expect.poll(() => page.getByTestId('method-line').innerText()).toMatch(/λ = 1 600/);
    const before = await sd(page);

    await page.getByLabel('λ', { exact: true }).fill('400000');
    await expect.poll(() => page.getByTestId('method-line').innerText(), { timeout: 10_000 }).toMatch(/λ = 400 000/);
    await expect.poll(() => sd(page)).not.toBe(before);
    expect(await page.getByTestId('cutoff').innerText()).toMatch(/cut-off/);
    expect(await page.getByTestId('end-warning').isVisible()).toBe(true);
    expect(await page.getByTestId('caution-line').innerText()).toMatch(/revised as new data arrive/);

    await page.getByLabel('Method').selectOption('hamilton');
    await expect.poll(() => page.getByTestId('method-line').innerText(), { timeout: 10_000 }).toMatch(/Hamilton regression filter, h = 8, p = 4/);
    await page.getByLabel('Title').fill('Estuary output gap, Hamilton');
    await page.getByRole('button', { name: 'Save the study' }).click();
    await page.waitForURL(/\/studies\/\d+$/);
    const url = page.url();

    await page.goto(url);
    await expect.poll(() => page.getByTestId('method-line').innerText(), { timeout: 10_000 }).toMatch(/Hamilton/);
    expect(await page.getByLabel('Title').inputValue()).toBe('Estuary output gap, Hamilton');

    // The chronology its charts shade is the study's: a change to save, kept after a reload.
    const shade = page.getByLabel('Shade contractions of a reference chronology').first();
    await shade.selectOption({ label: 'Staff reference chronology (invented) (Estuary)' });
    await page.getByTestId('unsaved').waitFor();
    await page.getByRole('button', { name: /^Save/ }).click();
    await expect.poll(async () => (await t.db('studies').where('id', Number(url.split('/').pop())).first()).chronology_id).not.toBeNull();
    await page.goto(url);
    await page.getByTestId('cycle-chart').locator('canvas').first().waitFor();
    await expect.poll(() => shade.evaluate((el) => (el as HTMLSelectElement).selectedOptions[0]?.textContent)).toBe('Staff reference chronology (invented) (Estuary)');
    expect(await page.getByTestId('unsaved').count()).toBe(0);
    await page.getByRole('tab', { name: 'Real-time revisions' }).click();
    await page.getByRole('button', { name: 'Run the revision analysis' }).click();
    await page.getByTestId('fan-chart').locator('canvas').first().waitFor({ timeout: 30_000 });
    const table = await page.getByTestId('reliability-table').innerText();
    expect(table).toMatch(/Noise-to-signal/);
    expect(table).toMatch(/\d\.\d\d/);
  });

  it('stays responsive on a 600-point monthly series: dragging λ sends no request per step', async () => {
    // A 600-month series loaded for the test.
    const steward = await signedIn(t, 'steward@demo.test');
    const s = (await steward.post('/api/v1/series').send({ code: 'LONG_MONTHLY', title: 'A long monthly series', frequency: 'M', unit: 'index', seasonalAdjustment: 'sa', source: 'test' }).expect(201)).body;
    const lines = ['period,value'];
    for (let i = 0; i < 600; i++) lines.push(`${1975 + Math.floor(i / 12)}-${String((i % 12) + 1).padStart(2, '0')},${(100 + i * 0.2 + 5 * Math.sin(i / 20)).toFixed(3)}`);
    await steward.post(`/api/v1/series/${s.id}/vintages`).attach('file', Buffer.from(lines.join('\n')), 'long.csv').expect(201);

    const { page } = browser;
    await page.goto(`${t.url}/studies/new?seriesId=${s.id}`);
    await page.getByTestId('cycle-chart').locator('canvas').first().waitFor();
    await expect.poll(() => page.getByTestId('method-line').innerText()).toMatch(/λ = 14 400/);
    let previews = 0;
    page.on('request', (r) => {
      if (r.url().endsWith('/api/v1/studies/preview')) previews++;
    });
    const slider = page.getByLabel('λ (logarithmic scale)');
    const box = (await slider.boundingBox())!;
    await page.mouse.move(box.x + box.width * 0.3, box.y + box.height / 2);
    await page.mouse.down();
    const steps = 60;
    const started = Date.now();
    for (let i = 0; i <= steps; i++) {
      await page.mouse.move(box.x + box.width * (0.3 + (0.6 * i) / steps), box.y + box.height / 2);
      await page.waitForTimeout(10);
    }
    await page.mouse.up();
    const dragMs = Date.now() - started;
    await expect.poll(() => page.getByTestId('method-line').innerText(), { timeout: 10_000 }).not.toMatch(/λ = 14 400/);
    await page.waitForTimeout(800);
    // One request after the slider comes to rest (a few more only if the drag paused), never one per step (61 steps).
    expect(previews).toBeGreaterThanOrEqual(1);
    expect(previews).toBeLessThanOrEqual(6);
    expect(dragMs).toBeLessThan(15_000);
  });
});
