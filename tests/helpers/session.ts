import request from 'supertest';
import type { TestApp } from './app.js';
import { hashPassword } from '../../server/auth/password.js';
import { DEMO_PASSWORD } from '../../seeds/demo.js';

export const ORIGIN = 'http://127.0.0.1:3000';

/** A supertest agent that keeps cookies and sends our Origin, as a browser would. */
export function browserAgent(t: Pick<TestApp, 'app'> & { config?: TestApp['config'] }) {
  return request.agent(t.app).set('Origin', t.config?.publicOrigin ?? ORIGIN);
}

export async function signedIn(t: Pick<TestApp, 'app'> & { config?: TestApp['config'] }, email: string, password = DEMO_PASSWORD) {
  const agent = browserAgent(t);
  const res = await agent.post('/api/v1/auth/sign-in').send({ email, password });
  if (res.status !== 200) throw new Error(`sign-in as ${email} failed: ${res.status} ${JSON.stringify(res.body)}`);
  return agent;
}

export function sessionCookie(setCookie: string[] | string | undefined): string | null {
  const list = Array.isArray(setCookie) ? setCookie : setCookie ? [setCookie] : [];
  const c = list.find((x) => x.startsWith('tg_session='));
  return c ? c.split(';')[0].slice('tg_session='.length) : null;
}

/** Extracts the first http(s) link of a mail's text. */
export function firstLink(text: string): string {
  const m = /(https?:\/\/\S+)/.exec(text);
  if (!m) throw new Error(`no link in the message: ${text}`);
  return m[1];
}

/** A person added straight to the database with `roles`, signed in (password "a-test-password"). */
export async function addPerson(t: Pick<TestApp, 'app' | 'db' | 'config'>, email: string, name: string, roles: string[]) {
  const [id] = await t.db('users').insert({ email, name, password_hash: await hashPassword('a-test-password') });
  await t.db('user_roles').insert(roles.map((role) => ({ user_id: id, role })));
  return signedIn(t, email, 'a-test-password');
}
