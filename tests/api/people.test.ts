import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { makeTestApp, type TestApp } from '../helpers/app.js';
import { browserAgent, firstLink, ORIGIN, sessionCookie, signedIn } from '../helpers/session.js';

let t: TestApp;
beforeAll(async () => {
  t = await makeTestApp({}, { seedDemo: true });
});
afterAll(async () => {
  await t.close();
});

const count = async (table: string) => Number((await t.db(table).count({ n: '*' }))[0].n);
const auditActions = async () => (await t.db('audit_log').select('action')).map((r) => r.action as string);

describe('sign-in', () => {
  it('signs in a demo account and sets an HttpOnly, SameSite=Lax session cookie', async () => {
    const res = await request(t.app).post('/api/v1/auth/sign-in').send({ email: 'Admin@Demo.test', password: 'tidegauge-demo' }).expect(200);
    expect(res.body.user).toMatchObject({ email: 'admin@demo.test', roles: ['admin'] });
    const cookie = (res.headers['set-cookie'] as unknown as string[]).find((c) => c.startsWith('tg_session='))!;
    expect(cookie).toMatch(/HttpOnly/i);
    expect(cookie).toMatch(/SameSite=Lax/i);
    expect(cookie).not.toMatch(/Secure/); // served over plain http here; Secure when PUBLIC_ORIGIN is https
    const me = await request(t.app).get('/api/v1/auth/me').set('Cookie', `tg_session=${sessionCookie(res.headers['set-cookie'])}`).expect(200);
    expect(me.body.user.email).toBe('admin@demo.test');
  });

  it('gives the same answer for an unknown e-mail and a wrong password', async () => {
    const a = await request(t.app).post('/api/v1/auth/sign-in').send({ email: 'nobody@demo.test', password: 'whatever-it-is' }).expect(401);
    const b = await request(t.app).post('/api/v1/auth/sign-in').send({ email: 'viewer@demo.test', password: 'wrong-password' }).expect(401);
    expect(a.body).toEqual(b.body);
    expect(a.body.error.code).toBe('invalid_credentials');
  });

  it('stores the password as an argon2id hash', async () => {
    const row = await t.db('users').where('email', 'steward@demo.test').first();
    expect(row.password_hash).toMatch(/^\$argon2id\$v=19\$m=19456,t=2,p=1\$/);
  });

  it('limits failed sign-ins per account with 429 and a retry time', async () => {
    const email = 'editor@demo.test';
    for (let i = 0; i < t.config.signIn.maxPerAccount; i++) {
      await request(t.app).post('/api/v1/auth/sign-in').send({ email, password: `bad-${i}` }).expect(401);
    }
    const res = await request(t.app).post('/api/v1/auth/sign-in').send({ email, password: 'tidegauge-demo' }).expect(429);
    expect(res.body.error.code).toBe('too_many_attempts');
    expect(Number(res.headers['retry-after'])).toBeGreaterThan(0);
    expect(res.body.error.details.retryAfterSeconds).toBeGreaterThan(0);
    // Other accounts are not locked by it.
    await request(t.app).post('/api/v1/auth/sign-in').send({ email: 'viewer@demo.test', password: 'tidegauge-demo' }).expect(200);
  });

  it('issues a new session id at every sign-in and ends the old one (no fixation)', async () => {
    const first = await request(t.app).post('/api/v1/auth/sign-in').send({ email: 'economist@demo.test', password: 'tidegauge-demo' }).expect(200);
    const id1 = sessionCookie(first.headers['set-cookie'])!;
    const second = await request(t.app).post('/api/v1/auth/sign-in').set('Cookie', `tg_session=${id1}`).set('Origin', ORIGIN).send({ email: 'economist@demo.test', password: 'tidegauge-demo' }).expect(200);
    const id2 = sessionCookie(second.headers['set-cookie'])!;
    expect(id2).not.toBe(id1);
    await request(t.app).get('/api/v1/auth/me').set('Cookie', `tg_session=${id1}`).expect(401);
    await request(t.app).get('/api/v1/auth/me').set('Cookie', `tg_session=${id2}`).expect(200);
  });

  it('ends the session on the server at sign-out', async () => {
    const res = await request(t.app).post('/api/v1/auth/sign-in').send({ email: 'viewer@demo.test', password: 'tidegauge-demo' }).expect(200);
    const id = sessionCookie(res.headers['set-cookie'])!;
    await request(t.app).post('/api/v1/auth/sign-out').set('Cookie', `tg_session=${id}`).set('Origin', ORIGIN).expect(200);
    expect(await t.db('sessions').where('id', id).first()).toBeUndefined();
    await request(t.app).get('/api/v1/auth/me').set('Cookie', `tg_session=${id}`).expect(401);
  });
});

describe('origin check on cookie-borne writes', () => {
  it('refuses a write with a session cookie and no Origin, or a foreign Origin; accepts our own', async () => {
    const res = await request(t.app).post('/api/v1/auth/sign-in').send({ email: 'admin@demo.test', password: 'tidegauge-demo' });
    const cookie = `tg_session=${sessionCookie(res.headers['set-cookie'])}`;
    const none = await request(t.app).post('/api/v1/tokens').set('Cookie', cookie).send({ name: 'x' }).expect(403);
    expect(none.body.error.code).toBe('origin_required');
    const evil = await request(t.app).post('/api/v1/tokens').set('Cookie', cookie).set('Origin', 'https://evil.example').send({ name: 'x' }).expect(403);
    expect(evil.body.error.code).toBe('origin_mismatch');
    await request(t.app).post('/api/v1/tokens').set('Cookie', cookie).set('Origin', ORIGIN).send({ name: 'ok' }).expect(201);
  });
});

describe('API tokens', () => {
  it('shows a token once, acts with its owner’s roles, records use, and stops at once when revoked', async () => {
    const agent = await signedIn(t, 'steward@demo.test');
    const created = await agent.post('/api/v1/tokens').send({ name: 'nightly load' }).expect(201);
    expect(created.body.token).toMatch(/^tg_/);
    const stored = await t.db('api_tokens').where('id', created.body.id).first();
    expect(stored.token_hash).not.toContain(created.body.token);
    expect(stored.token_hash).toHaveLength(64);
    const me = await request(t.app).get('/api/v1/auth/me').set('Authorization', `Bearer ${created.body.token}`).expect(200);
    expect(me.body.user.roles).toEqual(['steward']);
    expect(me.body.via).toBe('token');
    // Writes with a token need no Origin: a token is not a cookie.
    await request(t.app).post('/api/v1/tokens').set('Authorization', `Bearer ${created.body.token}`).send({ name: 'child' }).expect(201);
    const list = await agent.get('/api/v1/tokens').expect(200);
    const item = list.body.items.find((x: { id: number }) => x.id === created.body.id);
    expect(item.lastUsedAt).not.toBeNull();
    expect(JSON.stringify(list.body)).not.toContain(created.body.token);
    await agent.delete(`/api/v1/tokens/${created.body.id}`).expect(204);
    const after = await request(t.app).get('/api/v1/auth/me').set('Authorization', `Bearer ${created.body.token}`).expect(401);
    expect(after.body.error.code).toBe('invalid_token');
  });
});

describe('invitations', () => {
  it('sends the invitation over SMTP; the link signs the new person in once and never again', async () => {
    const admin = await signedIn(t, 'admin@demo.test');
    const users = await count('users');
    const res = await admin.post('/api/v1/invitations').send({ email: 'new.analyst@demo.test', roles: ['economist', 'viewer'] }).expect(201);
    expect(res.body.mailed).toBe(true);
    const mail = await t.mail.waitFor((m) => m.to.includes('new.analyst@demo.test'));
    expect(mail.subject).toMatch(/invitation/i);
    const link = firstLink(mail.text);
    const token = link.split('/invite/')[1];
    const lookup = await request(t.app).get(`/api/v1/invitations/lookup/${token}`).expect(200);
    expect(lookup.body.roles).toEqual(['economist', 'viewer']);
    const accepted = await browserAgent(t).post('/api/v1/invitations/accept').send({ token, name: 'New Analyst', password: 'a-long-new-password' }).expect(201);
    expect(accepted.body.user.roles).toEqual(['economist', 'viewer']);
    const cookie = sessionCookie(accepted.headers['set-cookie']);
    await request(t.app).get('/api/v1/auth/me').set('Cookie', `tg_session=${cookie}`).expect(200);
    expect(await count('users')).toBe(users + 1);
    const again = await browserAgent(t).post('/api/v1/invitations/accept').send({ token, name: 'Someone Else', password: 'another-password-1' }).expect(410);
    expect(again.body.error.code).toBe('link_used');
    expect(await count('users')).toBe(users + 1);
  });

  it('refuses an expired invitation link with 410 and creates nobody', async () => {
    const admin = await signedIn(t, 'admin@demo.test');
    await admin.post('/api/v1/invitations').send({ email: 'late@demo.test', roles: ['viewer'] }).expect(201);
    const mail = await t.mail.waitFor((m) => m.to.includes('late@demo.test'));
    const token = firstLink(mail.text).split('/invite/')[1];
    await t.db('invitations').where('email', 'late@demo.test').update({ expires_at: new Date(Date.now() - 1000) });
    const users = await count('users');
    const res = await browserAgent(t).post('/api/v1/invitations/accept').send({ token, name: 'Late', password: 'a-long-new-password' }).expect(410);
    expect(res.body.error.code).toBe('link_expired');
    expect(await count('users')).toBe(users);
  });

  it('resends with a fresh link that replaces the old one', async () => {
    const admin = await signedIn(t, 'admin@demo.test');
    const inv = await admin.post('/api/v1/invitations').send({ email: 'twice@demo.test', roles: ['viewer'] }).expect(201);
    const first = firstLink((await t.mail.waitFor((m) => m.to.includes('twice@demo.test'))).text);
    t.mail.clear();
    await admin.post(`/api/v1/invitations/${inv.body.id}/resend`).expect(200);
    const second = firstLink((await t.mail.waitFor((m) => m.to.includes('twice@demo.test'))).text);
    expect(second).not.toBe(first);
    await request(t.app).get(`/api/v1/invitations/lookup/${first.split('/invite/')[1]}`).expect(410);
    await request(t.app).get(`/api/v1/invitations/lookup/${second.split('/invite/')[1]}`).expect(200);
  });
});

describe('password reset', () => {
  it('mails a link that works once, ends other sessions, and not after expiry', async () => {
    const old = await signedIn(t, 'viewer@demo.test');
    await request(t.app).post('/api/v1/auth/password-reset').send({ email: 'viewer@demo.test' }).expect(202);
    // Unknown addresses get the same answer and no mail.
    await request(t.app).post('/api/v1/auth/password-reset').send({ email: 'ghost@demo.test' }).expect(202);
    const mail = await t.mail.waitFor((m) => m.to.includes('viewer@demo.test') && /reset/i.test(m.subject));
    const token = firstLink(mail.text).split('/reset-password/')[1];
    const done = await browserAgent(t).post('/api/v1/auth/password-reset/complete').send({ token, password: 'viewer-new-password' }).expect(200);
    expect(done.body.user.email).toBe('viewer@demo.test');
    await old.get('/api/v1/auth/me').expect(401);
    const reused = await browserAgent(t).post('/api/v1/auth/password-reset/complete').send({ token, password: 'yet-another-password' }).expect(410);
    expect(reused.body.error.code).toBe('link_used');
    await request(t.app).post('/api/v1/auth/sign-in').send({ email: 'viewer@demo.test', password: 'viewer-new-password' }).expect(200);

    await request(t.app).post('/api/v1/auth/password-reset').send({ email: 'viewer@demo.test' }).expect(202);
    const mail2 = await t.mail.waitFor((m) => m.to.includes('viewer@demo.test') && m.id !== mail.id && /reset/i.test(m.subject));
    const token2 = firstLink(mail2.text).split('/reset-password/')[1];
    await t.db('password_resets').whereNull('used_at').update({ expires_at: new Date(Date.now() - 1000) });
    const expired = await browserAgent(t).post('/api/v1/auth/password-reset/complete').send({ token: token2, password: 'never-applied-password' }).expect(410);
    expect(expired.body.error.code).toBe('link_expired');
    await request(t.app).post('/api/v1/auth/sign-in').send({ email: 'viewer@demo.test', password: 'viewer-new-password' }).expect(200);
  });
});

describe('bad input changes nothing', () => {
  const cases: [string, string, object][] = [
    ['missing fields', '/api/v1/auth/sign-in', {}],
    ['a malformed e-mail', '/api/v1/auth/sign-in', { email: 'not-an-address', password: 'x' }],
    ['an over-long password', '/api/v1/auth/sign-in', { email: 'admin@demo.test', password: 'x'.repeat(300) }],
    ['an over-long new password', '/api/v1/invitations/accept', { token: 'abcdefghijkl', name: 'X', password: 'x'.repeat(300) }],
    ['a short new password', '/api/v1/auth/password-reset/complete', { token: 'abcdefghijkl', password: 'short' }],
    ['an invitation without roles', '/api/v1/invitations', { email: 'x@demo.test', roles: [] }],
  ];
  for (const [name, path, body] of cases) {
    it(`${name} → 400 in the error shape`, async () => {
      const admin = await signedIn(t, 'admin@demo.test');
      const before = [await count('users'), await count('invitations'), await count('sessions')];
      const res = await admin.post(path).send(body).expect(400);
      expect(res.body.error.code).toBe('invalid_input');
      expect(typeof res.body.error.message).toBe('string');
      expect([await count('users'), await count('invitations'), await count('sessions')]).toEqual(before);
    });
  }
  it('a made-up invitation link → 410', async () => {
    const res = await browserAgent(t).post('/api/v1/invitations/accept').send({ token: 'made-up-token-value', name: 'X', password: 'a-long-new-password' }).expect(410);
    expect(res.body.error.code).toBe('link_invalid');
  });
});

describe('People (administrators)', () => {
  it('changes roles, deactivates (ending sessions and tokens at once) and keeps the last admin', async () => {
    const admin = await signedIn(t, 'admin@demo.test');
    const admins = await t.db('user_roles').where('role', 'admin');
    expect(admins).toHaveLength(1);
    const me = (await admin.get('/api/v1/auth/me')).body.user;
    const last = await admin.patch(`/api/v1/users/${me.id}`).send({ roles: ['viewer'] }).expect(409);
    expect(last.body.error.code).toBe('last_admin');

    const target = await signedIn(t, 'economist@demo.test');
    const targetUser = (await target.get('/api/v1/auth/me')).body.user;
    const token = (await target.post('/api/v1/tokens').send({ name: 'laptop' }).expect(201)).body.token;
    await admin.patch(`/api/v1/users/${targetUser.id}`).send({ roles: ['economist', 'editor'] }).expect(200);
    expect((await target.get('/api/v1/auth/me').expect(200)).body.user.roles).toEqual(['economist', 'editor']);
    await admin.patch(`/api/v1/users/${targetUser.id}`).send({ status: 'deactivated' }).expect(200);
    await target.get('/api/v1/auth/me').expect(401);
    await request(t.app).get('/api/v1/auth/me').set('Authorization', `Bearer ${token}`).expect(401);
    await request(t.app).post('/api/v1/auth/sign-in').send({ email: 'economist@demo.test', password: 'tidegauge-demo' }).expect(401);
    await admin.patch(`/api/v1/users/${targetUser.id}`).send({ status: 'active' }).expect(200);
    await request(t.app).post('/api/v1/auth/sign-in').send({ email: 'economist@demo.test', password: 'tidegauge-demo' }).expect(200);
    const self = await admin.patch(`/api/v1/users/${me.id}`).send({ status: 'deactivated' }).expect(403);
    expect(self.body.error.code).toBe('self_deactivation');
  });

  it('writes audit rows for sign-ins, role changes, invitations, deactivations and tokens', async () => {
    const actions = new Set(await auditActions());
    for (const a of ['sign_in.success', 'sign_in.failure', 'user.roles', 'invitation.create', 'invitation.accept', 'user.deactivate', 'token.create', 'token.revoke']) {
      expect(actions.has(a), a).toBe(true);
    }
    const admin = await signedIn(t, 'admin@demo.test');
    const res = await admin.get('/api/v1/audit?action=sign_in').expect(200);
    expect(res.body.items.length).toBeGreaterThan(0);
  });

  it('lets an admin read the fake mailbox, and nobody else', async () => {
    const admin = await signedIn(t, 'admin@demo.test');
    const box = await admin.get('/api/v1/dev/mailbox').expect(200);
    expect(box.body.items.length).toBeGreaterThan(0);
    const viewer = await signedIn(t, 'steward@demo.test');
    await viewer.get('/api/v1/dev/mailbox').expect(403);
  });
});

describe('rate limit per address', () => {
  it('answers 429 once one address has failed too often, whatever the accounts', async () => {
    const own = await makeTestApp({ SIGN_IN_MAX_FAILURES_PER_ADDRESS: '4' }, { seedDemo: true });
    try {
      for (const email of ['a@x.test', 'b@x.test', 'c@x.test', 'd@x.test']) {
        await request(own.app).post('/api/v1/auth/sign-in').send({ email, password: 'whatever-1' }).expect(401);
      }
      const res = await request(own.app).post('/api/v1/auth/sign-in').send({ email: 'admin@demo.test', password: 'tidegauge-demo' }).expect(429);
      expect(res.body.error.code).toBe('too_many_attempts');
    } finally {
      await own.close();
    }
  });
});
