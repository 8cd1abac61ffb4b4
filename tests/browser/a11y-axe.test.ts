/**
 * WCAG 2.2 AA in Chromium: axe-core on every page of the role map (server/schemas/access.ts) as each
 * role that may open it, on every tab of every page, with every chart's data table open; and the
 * pages outside the shell (sign-in, password, invitation, a public exhibit). Fails on any serious or
 * critical violation; prints moderate and minor ones. On every page it also checks what axe's WCAG
 * rules leave to best practice: one `main` landmark, one h1, no skipped heading level, and a page
 * title that names the page.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { allows, PAGES } from '../../server/schemas/access.js';
import { ROLES, type Role } from '../../server/schemas/people.js';
import type { TestServer } from '../helpers/app.js';
import { describeFindings, runAxe } from '../helpers/axe.js';
import { openSuite, signInAs, type BrowserSession, type Suite } from '../helpers/browser.js';
import { signedIn } from '../helpers/session.js';

let t: TestServer;
let browser: BrowserSession;
let suite: Suite | undefined;
const ids = { series: 0, study: 0, rangeStudy: 0, rangeDraft: 0, board: 0, published: 0, inReview: 0, draft: 0, slug: '' };

beforeAll(async () => {
  ({ t, browser } = suite = await openSuite());
  const economist = await signedIn(t, 'economist@demo.test');
  const editor = await signedIn(t, 'editor@demo.test');
  const admin = await signedIn(t, 'admin@demo.test');
  ids.series = (await t.db('series').where('code', 'EST_GDP_REAL').first()).id;
  ids.study = (await t.db('studies').where('title', 'Estuary output gap, Hodrick–Prescott').first()).id;
  ids.board = (await t.db('boards').first()).id;
  const published = await t.db('exhibits').where('status', 'published').first();
  ids.published = published.id;
  // The seeded draft goes through a return and a second submission: the editor then sees what changed.
  const seededDraft = (await t.db('exhibits').where('status', 'draft').first()).id;
  await economist.post(`/api/v1/exhibits/${seededDraft}/transitions`).send({ to: 'in_review' }).expect(200);
  await editor.post(`/api/v1/exhibits/${seededDraft}/transitions`).send({ to: 'returned', comment: 'Name the vintage in the subtitle.' }).expect(200);
  await economist.patch(`/api/v1/exhibits/${seededDraft}`).send({ subtitle: 'Vintage 4' }).expect(200);
  await economist.post(`/api/v1/exhibits/${seededDraft}/transitions`).send({ to: 'in_review' }).expect(200);
  ids.inReview = seededDraft;
  ids.draft = (await economist.post('/api/v1/exhibits').send({ studyId: ids.study, title: 'A draft to check' }).expect(201)).body.id;
  // A range study (issue 13) and a range exhibit drafted from it, with the band of past revisions on the first draft.
  ids.rangeStudy = (await economist.post('/api/v1/studies').send({ kind: 'range', title: 'A range to check', seriesId: ids.series, transform: 'log100', methods: [{ method: 'hp' }, { method: 'hamilton' }, { method: 'bn-filter' }] }).expect(201)).body.id;
  ids.rangeDraft = (await economist.post('/api/v1/exhibits').send({ studyId: ids.rangeStudy, title: 'A range exhibit to check' }).expect(201)).body.id;
  await economist.patch(`/api/v1/exhibits/${ids.draft}`).send({ revisionBand: true }).expect(200);
  await admin.put('/api/v1/settings').send({ publicExhibitLinks: true }).expect(200);
  ids.slug = (await t.db('exhibits').where('id', ids.published).first()).public_slug;
});
afterAll(() => suite?.close());

/**
 * The addresses that stand for a page of the role map, for a role: the path itself when it has no
 * parameters, else the demo's records. A page with parameters added to the role map fails this test
 * until it gets addresses here: every page is checked.
 */
function addresses(path: string, role: Role): string[] {
  const concrete: Record<string, () => string[]> = {
    '/catalogue/:id': () => [`/catalogue/${ids.series}`],
    '/catalogue/:id/edit': () => [`/catalogue/${ids.series}/edit`],
    '/studies/new': () => [`/studies/new?seriesId=${ids.series}`],
    '/studies/:id': () => [`/studies/${ids.study}`, `/studies/${ids.rangeStudy}`],
    '/boards/:id': () => [`/boards/${ids.board}`],
    '/exhibits/new': () => [`/exhibits/new?studyId=${ids.study}`],
    '/exhibits/:id': () => [`/exhibits/${ids.published}`, ...(role === 'economist' ? [`/exhibits/${ids.draft}`, `/exhibits/${ids.rangeDraft}`] : []), ...(role === 'editor' ? [`/exhibits/${ids.inReview}`] : [])],
  };
  const make = concrete[path] ?? (path.includes(':') ? undefined : () => [path]);
  if (!make) throw new Error(`The accessibility test has no address for the page ${path}: add one to addresses() in ${import.meta.url}`);
  return make();
}

/** Waits for the page's data and charts: no request in flight, no spinner, no busy region. */
async function settle(page: BrowserSession['page']) {
  await page.waitForLoadState('networkidle');
  await page.waitForFunction(() => !document.querySelector('[aria-busy="true"], .animate-spin'), undefined, { timeout: 30_000 });
  await page.waitForTimeout(250);
}

/** One h1, a main landmark, headings that skip no level, and a title naming the page. */
async function structure(page: BrowserSession['page']) {
  return page.evaluate(() => {
    const headings = [...document.querySelectorAll('h1, h2, h3, h4, h5, h6')].filter((h) => (h as HTMLElement).offsetParent !== null || h.closest('.sr-only'));
    const levels = headings.map((h) => Number(h.tagName[1]));
    const skips = levels.flatMap((l, i) => (i > 0 && l > levels[i - 1] + 1 ? [`h${levels[i - 1]} → h${l} (${headings[i].textContent?.slice(0, 40)})`] : []));
    return {
      mains: document.querySelectorAll('main, [role="main"]').length,
      h1: [...document.querySelectorAll('h1')].map((h) => h.textContent?.trim() ?? ''),
      firstLevel: levels[0] ?? 0,
      skips,
      title: document.title,
    };
  });
}

interface Report {
  failures: string[];
  notes: Map<string, number>;
}

async function check(page: BrowserSession['page'], where: string, report: Report) {
  await settle(page);
  // Every chart's data table open, so that the tables are checked too.
  const closed = page.locator('[data-chart-table-toggle][aria-expanded="false"]');
  for (let n = await closed.count(); n > 0; n--) await closed.first().click();
  const { failures, notes } = await runAxe(page);
  if (failures.length) report.failures.push(describeFindings(where, failures));
  for (const n of notes) report.notes.set(`${n.impact} ${n.id}`, (report.notes.get(`${n.impact} ${n.id}`) ?? 0) + 1);
  const s = await structure(page);
  if (s.mains !== 1) report.failures.push(`${where}: ${s.mains} main landmarks`);
  if (s.h1.length !== 1) report.failures.push(`${where}: ${s.h1.length} h1 headings (${s.h1.join(' | ')})`);
  if (s.firstLevel !== 1) report.failures.push(`${where}: the first heading is h${s.firstLevel}`);
  if (s.skips.length) report.failures.push(`${where}: heading levels skip: ${s.skips.join('; ')}`);
  // The start page's h1 greets; its title names it.
  const named = new URL(page.url()).pathname === '/' ? s.title === 'Start page — Tidegauge' : !!s.h1[0] && s.title.startsWith(s.h1[0].slice(0, 60));
  if (!s.title.endsWith(' — Tidegauge') || !named) report.failures.push(`${where}: the page title “${s.title}” does not name the page (h1 “${s.h1[0]}”)`);
}

/** The page, then each of its tabs in turn (every tab list on the page). */
async function checkWithTabs(page: BrowserSession['page'], where: string, report: Report) {
  await check(page, where, report);
  const tabs = await page.getByRole('tab').all();
  for (const tab of tabs.slice(1)) {
    const name = (await tab.innerText()).trim();
    await tab.click();
    await check(page, `${where} [tab ${name}]`, report);
  }
}

function finish(report: Report, what: string) {
  if (report.notes.size) console.info(`${what}, moderate and minor findings (information):\n  ${[...report.notes].map(([k, n]) => `${k} ×${n}`).join('\n  ')}`);
  expect(report.failures, report.failures.join('\n')).toEqual([]);
}

describe('axe-core (WCAG 2.2 A and AA) on every page as each role', () => {
  it('finds no serious or critical violation on the pages outside the shell', async () => {
    const { page } = browser;
    const report: Report = { failures: [], notes: new Map() };
    for (const path of ['/sign-in', '/forgot-password', '/reset-password/not-a-token', '/invite/not-a-token', `/p/${ids.slug}`]) {
      await page.goto(t.url + path);
      await check(page, `${path} (signed out)`, report);
    }
    finish(report, 'signed out');
  });

  for (const role of ROLES) {
    it(`finds no serious or critical violation on any page as ${role}`, { timeout: 600_000 }, async () => {
      const { page } = browser;
      const report: Report = { failures: [], notes: new Map() };
      await browser.context.clearCookies();
      await signInAs(page, t.url, `${role}@demo.test`);
      let visited = 0;
      for (const p of PAGES.filter((x) => allows(x.access, [role]))) {
        for (const address of addresses(p.path, role)) {
          await page.goto(t.url + address);
          await checkWithTabs(page, `${address} as ${role}`, report);
          visited++;
        }
      }
      // Pages a role may not open say so; that page is checked too.
      const refused = PAGES.find((x) => !allows(x.access, [role]) && !x.path.includes(':'));
      if (refused) {
        await page.goto(t.url + refused.path);
        await page.getByTestId('role-needed').waitFor();
        await check(page, `${refused.path} as ${role} (not allowed)`, report);
      }
      if (role === 'economist') {
        // The study's real-time tab with its results, and the page of an unknown address.
        await page.goto(`${t.url}/studies/${ids.study}`);
        await page.getByRole('tab', { name: 'Real-time revisions' }).click();
        await page.getByRole('button', { name: 'Run the revision analysis' }).click();
        await page.getByTestId('realtime-result').waitFor({ timeout: 60_000 });
        await check(page, `/studies/${ids.study} [real-time results] as ${role}`, report);
        await page.goto(`${t.url}/no/such/page`);
        await check(page, '/no/such/page', report);
      }
      if (role === 'admin') {
        // A message opened in the Mailbox; the revision triangle of a series.
        await page.goto(`${t.url}/people/mailbox`);
        await settle(page);
        const first = page.getByTestId('mailbox').getByRole('button').first();
        if (await first.count()) await first.click();
        await check(page, '/people/mailbox [a message open]', report);
        await page.goto(`${t.url}/catalogue/${ids.series}?tab=revisions`);
        await page.getByRole('button', { name: /Show the revision triangle/ }).click();
        await page.getByTestId('revision-triangle').waitFor();
        await check(page, `/catalogue/${ids.series} [revision triangle]`, report);
      }
      expect(visited).toBeGreaterThan(3);
      finish(report, role);
    });
  }
});
