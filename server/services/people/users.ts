/** People of the workspace: who they are, their roles and status (the People page). */
import type { Knex } from 'knex';
import type { Config } from '../../config.js';
import type { Db } from '../../db.js';
import { conflict, forbidden, notFound } from '../../lib/errors.js';
import type { Mailer } from '../../mail/mailer.js';
import { parseRoles, type AppLucia } from '../../auth/lucia.js';
import { ROLES, type Person, type PublicUser, type Role } from '../../schemas/people.js';
import { audit } from '../audit.js';
import { transaction } from '../../lib/retry.js';

/** What the people services need besides the database: mail links, mail, and sessions to end. */
export interface PeopleDeps {
  db: Db;
  config: Config;
  mailer: Mailer;
  lucia: AppLucia;
}

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

export async function listUsers(db: Db): Promise<Person[]> {
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

export async function updateUser(deps: PeopleDeps, actor: PublicUser, id: number, change: { roles?: Role[]; status?: 'active' | 'deactivated'; name?: string }, ip?: string) {
  const { db, lucia } = deps;
  await transaction(db, async (trx) => {
    const user = await trx('users').where('id', id).forUpdate().first();
    if (!user) throw notFound('The person');
    const current = parseRoles((await trx('user_roles').where('user_id', id).select(trx.raw('GROUP_CONCAT(role) AS roles')))[0]?.roles ?? null);
    const nextRoles = change.roles ? [...new Set(change.roles)].filter((r) => ROLES.includes(r)).sort() : current;
    const nextStatus = change.status ?? user.status;
    const losesAdmin = current.includes('admin') && user.status === 'active' && (!nextRoles.includes('admin') || nextStatus !== 'active');
    if (losesAdmin) {
      // Lock the admin rows so two admins cannot demote each other at the same moment. On a Galera
      // cluster a lock holds on one node only and two such changes write different rows, so both
      // would pass; both also write this one row, which makes the cluster see them collide and
      // run the second again (lib/retry.ts), when it finds the last administrator.
      await trx.raw("INSERT INTO settings (`key`, value) VALUES ('admin_roles_guard', '1') ON DUPLICATE KEY UPDATE value = value + 1, updated_at = NOW(3)");
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
        // Reset links sent before stay dead, even if the account is reactivated later.
        await trx('password_resets').where('user_id', id).whereNull('used_at').whereNull('revoked_at').update({ revoked_at: new Date() });
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
