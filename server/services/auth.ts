/**
 * Signing in: with e-mail and password (rate-limited per account and address, per address, and
 * with an account-wide ceiling), with a password-reset link, and changing one's password. Sessions are lucia's (server/auth/lucia.ts); the request's identity is
 * read by server/auth/middleware.ts.
 */
import { hashPassword, verifyPassword } from '../auth/password.js';
import { gone, HttpError } from '../lib/errors.js';
import { randomToken, sha256 } from '../lib/secrets.js';
import { composeMail } from '../mail/mailer.js';
import type { Knex } from 'knex';
import type { ChangePasswordBody } from '../schemas/auth.js';
import type { PublicUser } from '../schemas/people.js';
import { audit } from './audit.js';
import { loadUser, publicUser, type PeopleDeps } from './people/users.js';
import { transaction } from '../lib/retry.js';

const RESET_MINUTES = 60;

/**
 * Brute-force protection without letting anyone lock a colleague out (README, "Guarantees"):
 * - one account from one address: after `maxPerAccount` failures in the window, that pair waits;
 *   the owner signing in from another address is not affected;
 * - one address, whatever the accounts: after `maxPerAddress` failures it waits;
 * - one account from all addresses: after `accountCeiling` failures (a spread-out attack), only
 *   addresses this account has signed in from before (in the last 30 days) may still try.
 * Waiting answers 429 with Retry-After: the time until the oldest counted failure leaves the window.
 */
export async function signInThrottle(deps: Pick<PeopleDeps, 'db' | 'config'>, email: string, ip: string): Promise<void> {
  const { db, config } = deps;
  const windowMs = config.signIn.windowMinutes * 60_000;
  const windowStart = new Date(Date.now() - windowMs);
  /** When the `max`-th newest failure matching `where` leaves the window (0: fewer than `max` failures in it). */
  const until = async (where: Record<string, string>, max: number) => {
    const rows = await db('sign_in_attempts').where(where).andWhere('success', false).andWhere('at', '>', windowStart).orderBy('at', 'desc').limit(max).select('at');
    return rows.length >= max ? new Date(rows[max - 1].at).getTime() + windowMs : 0;
  };
  const [pairUntil, addressUntil, ceiling] = await Promise.all([until({ email, ip }, config.signIn.maxPerAccount), until({ ip }, config.signIn.maxPerAddress), until({ email }, config.signIn.accountCeiling)]);
  const now = Date.now();
  let limit: 'account_and_address' | 'address' | 'account_ceiling' | null = null;
  let wait = 0;
  for (const [name, at] of [['account_and_address', pairUntil], ['address', addressUntil]] as const) {
    if (at > now && at > wait) [limit, wait] = [name, at];
  }
  if (!limit && ceiling > now) {
    const known = await db('sign_in_attempts').where({ email, ip, success: true }).andWhere('at', '>', new Date(now - 30 * 86_400_000)).first('id');
    if (!known) [limit, wait] = ['account_ceiling', ceiling];
  }
  if (!limit) return;
  const retry = Math.max(1, Math.ceil((wait - Date.now()) / 1000));
  await audit(db, { action: 'sign_in.throttled', targetType: 'email', targetId: email.slice(0, 64), details: { limit }, ip });
  throw new HttpError(429, 'too_many_attempts', `Too many failed sign-ins. Wait ${Math.ceil(retry / 60)} minute${retry > 60 ? 's' : ''} and try again, or reset your password.`, { retryAfterSeconds: retry }, { 'Retry-After': String(retry) });
}

export async function signIn(deps: PeopleDeps, input: { email: string; password: string; ip: string; userAgent?: string }) {
  const { db, lucia } = deps;
  await signInThrottle(deps, input.email, input.ip);
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

/**
 * A password-reset request, the part done before answering: the same work whatever the address
 * (no account lookup, no mail), so neither the answer nor its timing says who has an account.
 * More than `maxPerAddress` requests an hour from one address answer 429.
 */
export async function acceptResetRequest(deps: Pick<PeopleDeps, 'db' | 'config'>, email: string, ip: string): Promise<void> {
  const { db, config } = deps;
  const windowMs = config.passwordReset.windowMinutes * 60_000;
  const recent = await db('password_reset_requests').where('ip', ip).andWhere('at', '>', new Date(Date.now() - windowMs)).orderBy('at', 'asc').limit(config.passwordReset.maxPerAddress).select('at');
  if (recent.length >= config.passwordReset.maxPerAddress) {
    const retry = Math.max(1, Math.ceil((new Date(recent[0].at).getTime() + windowMs - Date.now()) / 1000));
    throw new HttpError(429, 'too_many_requests', `Too many reset requests from this address. Try again in ${Math.ceil(retry / 60)} minutes.`, { retryAfterSeconds: retry }, { 'Retry-After': String(retry) });
  }
  await db('password_reset_requests').insert({ email, ip });
}

/**
 * The rest of a reset request, after the answer: at most `maxPerEmail` links an hour for one
 * address (further requests send nothing), and a link only to an active account.
 */
export async function sendResetLink(deps: PeopleDeps, email: string, ip: string) {
  const { db, config } = deps;
  const since = new Date(Date.now() - config.passwordReset.windowMinutes * 60_000);
  // Requests older than a day count for nothing any more.
  await db('password_reset_requests').where('at', '<', new Date(Date.now() - 86_400_000)).delete();
  const [{ n }] = await db('password_reset_requests').where('email', email).andWhere('at', '>', since).count({ n: '*' });
  const user = await db('users').where('email', email).andWhere('status', 'active').first();
  if (Number(n) > config.passwordReset.maxPerEmail) {
    await audit(db, { actorId: user?.id ?? null, action: 'password_reset.throttled', targetType: 'email', targetId: email.slice(0, 64), ip });
    return;
  }
  await audit(db, { actorId: user?.id ?? null, action: 'password_reset.request', targetType: 'email', targetId: email.slice(0, 64), ip });
  if (!user) return;
  const token = randomToken(32);
  await db('password_resets').insert({ user_id: user.id, token_hash: sha256(token), expires_at: new Date(Date.now() + RESET_MINUTES * 60_000) });
  const { text, html } = composeMail({
    greeting: `Hello ${user.name},`,
    paragraphs: [
      `Someone (we hope you) asked to reset your Tidegauge password. The link works once, expires in ${RESET_MINUTES} minutes, and stops working if your password changes before then.`,
      'If you did not ask for this, ignore this message: your password stays as it is.',
    ],
    action: { label: 'Choose a new password', url: `${config.publicOrigin}/reset-password/${token}` },
  });
  await deps.mailer.send({ to: user.email, subject: 'Reset your Tidegauge password', text, html });
}

/**
 * What every password change does in its transaction: the person's outstanding reset links stop
 * working, and — unless they chose to keep them — their API tokens are revoked. Sessions are ended
 * by the caller after the commit. Returns how many tokens were revoked.
 */
export async function afterPasswordChange(trx: Knex.Transaction, userId: number, revokeTokens: boolean): Promise<number> {
  const now = new Date();
  await trx('password_resets').where('user_id', userId).whereNull('used_at').whereNull('revoked_at').update({ revoked_at: now });
  if (!revokeTokens) return 0;
  return trx('api_tokens').where('user_id', userId).whereNull('revoked_at').update({ revoked_at: now });
}

export async function completePasswordReset(deps: PeopleDeps, input: { token: string; password: string; revokeTokens?: boolean }, ip: string, userAgent?: string) {
  const { db, lucia } = deps;
  const passwordHash = await hashPassword(input.password);
  const { userId, revokedTokens } = await transaction(db, async (trx) => {
    const row = await trx('password_resets').where('token_hash', sha256(input.token)).forUpdate().first();
    if (!row) throw gone('link_invalid', 'This reset link is not valid. Ask for a new one from the sign-in page.');
    if (row.used_at) throw gone('link_used', 'This reset link has already been used. Ask for a new one from the sign-in page.');
    if (row.revoked_at) throw gone('link_revoked', 'This reset link no longer works: the password was changed since it was sent, or the account was deactivated. Ask for a new one from the sign-in page.');
    if (new Date(row.expires_at).getTime() < Date.now()) throw gone('link_expired', 'This reset link has expired. Ask for a new one from the sign-in page.');
    const user = await trx('users').where('id', row.user_id).first();
    if (!user || user.status !== 'active') throw gone('link_invalid', 'This account is not active.');
    await trx('password_resets').where('id', row.id).update({ used_at: new Date() });
    await trx('users').where('id', row.user_id).update({ password_hash: passwordHash, updated_at: new Date() });
    const revoked = await afterPasswordChange(trx, row.user_id, input.revokeTokens ?? true);
    await audit(trx, { actorId: row.user_id, action: 'password_reset.complete', targetType: 'user', targetId: row.user_id, details: { revokedTokens: revoked }, ip });
    return { userId: row.user_id as number, revokedTokens: revoked };
  });
  // Every other session ends: whoever had the old password is out.
  await lucia.invalidateUserSessions(userId);
  const session = await startSession(deps, userId, ip, userAgent);
  return { user: publicUser((await loadUser(db, userId))!), session, revokedTokens };
}

/**
 * A signed-in person changes their password, proving the current one (failures count as failed
 * sign-ins from this address). Every session ends, a new one starts for the browser that asked,
 * outstanding reset links stop working, and the API tokens are revoked unless they chose to keep them.
 */
export async function changePassword(deps: PeopleDeps, me: PublicUser, body: ChangePasswordBody, ip: string, userAgent: string | undefined, viaCookie: boolean) {
  const { db, lucia } = deps;
  await signInThrottle(deps, me.email, ip);
  const row = await db('users').where('id', me.id).first();
  if (!(await verifyPassword(row?.password_hash ?? null, body.currentPassword))) {
    await db('sign_in_attempts').insert({ email: me.email, ip, success: false });
    await audit(db, { actorId: me.id, action: 'password_change.failure', targetType: 'user', targetId: me.id, ip });
    throw new HttpError(400, 'wrong_password', 'Your current password is not right.', [{ path: 'currentPassword', message: 'Your current password is not right.' }]);
  }
  const passwordHash = await hashPassword(body.newPassword);
  const revokedTokens = await transaction(db, async (trx) => {
    await trx('users').where('id', me.id).update({ password_hash: passwordHash, updated_at: new Date() });
    const revoked = await afterPasswordChange(trx, me.id, body.revokeTokens ?? true);
    await audit(trx, { actorId: me.id, action: 'password.change', targetType: 'user', targetId: me.id, details: { revokedTokens: revoked }, ip });
    return revoked;
  });
  await lucia.invalidateUserSessions(me.id);
  const session = viaCookie ? await startSession(deps, me.id, ip, userAgent) : null;
  return { user: publicUser((await loadUser(db, me.id))!), session, revokedTokens };
}
