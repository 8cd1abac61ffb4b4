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

describe('passwords (issue 17)', () => {
  it('a reset link from the Mailbox asks about API tokens (revoke by default); a change on the Profile page revokes them and ends other sessions', async () => {
    const { page } = browser;
    // Forgotten password: the answer is the same for everyone; the mail arrives afterwards.
    await page.goto(`${t.url}/forgot-password`);
    await page.getByLabel('E-mail').fill('viewer@demo.test');
    await page.getByRole('button', { name: 'Send a reset link' }).click();
    await page.getByText('If this address has an account, a reset link is on its way.').waitFor();
    await signInAs(page, t.url, 'admin@demo.test');
    await page.goto(`${t.url}/people/mailbox`);
    await page.getByTestId('mailbox').getByRole('button', { name: /Reset your Tidegauge password/ }).first().click();
    const href = await page.getByTestId('mailbox').getByRole('link', { name: /\/reset-password\// }).first().getAttribute('href');
    await signOut(page);
    await page.goto(href!);
    const revoke = page.getByLabel(/Also revoke my API tokens/);
    expect(await revoke.isChecked()).toBe(true);
    await page.getByLabel('New password', { exact: true }).fill('viewer-chose-this-one');
    await page.getByLabel('New password again').fill('viewer-chose-this-one');
    await page.getByRole('button', { name: 'Set the password and sign in' }).click();
    await page.getByTestId('user-menu').waitFor();

    // On the Profile page: a token, then a password change that revokes it.
    await page.getByTestId('user-menu').click();
    await page.getByLabel('Token name').fill('nightly script');
    await page.getByRole('button', { name: 'Create a token' }).click();
    await page.getByTestId('new-token').waitFor();
    await page.getByLabel('Current password').fill('viewer-chose-this-one');
    await page.getByLabel('New password', { exact: true }).fill('viewer-second-choice');
    await page.getByLabel('New password again').fill('viewer-second-choice');
    expect(await page.getByLabel(/Also revoke my API tokens/).isChecked()).toBe(true);
    await page.getByRole('button', { name: 'Change the password' }).click();
    await page.getByTestId('password-changed').waitFor();
    expect(await page.getByTestId('password-changed').innerText()).toMatch(/1 API token was revoked/);
    await page.getByText(/^revoked /).first().waitFor();
    // This browser stays signed in (its session was renewed); the new password works next time.
    await page.reload();
    await page.getByTestId('user-menu').waitFor();
    await signOut(page);
    await signInAs(page, t.url, 'viewer@demo.test', 'viewer-second-choice');
    await signOut(page);
  });
});
