import fs from 'node:fs';
import path from 'node:path';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { makeTestApp, type TestApp } from '../helpers/app.js';
import { ORIGIN, sessionCookie, signedIn } from '../helpers/session.js';

let t: TestApp;
beforeAll(async () => {
  t = await makeTestApp({}, { seedDemo: true });
});
afterAll(async () => {
  await t.close();
});

const LEAKS = /at \S+ \(|\.ts:\d+|node_modules|ER_[A-Z_]+|SELECT |INSERT INTO|UPDATE `|knex|mysql2|stack/i;

describe('security headers', () => {
  it('sends a Content-Security-Policy without inline scripts, and the other helmet headers', async () => {
    const res = await request(t.app).get('/api/v1/health');
    const csp = res.headers['content-security-policy'];
    expect(csp).toContain("default-src 'self'");
    expect(csp).toContain("script-src 'self'");
    expect(csp).not.toMatch(/script-src[^;]*unsafe-inline/);
    expect(csp).toContain("frame-ancestors 'none'");
    expect(csp).toContain("object-src 'none'");
    expect(res.headers['x-content-type-options']).toBe('nosniff');
    expect(res.headers['referrer-policy']).toBe('no-referrer');
    expect(res.headers['cross-origin-opener-policy']).toBe('same-origin');
    expect(res.headers['x-frame-options']).toBe('SAMEORIGIN');
    expect(res.headers['x-powered-by']).toBeUndefined();
  });
  it('the built page needs no inline script', () => {
    const html = fs.readFileSync(path.join(import.meta.dirname, '..', '..', 'dist', 'client', 'index.html'), 'utf8');
    const scripts = [...html.matchAll(/<script\b([^>]*)>([\s\S]*?)<\/script>/g)];
    expect(scripts.length).toBeGreaterThan(0);
    for (const [, attrs, body] of scripts) {
      expect(attrs).toMatch(/src=/);
      expect(body.trim()).toBe('');
    }
    expect(html).not.toMatch(/\son[a-z]+=/i);
  });
  it('marks the session cookie Secure when the app is served over HTTPS', async () => {
    const secure = await makeTestApp({ PUBLIC_ORIGIN: 'https://tidegauge.example' }, { seedDemo: true });
    try {
      const res = await request(secure.app).post('/api/v1/auth/sign-in').send({ email: 'viewer@demo.test', password: 'tidegauge-demo' }).expect(200);
      const cookie = (res.headers['set-cookie'] as unknown as string[]).find((c) => c.startsWith('tg_session='))!;
      expect(cookie).toMatch(/; Secure/i);
      expect(cookie).toMatch(/HttpOnly/i);
      expect(cookie).toMatch(/SameSite=Lax/i);
      const hsts = (await request(secure.app).get('/api/v1/health')).headers['strict-transport-security'];
      expect(hsts).toMatch(/max-age=\d+/);
    } finally {
      await secure.close();
    }
  });
});

describe('sessions', () => {
  it('expire after the idle time, and are extended when used in the second half of it', async () => {
    const res = await request(t.app).post('/api/v1/auth/sign-in').send({ email: 'viewer@demo.test', password: 'tidegauge-demo' }).expect(200);
    const id = sessionCookie(res.headers['set-cookie'])!;
    const idleMs = t.config.sessionIdleHours * 3_600_000;
    // Used with less than half its time left: extended, and a fresh cookie is sent.
    await t.db('sessions').where('id', id).update({ expires_at: new Date(Date.now() + idleMs / 4) });
    const used = await request(t.app).get('/api/v1/auth/me').set('Cookie', `tg_session=${id}`).expect(200);
    expect(sessionCookie(used.headers['set-cookie'])).toBe(id);
    const row = await t.db('sessions').where('id', id).first();
    expect(new Date(row.expires_at).getTime()).toBeGreaterThan(Date.now() + idleMs * 0.9);
    // Idle past its expiry: gone.
    await t.db('sessions').where('id', id).update({ expires_at: new Date(Date.now() - 1000) });
    await request(t.app).get('/api/v1/auth/me').set('Cookie', `tg_session=${id}`).expect(401);
  });
});

describe('error answers never show internals', () => {
  it('for bad input, missing things, conflicts, files and refusals', async () => {
    const steward = await signedIn(t, 'steward@demo.test');
    const answers = [
      await request(t.app).get('/api/v1/series'),
      await steward.get('/api/v1/series/abc'),
      await steward.get('/api/v1/series/999999/vintages/latest/observations'),
      await steward.post('/api/v1/series').send({ code: 'EST_GDP_REAL', title: 'x', frequency: 'Q', unit: 'x', seasonalAdjustment: 'sa' }),
      await steward.post('/api/v1/series').set('Content-Type', 'application/json').send('{"code":'),
      await steward.post('/api/v1/decompose').send({ frequency: 'Q', values: [1, 2], method: 'hp' }),
      await steward.post('/api/v1/studies').send({}),
      await steward.put('/api/v1/series/1/vintages/1').send({}),
      await steward.post('/api/v1/series/1/vintages').attach('file', Buffer.from('nonsense'), 'x.csv'),
      await request(t.app).post('/api/v1/auth/sign-in').send({ email: 'x@y.z', password: 'p'.repeat(300) }),
      await request(t.app).get('/api/v1/no/such/route'),
    ];
    for (const r of answers) {
      expect(r.status).toBeGreaterThanOrEqual(400);
      expect(r.headers['content-type']).toMatch(/json/);
      expect(r.body.error.code).toBeTruthy();
      expect(JSON.stringify(r.body), JSON.stringify(r.body)).not.toMatch(LEAKS);
    }
  });
  it('for an unexpected failure inside the server: a 500 with a plain message', async () => {
    const broken = await makeTestApp({}, { seedDemo: true });
    try {
      const agent = await signedIn(broken, 'steward@demo.test');
      await broken.db.schema.dropTable('loads').catch(async () => {
        await broken.db.raw('SET FOREIGN_KEY_CHECKS = 0');
        await broken.db.schema.dropTable('loads');
      });
      const res = await agent.get('/api/v1/loads').expect(500);
      expect(res.body.error.code).toBe('internal_error');
      expect(JSON.stringify(res.body)).not.toMatch(LEAKS);
      expect(JSON.stringify(res.body)).not.toMatch(/loads/);
    } finally {
      await broken.close();
    }
  });
});

describe('cookie-borne writes from elsewhere', () => {
  it('are refused even for sign-out, while our own origin passes', async () => {
    const res = await request(t.app).post('/api/v1/auth/sign-in').send({ email: 'viewer@demo.test', password: 'tidegauge-demo' }).expect(200);
    const cookie = `tg_session=${sessionCookie(res.headers['set-cookie'])}`;
    await request(t.app).post('/api/v1/auth/sign-out').set('Cookie', cookie).set('Origin', 'http://attacker.example').expect(403);
    await request(t.app).get('/api/v1/auth/me').set('Cookie', cookie).expect(200);
    await request(t.app).post('/api/v1/auth/sign-out').set('Cookie', cookie).set('Referer', `${ORIGIN}/profile`).expect(200);
  });
});
