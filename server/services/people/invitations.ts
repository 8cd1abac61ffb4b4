/** Invitations by e-mail: sent, resent with a fresh link, withdrawn, looked up and accepted (which signs in). */
import type { Knex } from 'knex';
import type { Config } from '../../config.js';
import type { Db } from '../../db.js';
import { conflict, gone, notFound } from '../../lib/errors.js';
import { randomToken, sha256 } from '../../lib/secrets.js';
import { composeMail } from '../../mail/mailer.js';
import { hashPassword } from '../../auth/password.js';
import type { Invitation, PublicUser, Role } from '../../schemas/people.js';
import { audit } from '../audit.js';
import { startSession } from '../auth.js';
import { loadUser, publicUser, type PeopleDeps } from './users.js';
import { transaction } from '../../lib/retry.js';

const INVITATION_DAYS = 7;

function inviteLink(config: Config, token: string) {
  return `${config.publicOrigin}/invite/${token}`;
}

async function mailInvitation(deps: PeopleDeps, email: string, roles: Role[], token: string, inviter: string) {
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

export async function invite(deps: PeopleDeps, actor: PublicUser, input: { email: string; roles: Role[] }, ip?: string) {
  const { db } = deps;
  const existing = await db('users').where('email', input.email).first();
  if (existing) throw conflict('already_member', `${input.email} already has an account${existing.status === 'deactivated' ? ' (deactivated: reactivate it on the People page)' : ''}.`);
  const token = randomToken(32);
  const roles = [...new Set(input.roles)].sort();
  const id = await transaction(db, async (trx) => {
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

export async function resendInvitation(deps: PeopleDeps, actor: PublicUser, id: number, ip?: string) {
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

export async function listInvitations(db: Db): Promise<Invitation[]> {
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

export async function acceptInvitation(deps: PeopleDeps, input: { token: string; name: string; password: string }, ip: string, userAgent?: string) {
  const { db } = deps;
  const passwordHash = await hashPassword(input.password);
  const userId = await transaction(db, async (trx) => {
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
