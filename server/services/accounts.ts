/**
 * People, roles, sign-in, invitations, password resets and API tokens. No HTTP here: routes call
 * these functions and turn their HttpErrors into answers.
 */
import type { Knex } from 'knex';
import type { Config } from '../config.js';
import { fastQuery, type Db } from '../db.js';
import { conflict, forbidden, gone, HttpError, notFound } from '../lib/errors.js';
import { randomToken, sha256 } from '../lib/secrets.js';
import { composeMail, type Mailer } from '../mail/mailer.js';
import { hashPassword, verifyPassword } from '../auth/password.js';
import { parseRoles, type AppLucia } from '../auth/lucia.js';
import { ROLES, type PublicUser, type Role } from '../schemas/auth.js';
import { audit } from './audit.js';

export interface AccountDeps {
  db: Db;
  config: Config;
  mailer: Mailer;
  lucia: AppLucia;
}

const INVITATION_DAYS = 7;
const RESET_MINUTES = 60;

export async function loadUser(db: Knex | Knex.Transaction, id: number): Promise<(PublicUser & { status: string }) | null> {
  const row = await db('users as u')
    .leftJoin('user_roles as r', 'r.user_id', 'u.id')
    .where('u.id', id)
    .groupBy('u.id', 'u.email', 'u.name', 'u.status')
    .first('u.id', 'u.email', 'u.name', 'u.status', db.raw('GROUP_CONCAT(r.role) AS roles'));
  if (!row) return null;
  return { id: row.id, email: row.email, name: row.name, roles: parseRoles(row.roles), status: row.status };
}

export const publicUser = (u: PublicUser): PublicUser => ({ id: u.id, email: u.email, name: u.name, roles: u.roles });

// ------------------------------------------------------------------ sign-in

export async function signIn(deps: AccountDeps, input: { email: string; password: string; ip: string; userAgent?: string }) {
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
async function startSession(deps: AccountDeps, userId: number, ip: string, userAgent?: string) {
  return deps.lucia.createSession(userId, { ip, user_agent: userAgent ?? null });
}

// ------------------------------------------------------------------ API tokens

export const TOKEN_PREFIX = 'tg_';

export async function createToken(db: Db, userId: number, name: string, ip?: string) {
  const token = TOKEN_PREFIX + randomToken(32);
  const [id] = await db('api_tokens').insert({ user_id: userId, name, token_hash: sha256(token), prefix: token.slice(0, 10) });
  await audit(db, { actorId: userId, action: 'token.create', targetType: 'api_token', targetId: id, details: { name }, ip });
  return { id, name, token, prefix: token.slice(0, 10) };
}

export async function listTokens(db: Db, userId: number) {
  const rows = await db('api_tokens').where('user_id', userId).orderBy('id', 'desc');
  return rows.map((r) => ({
    id: r.id,
    name: r.name,
    prefix: r.prefix,
    createdAt: new Date(r.created_at).toISOString(),
    lastUsedAt: r.last_used_at ? new Date(r.last_used_at).toISOString() : null,
    revokedAt: r.revoked_at ? new Date(r.revoked_at).toISOString() : null,
  }));
}

export async function revokeToken(db: Db, actor: PublicUser, tokenId: number, ip?: string) {
  const row = await db('api_tokens').where('id', tokenId).first();
  if (!row || (row.user_id !== actor.id && !actor.roles.includes('admin'))) throw notFound('The token');
  if (!row.revoked_at) await db('api_tokens').where('id', tokenId).update({ revoked_at: new Date() });
  await audit(db, { actorId: actor.id, action: 'token.revoke', targetType: 'api_token', targetId: tokenId, details: { owner: row.user_id }, ip });
}

/** The owner of an API token that is neither revoked nor owned by a deactivated person. */
export async function userForToken(db: Db, token: string): Promise<{ user: PublicUser; tokenId: number } | null> {
  if (!token.startsWith(TOKEN_PREFIX) || token.length > 100) return null;
  // One query for the token, its owner and the owner's roles: this runs on every API call.
  const rows = await fastQuery(
    db,
    `SELECT t.id, t.last_used_at, u.id AS user_id, u.email, u.name, (SELECT GROUP_CONCAT(r.role) FROM user_roles r WHERE r.user_id = u.id) AS roles
       FROM api_tokens t JOIN users u ON u.id = t.user_id
      WHERE t.token_hash = ? AND t.revoked_at IS NULL AND u.status = 'active' LIMIT 1`,
    [sha256(token)],
  );
  const row = rows[0];
  if (!row) return null;
  // Record use at most once a minute: no write on every request.
  if (!row.last_used_at || Date.now() - new Date(row.last_used_at).getTime() > 60_000) {
    await db('api_tokens').where('id', row.id).update({ last_used_at: new Date() });
  }
  return { user: { id: row.user_id, email: row.email, name: row.name, roles: parseRoles(row.roles) }, tokenId: row.id };
}

// ------------------------------------------------------------------ invitations

function inviteLink(config: Config, token: string) {
  return `${config.publicOrigin}/invite/${token}`;
}

async function mailInvitation(deps: AccountDeps, email: string, roles: Role[], token: string, inviter: string) {
  const { text, html } = composeMail({
    greeting: 'Hello,',
    paragraphs: [
      `${inviter} has invited you to Tidegauge, the workspace where the team decomposes economic series, keeps every data release and reviews published charts.`,
      `You will join with the role${roles.length > 1 ? 's' : ''} ${roles.join(', ')}. The link works once and expires in ${INVITATION_DAYS} days.`,
    ],
    action: { label: 'Accept the invitation', url: inviteLink(deps.config, token) },
  });
  return deps.mailer.send({ to: email, subject: 'Your invitation to Tidegauge', text, html });
}

export async function invite(deps: AccountDeps, actor: PublicUser, input: { email: string; roles: Role[] }, ip?: string) {
  const { db } = deps;
  const existing = await db('users').where('email', input.email).first();
  if (existing) throw conflict('already_member', `${input.email} already has an account${existing.status === 'deactivated' ? ' (deactivated: reactivate it on the People page)' : ''}.`);
  const token = randomToken(32);
  const roles = [...new Set(input.roles)].sort();
  const id = await db.transaction(async (trx) => {
    // A new invitation replaces any pending one for the same address.
    await trx('invitations').where('email', input.email).whereNull('accepted_at').whereNull('revoked_at').update({ revoked_at: new Date() });
    const [newId] = await trx('invitations').insert({
      email: input.email,
      roles: JSON.stringify(roles),
      token_hash: sha256(token),
      invited_by: actor.id,
      expires_at: new Date(Date.now() + INVITATION_DAYS * 86_400_000),
    });
    await audit(trx, { actorId: actor.id, action: 'invitation.create', targetType: 'invitation', targetId: newId, details: { email: input.email, roles }, ip });
    return newId;
  });
  const mailed = await mailInvitation(deps, input.email, roles, token, actor.name);
  return { id, email: input.email, roles, mailed };
}

export async function resendInvitation(deps: AccountDeps, actor: PublicUser, id: number, ip?: string) {
  const { db } = deps;
  const row = await db('invitations').where('id', id).first();
  if (!row) throw notFound('The invitation');
  if (row.accepted_at) throw conflict('invitation_accepted', 'This invitation was already accepted.');
  if (row.revoked_at) throw conflict('invitation_revoked', 'This invitation was withdrawn; send a new one.');
  // A fresh link each time: the old one stops working.
  const token = randomToken(32);
  await db('invitations').where('id', id).update({ token_hash: sha256(token), expires_at: new Date(Date.now() + INVITATION_DAYS * 86_400_000), send_count: row.send_count + 1 });
  await audit(db, { actorId: actor.id, action: 'invitation.resend', targetType: 'invitation', targetId: id, details: { email: row.email }, ip });
  const roles = JSON.parse(row.roles) as Role[];
  const mailed = await mailInvitation(deps, row.email, roles, token, actor.name);
  return { id, email: row.email, roles, mailed };
}

export async function revokeInvitation(db: Db, actor: PublicUser, id: number, ip?: string) {
  const n = await db('invitations').where('id', id).whereNull('accepted_at').whereNull('revoked_at').update({ revoked_at: new Date() });
  if (!n) throw notFound('A pending invitation');
  await audit(db, { actorId: actor.id, action: 'invitation.revoke', targetType: 'invitation', targetId: id, ip });
}

export async function listInvitations(db: Db) {
  const rows = await db('invitations as i').leftJoin('users as u', 'u.id', 'i.invited_by').whereNull('i.accepted_at').whereNull('i.revoked_at').orderBy('i.id', 'desc').select('i.*', 'u.name as inviter');
  return rows.map((r) => ({
    id: r.id,
    email: r.email,
    roles: JSON.parse(r.roles),
    invitedBy: r.inviter,
    createdAt: new Date(r.created_at).toISOString(),
    expiresAt: new Date(r.expires_at).toISOString(),
    expired: new Date(r.expires_at).getTime() < Date.now(),
    sendCount: r.send_count,
  }));
}

async function usableInvitation(db: Knex | Knex.Transaction, token: string, forUpdate = false) {
  const q = db('invitations').where('token_hash', sha256(token));
  if (forUpdate) q.forUpdate();
  const row = await q.first();
  if (!row || row.revoked_at) throw gone('link_invalid', 'This invitation link is not valid (it may have been replaced by a newer one). Ask an administrator for a new invitation.');
  if (row.accepted_at) throw gone('link_used', 'This invitation link has already been used. Sign in instead, or ask for a new invitation.');
  if (new Date(row.expires_at).getTime() < Date.now()) throw gone('link_expired', 'This invitation link has expired. Ask an administrator to send it again.');
  return row;
}

export async function lookupInvitation(db: Db, token: string) {
  const row = await usableInvitation(db, token);
  return { email: row.email, roles: JSON.parse(row.roles), expiresAt: new Date(row.expires_at).toISOString() };
}

export async function acceptInvitation(deps: AccountDeps, input: { token: string; name: string; password: string }, ip: string, userAgent?: string) {
  const { db } = deps;
  const passwordHash = await hashPassword(input.password);
  const userId = await db.transaction(async (trx) => {
    const inv = await usableInvitation(trx, input.token, true);
    const taken = await trx('users').where('email', inv.email).first();
    if (taken) throw conflict('already_member', `${inv.email} already has an account; sign in instead.`);
    const [id] = await trx('users').insert({ email: inv.email, name: input.name, password_hash: passwordHash });
    const roles = JSON.parse(inv.roles) as Role[];
    await trx('user_roles').insert(roles.map((role) => ({ user_id: id, role })));
    await trx('invitations').where('id', inv.id).update({ accepted_at: new Date(), accepted_user_id: id });
    await audit(trx, { actorId: id, action: 'invitation.accept', targetType: 'invitation', targetId: inv.id, details: { roles }, ip });
    return id;
  });
  const session = await startSession(deps, userId, ip, userAgent);
  return { user: publicUser((await loadUser(db, userId))!), session };
}

// ------------------------------------------------------------------ password reset

export async function requestPasswordReset(deps: AccountDeps, email: string, ip?: string) {
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

export async function completePasswordReset(deps: AccountDeps, input: { token: string; password: string }, ip: string, userAgent?: string) {
  const { db, lucia } = deps;
  const passwordHash = await hashPassword(input.password);
  const userId = await db.transaction(async (trx) => {
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

// ------------------------------------------------------------------ People (admin)

export async function listUsers(db: Db) {
  const rows = await db('users as u')
    .leftJoin('user_roles as r', 'r.user_id', 'u.id')
    .groupBy('u.id', 'u.email', 'u.name', 'u.status', 'u.last_sign_in_at', 'u.created_at')
    .orderBy('u.name')
    .select('u.id', 'u.email', 'u.name', 'u.status', 'u.last_sign_in_at', 'u.created_at', db.raw('GROUP_CONCAT(r.role) AS roles'));
  return rows.map((r) => ({
    id: r.id,
    email: r.email,
    name: r.name,
    status: r.status,
    roles: parseRoles(r.roles),
    lastSignInAt: r.last_sign_in_at ? new Date(r.last_sign_in_at).toISOString() : null,
    createdAt: new Date(r.created_at).toISOString(),
  }));
}

export async function updateUser(deps: AccountDeps, actor: PublicUser, id: number, change: { roles?: Role[]; status?: 'active' | 'deactivated'; name?: string }, ip?: string) {
  const { db, lucia } = deps;
  await db.transaction(async (trx) => {
    const user = await trx('users').where('id', id).forUpdate().first();
    if (!user) throw notFound('The person');
    const current = parseRoles((await trx('user_roles').where('user_id', id).select(trx.raw('GROUP_CONCAT(role) AS roles')))[0]?.roles ?? null);
    const nextRoles = change.roles ? [...new Set(change.roles)].filter((r) => ROLES.includes(r)).sort() : current;
    const nextStatus = change.status ?? user.status;
    const losesAdmin = current.includes('admin') && user.status === 'active' && (!nextRoles.includes('admin') || nextStatus !== 'active');
    if (losesAdmin) {
      // Lock the admin rows so two admins cannot demote each other at the same moment.
      const admins = await trx('user_roles as r').join('users as u', 'u.id', 'r.user_id').where('r.role', 'admin').andWhere('u.status', 'active').forUpdate().select('u.id');
      if (admins.length <= 1) throw conflict('last_admin', 'This is the last active administrator; make someone else an administrator first.');
    }
    if (change.roles) {
      await trx('user_roles').where('user_id', id).delete();
      await trx('user_roles').insert(nextRoles.map((role) => ({ user_id: id, role })));
      if (JSON.stringify(current) !== JSON.stringify(nextRoles)) {
        await audit(trx, { actorId: actor.id, action: 'user.roles', targetType: 'user', targetId: id, details: { from: current, to: nextRoles }, ip });
      }
    }
    if (change.name) await trx('users').where('id', id).update({ name: change.name, updated_at: new Date() });
    if (change.status && change.status !== user.status) {
      await trx('users').where('id', id).update({ status: change.status, updated_at: new Date() });
      if (change.status === 'deactivated') {
        await trx('sessions').where('user_id', id).delete();
        await trx('api_tokens').where('user_id', id).whereNull('revoked_at').update({ revoked_at: new Date() });
      }
      await audit(trx, { actorId: actor.id, action: change.status === 'deactivated' ? 'user.deactivate' : 'user.reactivate', targetType: 'user', targetId: id, ip });
    }
  });
  if (change.status === 'deactivated') await lucia.invalidateUserSessions(id);
  return (await listUsers(db)).find((u) => u.id === id)!;
}

export function assertNotSelfDeactivation(actor: PublicUser, id: number, status?: string) {
  if (status === 'deactivated' && actor.id === id) throw forbidden('self_deactivation', 'You cannot deactivate your own account; ask another administrator.');
}
