/**
 * Signing in: with e-mail and password (rate-limited per account and per address), and with a
 * password-reset link. Sessions are lucia's (server/auth/lucia.ts); the request's identity is
 * read by server/auth/middleware.ts.
 */
import { hashPassword, verifyPassword } from '../auth/password.js';
import { gone, HttpError } from '../lib/errors.js';
import { randomToken, sha256 } from '../lib/secrets.js';
import { composeMail } from '../mail/mailer.js';
import { audit } from './audit.js';
import { loadUser, publicUser, type PeopleDeps } from './people/users.js';
import { transaction } from '../lib/retry.js';

const RESET_MINUTES = 60;

export async function signIn(deps: PeopleDeps, input: { email: string; password: string; ip: string; userAgent?: string }) {
  const { db, config, lucia } = deps;
  const windowStart = new Date(Date.now() - config.signIn.windowMinutes * 60_000);
  const failures = async (column: 'email' | 'ip', value: string) => {
    const rows = await db('sign_in_attempts').where(column, value).andWhere('success', false).andWhere('at', '>', windowStart).orderBy('at', 'asc').select('at');
    return rows.map((r) => new Date(r.at).getTime());
  };
  const [byAccount, byAddress] = await Promise.all([failures('email', input.email), failures('ip', input.ip)]);
  const limited = (list: number[], max: number) => (list.length >= max ? list[list.length - max] + config.signIn.windowMinutes * 60_000 : null);
  const until = Math.max(limited(byAccount, config.signIn.maxPerAccount) ?? 0, limited(byAddress, config.signIn.maxPerAddress) ?? 0);
  if (until > Date.now()) {
    const retry = Math.max(1, Math.ceil((until - Date.now()) / 1000));
    await audit(db, { action: 'sign_in.throttled', targetType: 'email', targetId: input.email.slice(0, 64), ip: input.ip });
    throw new HttpError(429, 'too_many_attempts', `Too many failed sign-ins. Wait ${Math.ceil(retry / 60)} minute${retry > 60 ? 's' : ''} and try again, or reset your password.`, { retryAfterSeconds: retry }, { 'Retry-After': String(retry) });
  }
  const user = await db('users').where('email', input.email).first();
  const ok = await verifyPassword(user?.status === 'active' ? user.password_hash : null, input.password);
  await db('sign_in_attempts').insert({ email: input.email, ip: input.ip, success: ok });
  if (!ok || !user) {
    await audit(db, { actorId: user?.id ?? null, action: 'sign_in.failure', targetType: 'email', targetId: input.email.slice(0, 64), ip: input.ip });
    throw new HttpError(401, 'invalid_credentials', 'The e-mail address or the password is not right.');
  }
  const session = await lucia.createSession(user.id, { ip: input.ip, user_agent: input.userAgent ?? null });
  await db('users').where('id', user.id).update({ last_sign_in_at: new Date() });
  await audit(db, { actorId: user.id, action: 'sign_in.success', targetType: 'user', targetId: user.id, ip: input.ip });
  const full = (await loadUser(db, user.id))!;
  return { user: publicUser(full), session };
}

/** Starts a session for a person who has just proved who they are (invitation or reset link). */
export async function startSession(deps: PeopleDeps, userId: number, ip: string, userAgent?: string) {
  return deps.lucia.createSession(userId, { ip, user_agent: userAgent ?? null });
}

export async function requestPasswordReset(deps: PeopleDeps, email: string, ip?: string) {
  const { db, config } = deps;
  const user = await db('users').where('email', email).andWhere('status', 'active').first();
  await audit(db, { actorId: user?.id ?? null, action: 'password_reset.request', targetType: 'email', targetId: email.slice(0, 64), ip });
  if (!user) return; // The same answer either way: no way to learn who has an account.
  const token = randomToken(32);
  await db('password_resets').insert({ user_id: user.id, token_hash: sha256(token), expires_at: new Date(Date.now() + RESET_MINUTES * 60_000) });
  const { text, html } = composeMail({
    greeting: `Hello ${user.name},`,
    paragraphs: [`Someone (we hope you) asked to reset your Tidegauge password. The link works once and expires in ${RESET_MINUTES} minutes.`, 'If you did not ask for this, ignore this message: your password stays as it is.'],
    action: { label: 'Choose a new password', url: `${config.publicOrigin}/reset-password/${token}` },
  });
  await deps.mailer.send({ to: user.email, subject: 'Reset your Tidegauge password', text, html });
}

export async function completePasswordReset(deps: PeopleDeps, input: { token: string; password: string }, ip: string, userAgent?: string) {
  const { db, lucia } = deps;
  const passwordHash = await hashPassword(input.password);
  const userId = await transaction(db, async (trx) => {
    const row = await trx('password_resets').where('token_hash', sha256(input.token)).forUpdate().first();
    if (!row) throw gone('link_invalid', 'This reset link is not valid. Ask for a new one from the sign-in page.');
    if (row.used_at) throw gone('link_used', 'This reset link has already been used. Ask for a new one from the sign-in page.');
    if (new Date(row.expires_at).getTime() < Date.now()) throw gone('link_expired', 'This reset link has expired. Ask for a new one from the sign-in page.');
    const user = await trx('users').where('id', row.user_id).first();
    if (!user || user.status !== 'active') throw gone('link_invalid', 'This account is not active.');
    await trx('password_resets').where('id', row.id).update({ used_at: new Date() });
    await trx('users').where('id', row.user_id).update({ password_hash: passwordHash, updated_at: new Date() });
    await audit(trx, { actorId: row.user_id, action: 'password_reset.complete', targetType: 'user', targetId: row.user_id, ip });
    return row.user_id as number;
  });
  // Every other session ends: whoever had the old password is out.
  await lucia.invalidateUserSessions(userId);
  const session = await startSession(deps, userId, ip, userAgent);
  return { user: publicUser((await loadUser(db, userId))!), session };
}
