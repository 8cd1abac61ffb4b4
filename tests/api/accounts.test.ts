/**
 * Account flows under attack (issue 17): password reset that tells nobody who has an account and
 * cannot be used to flood a mailbox, links that die when they should, password changes that end
 * other sessions and (by default) API tokens, sign-in limits that nobody can turn into a lock-out
 * of a colleague, and the Origin check against the configured origins.
 */
import net from 'node:net';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { makeTestApp, type TestApp } from '../helpers/app.js';
import { browserAgent, firstLink, sessionCookie, signedIn } from '../helpers/session.js';

const RESET = '/api/v1/auth/password-reset';
const COMPLETE = '/api/v1/auth/password-reset/complete';

let t: TestApp;
beforeAll(async () => {
  t = await makeTestApp({ TRUST_PROXY: '1' }, { seedDemo: true });
});
afterAll(async () => {
  await t.close();
});

/** A request from a given client address (the app trusts X-Forwarded-For here, as behind a proxy). */
const from = (ip: string) => ({
  post: (path: string) => request(t.app).post(path).set('X-Forwarded-For', ip),
});

async function resetLink(email: string, ip = '10.0.0.1') {
  const before = new Set(t.mail.messages().map((m) => m.id));
  await from(ip).post(RESET).send({ email }).expect(202);
  const mail = await t.mail.waitFor((m) => m.to.includes(email) && /reset/i.test(m.subject) && !before.has(m.id));
  return firstLink(mail.text).split('/reset-password/')[1];
}

const tokenFor = async (email: string, password = 'tidegauge-demo') => {
  const agent = browserAgent(t);
  await agent.post('/api/v1/auth/sign-in').send({ email, password }).expect(200);
  return (await agent.post('/api/v1/tokens').send({ name: 'script' }).expect(201)).body.token as string;
};

describe('password reset requests', () => {
  it('answer at once and alike whether or not the address has an account; the mail is sent after the answer', async () => {
    // An SMTP server that accepts the connection and then never says a word: mail to it hangs.
    const held: net.Socket[] = [];
    const stalled = net.createServer((s) => void held.push(s));
    await new Promise<void>((r) => stalled.listen(0, '127.0.0.1', () => r()));
    const port = (stalled.address() as net.AddressInfo).port;
    const app = await makeTestApp({ MAIL_MODE: 'smtp', SMTP_URL: `smtp://127.0.0.1:${port}` }, { seedDemo: true });
    try {
      const started = Date.now();
      const known = await request(app.app).post(RESET).send({ email: 'viewer@demo.test' });
      const elapsed = Date.now() - started;
      const unknown = await request(app.app).post(RESET).send({ email: 'nobody-here@demo.test' });
      expect(known.status).toBe(202);
      expect(unknown.status).toBe(202);
      expect(known.body).toEqual(unknown.body);
      const names = (r: request.Response) => Object.keys(r.headers).filter((h) => h !== 'date').sort();
      expect(names(known)).toEqual(names(unknown));
      expect(known.headers['content-length']).toBe(unknown.headers['content-length']);
      // The mail to the known address is still hanging on the silent SMTP server, yet the answer
      // came: the lookup and the mail are not on the request path. (Waiting for the mail would
      // take the mailer's greeting timeout, 30 s.)
      expect(elapsed).toBeLessThan(10_000);
      for (let i = 0; i < 100 && held.length === 0; i++) await new Promise((r) => setTimeout(r, 50));
      expect(held).toHaveLength(1); // one mail attempt: for the known address only
      const idle = await Promise.race([app.app.locals.background.idle().then(() => 'idle'), new Promise((r) => setTimeout(() => r('busy'), 300))]);
      expect(idle).toBe('busy');
    } finally {
      for (const s of held) s.destroy();
      stalled.close();
      await app.close();
    }
  }, 60_000);

  it('are limited per address (429 with Retry-After) and per e-mail (no more mail), telling nothing either way', async () => {
    const own = await makeTestApp({ TRUST_PROXY: '1', RESET_MAX_PER_ADDRESS: '3', RESET_MAX_PER_EMAIL: '2' }, { seedDemo: true });
    try {
      const post = (ip: string, email: string) => request(own.app).post(RESET).set('X-Forwarded-For', ip).send({ email });
      for (const email of ['a@x.test', 'b@x.test', 'c@x.test']) await post('10.1.1.1', email).expect(202);
      const limited = await post('10.1.1.1', 'editor@demo.test').expect(429);
      expect(limited.body.error.code).toBe('too_many_requests');
      expect(Number(limited.headers['retry-after'])).toBeGreaterThan(0);
      // Per e-mail: from four addresses, four requests for one account; two mails, the same answers.
      const answers = [];
      for (const ip of ['10.2.0.1', '10.2.0.2', '10.2.0.3', '10.2.0.4']) answers.push((await post(ip, 'steward@demo.test').expect(202)).body);
      expect(new Set(answers.map((a) => JSON.stringify(a))).size).toBe(1);
      await own.app.locals.background.idle();
      expect(own.mail.messages().filter((m) => m.to.includes('steward@demo.test'))).toHaveLength(2);
      const throttled = await own.db('audit_log').where('action', 'password_reset.throttled');
      expect(throttled).toHaveLength(2);
    } finally {
      await own.close();
    }
  });
});

describe('reset links', () => {
  it('stop working once a newer link is used', async () => {
    const older = await resetLink('editor@demo.test');
    const newer = await resetLink('editor@demo.test');
    await browserAgent(t).post(COMPLETE).send({ token: newer, password: 'editor-new-password-1' }).expect(200);
    const res = await browserAgent(t).post(COMPLETE).send({ token: older, password: 'editor-new-password-2' }).expect(410);
    expect(res.body.error.code).toBe('link_revoked');
    await request(t.app).post('/api/v1/auth/sign-in').send({ email: 'editor@demo.test', password: 'editor-new-password-1' }).expect(200);
  });

  it('stop working after a password change', async () => {
    const link = await resetLink('steward@demo.test');
    const agent = await signedIn(t, 'steward@demo.test');
    await agent.post('/api/v1/auth/password').send({ currentPassword: 'tidegauge-demo', newPassword: 'steward-new-password' }).expect(200);
    const res = await browserAgent(t).post(COMPLETE).send({ token: link, password: 'steward-other-password' }).expect(410);
    expect(res.body.error.code).toBe('link_revoked');
  });

  it('stop working on deactivation, and stay dead after reactivation', async () => {
    const admin = await signedIn(t, 'admin@demo.test');
    const invited = await admin.post('/api/v1/invitations').send({ email: 'leaver@demo.test', roles: ['viewer'] }).expect(201);
    expect(invited.body.mailed).toBe(true);
    const invite = firstLink((await t.mail.waitFor((m) => m.to.includes('leaver@demo.test'))).text).split('/invite/')[1];
    const joined = await browserAgent(t).post('/api/v1/invitations/accept').send({ token: invite, name: 'Leaver', password: 'leaver-password-1' }).expect(201);
    const link = await resetLink('leaver@demo.test');
    await admin.patch(`/api/v1/users/${joined.body.user.id}`).send({ status: 'deactivated' }).expect(200);
    await admin.patch(`/api/v1/users/${joined.body.user.id}`).send({ status: 'active' }).expect(200);
    const res = await browserAgent(t).post(COMPLETE).send({ token: link, password: 'leaver-password-2' }).expect(410);
    expect(res.body.error.code).toBe('link_revoked');
  });
});

describe('a reset and a password change', () => {
  it('a reset ends every other session and revokes API tokens unless asked to keep them', async () => {
    const other = await signedIn(t, 'viewer@demo.test');
    const token = await tokenFor('viewer@demo.test');
    const done = await browserAgent(t).post(COMPLETE).send({ token: await resetLink('viewer@demo.test'), password: 'viewer-new-password-1' }).expect(200);
    expect(done.body.revokedTokens).toBeGreaterThanOrEqual(1);
    await other.get('/api/v1/auth/me').expect(401);
    await request(t.app).get('/api/v1/auth/me').set('Authorization', `Bearer ${token}`).expect(401);
    // Keeping the tokens is a choice.
    const kept = await tokenFor('viewer@demo.test', 'viewer-new-password-1');
    const again = await browserAgent(t).post(COMPLETE).send({ token: await resetLink('viewer@demo.test'), password: 'viewer-new-password-2', revokeTokens: false }).expect(200);
    expect(again.body.revokedTokens).toBe(0);
    await request(t.app).get('/api/v1/auth/me').set('Authorization', `Bearer ${kept}`).expect(200);
  });

  it('a password change needs the current password, ends the other sessions, keeps this one on a new id, and revokes tokens by default', async () => {
    const me = await signedIn(t, 'economist@demo.test');
    const elsewhere = await signedIn(t, 'economist@demo.test');
    const token = await tokenFor('economist@demo.test');
    const wrong = await me.post('/api/v1/auth/password').send({ currentPassword: 'not-it', newPassword: 'economist-new-password' }).expect(400);
    expect(wrong.body.error.code).toBe('wrong_password');
    await request(t.app).post('/api/v1/auth/sign-in').send({ email: 'economist@demo.test', password: 'economist-new-password' }).expect(401);
    const before = sessionCookie((await me.get('/api/v1/auth/me')).headers['set-cookie']);
    const res = await me.post('/api/v1/auth/password').send({ currentPassword: 'tidegauge-demo', newPassword: 'economist-new-password' }).expect(200);
    expect(res.body.revokedTokens).toBeGreaterThanOrEqual(1);
    const fresh = sessionCookie(res.headers['set-cookie']);
    expect(fresh).toBeTruthy();
    expect(fresh).not.toBe(before);
    await me.get('/api/v1/auth/me').expect(200);
    await elsewhere.get('/api/v1/auth/me').expect(401);
    await request(t.app).get('/api/v1/auth/me').set('Authorization', `Bearer ${token}`).expect(401);
    const audit = await t.db('audit_log').where({ action: 'password.change', target_id: String(res.body.user.id) }).first();
    expect(JSON.parse(audit.details).revokedTokens).toBeGreaterThanOrEqual(1);
  });
});

describe('failed sign-ins', () => {
  const signIn = (ip: string, email: string, password: string) => request(t.app).post('/api/v1/auth/sign-in').set('X-Forwarded-For', ip).send({ email, password });

  it('wait per account and address: an attacker cannot lock the owner out', async () => {
    const email = 'admin@demo.test';
    for (let i = 0; i < t.config.signIn.maxPerAccount; i++) await signIn('203.0.113.9', email, `guess-${i}`).expect(401);
    const attacker = await signIn('203.0.113.9', email, 'tidegauge-demo').expect(429);
    expect(attacker.body.error.code).toBe('too_many_attempts');
    expect(Number(attacker.headers['retry-after'])).toBeGreaterThan(0);
    // The owner, from their own address, with the right password: in.
    await signIn('198.51.100.7', email, 'tidegauge-demo').expect(200);
  });

  it('beyond an account-wide ceiling, only addresses the account has signed in from may still try', async () => {
    const own = await makeTestApp({ TRUST_PROXY: '1', SIGN_IN_MAX_FAILURES_PER_ACCOUNT: '2', SIGN_IN_ACCOUNT_CEILING: '6' }, { seedDemo: true });
    try {
      const post = (ip: string, password: string) => request(own.app).post('/api/v1/auth/sign-in').set('X-Forwarded-For', ip).send({ email: 'editor@demo.test', password });
      await post('192.0.2.50', 'tidegauge-demo').expect(200); // the editor's usual address
      for (let k = 1; k <= 3; k++) for (let i = 0; i < 2; i++) await post(`198.18.0.${k}`, `guess-${k}-${i}`).expect(401);
      const fresh = await post('198.18.0.99', 'tidegauge-demo').expect(429);
      expect(fresh.body.error.code).toBe('too_many_attempts');
      await post('192.0.2.50', 'tidegauge-demo').expect(200);
      const throttled = await own.db('audit_log').where('action', 'sign_in.throttled').select('details');
      expect(throttled.map((r) => JSON.parse(r.details).limit)).toContain('account_ceiling');
    } finally {
      await own.close();
    }
  });
});

describe('the Origin check', () => {
  it('compares with the configured origins, never with the Host header the sender chose', async () => {
    const res = await request(t.app).post('/api/v1/auth/sign-in').send({ email: 'admin@demo.test', password: 'tidegauge-demo' }).expect(200);
    const cookie = `tg_session=${sessionCookie(res.headers['set-cookie'])}`;
    const forged = await request(t.app).post('/api/v1/tokens').set('Cookie', cookie).set('Host', 'evil.example').set('Origin', 'http://evil.example').send({ name: 'x' }).expect(403);
    expect(forged.body.error.code).toBe('origin_mismatch');
    await request(t.app).post('/api/v1/tokens').set('Cookie', cookie).set('Origin', t.config.publicOrigin).send({ name: 'ok' }).expect(201);
    // On a developer's machine, 127.0.0.1 and localhost are the same server.
    await request(t.app).post('/api/v1/tokens').set('Cookie', cookie).set('Origin', t.config.publicOrigin.replace('127.0.0.1', 'localhost')).send({ name: 'ok' }).expect(201);
  });
});
