import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { TestServer } from '../helpers/app.js';
import { openSuite, signInAs, signOut, type BrowserSession, type Suite } from '../helpers/browser.js';

let t: TestServer;
let browser: BrowserSession;
let suite: Suite | undefined;

beforeAll(async () => {
  ({ t, browser } = suite = await openSuite());
});
afterAll(() => suite?.close());

describe('inviting a new person, end to end', () => {
  it('admin invites; the mail is read on the Mailbox page; the invitee accepts, signs in and sees only what a reader may', async () => {
    const { page } = browser;
    await signInAs(page, t.url, 'admin@demo.test');
    await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'People' }).click();
    await page.getByRole('tab', { name: 'Invitations' }).click();
    await page.getByLabel('E-mail').fill('reader.new@demo.test');
    // Roles: reader only (viewer is ticked by default).
    await page.getByRole('button', { name: 'Send the invitation' }).click();
    await page.getByText('Invitation sent.').waitFor();

    await page.getByRole('link', { name: 'Mailbox' }).click();
    const item = page.getByTestId('mailbox').getByRole('button', { name: /Your invitation to Tidegauge/ });
    await item.first().click();
    const link = page.getByTestId('mailbox').getByRole('link', { name: /\/invite\// });
    const href = await link.first().getAttribute('href');
    expect(href).toContain(`${t.url}/invite/`);
    await signOut(page);

    await page.goto(href!);
    await page.getByText('reader.new@demo.test').waitFor();
    await page.getByLabel('Your name').fill('Rita Reader');
    await page.getByLabel('Password', { exact: true }).fill('rita-reads-exhibits');
    await page.getByLabel('Password again').fill('rita-reads-exhibits');
    await page.getByRole('button', { name: 'Join and sign in' }).click();
    await page.getByTestId('user-menu').waitFor();
    expect(await page.getByTestId('user-menu').innerText()).toBe('Rita Reader');
    await signOut(page);

    await signInAs(page, t.url, 'reader.new@demo.test', 'rita-reads-exhibits');
    const nav = await page.getByRole('navigation', { name: 'Main' }).innerText();
    expect(nav).toContain('Catalogue');
    expect(nav).toContain('Exhibits');
    expect(nav).not.toContain('People');
    expect(nav).not.toContain('Review desk');
    expect(nav).not.toContain('Studies');
    await page.goto(`${t.url}/people`);
    await page.getByTestId('role-needed').waitFor();
    expect(await page.locator('h1').innerText()).toBe('You need the administrator role');
    // The link used once does not work twice.
    await signOut(page);
    await page.goto(href!);
    await page.getByRole('alert').waitFor();
    expect(await page.getByRole('alert').innerText()).toMatch(/already been used/);
  });
});
