/**
 * Sessions with lucia v3, stored in MariaDB through the app's own Knex pool (one pool, one set of
 * connection settings, and the same reconnection behaviour as every other query).
 */
import { Lucia, TimeSpan, type Adapter, type DatabaseSession, type DatabaseUser } from 'lucia';
import { fastQuery, type Db } from '../db.js';
import type { Role } from '../schemas/people.js';

export const SESSION_COOKIE = 'tg_session';

interface UserAttributes {
  email: string;
  name: string;
  roles: Role[];
}
interface SessionAttributes {
  ip: string | null;
  user_agent: string | null;
}

declare module 'lucia' {
  interface Register {
    Lucia: ReturnType<typeof createLucia>;
    UserId: number;
    DatabaseUserAttributes: UserAttributes;
    DatabaseSessionAttributes: SessionAttributes;
  }
}

export function parseRoles(concat: string | null): Role[] {
  return concat ? (concat.split(',').sort() as Role[]) : [];
}

export class KnexSessionAdapter implements Adapter {
  constructor(private readonly db: Db) {}

  async getSessionAndUser(sessionId: string): Promise<[DatabaseSession | null, DatabaseUser | null]> {
    // Runs on every request made with a cookie: one raw query.
    const [row] = await fastQuery(
      this.db,
      `SELECT s.id, s.user_id, s.expires_at, s.ip, s.user_agent, u.email, u.name, (SELECT GROUP_CONCAT(r.role) FROM user_roles r WHERE r.user_id = u.id) AS roles
         FROM sessions s JOIN users u ON u.id = s.user_id WHERE s.id = ? AND u.status = 'active' LIMIT 1`,
      [sessionId],
    );
    if (!row) return [null, null];
    return [
      { id: row.id, userId: row.user_id, expiresAt: new Date(row.expires_at), attributes: { ip: row.ip, user_agent: row.user_agent } },
      { id: row.user_id, attributes: { email: row.email, name: row.name, roles: parseRoles(row.roles) } },
    ];
  }
  async getUserSessions(userId: number): Promise<DatabaseSession[]> {
    const rows = await this.db('sessions').where('user_id', userId);
    return rows.map((r) => ({ id: r.id, userId: r.user_id, expiresAt: new Date(r.expires_at), attributes: { ip: r.ip, user_agent: r.user_agent } }));
  }
  async setSession(session: DatabaseSession): Promise<void> {
    await this.db('sessions').insert({
      id: session.id,
      user_id: session.userId,
      expires_at: session.expiresAt,
      ip: session.attributes.ip,
      user_agent: session.attributes.user_agent?.slice(0, 255) ?? null,
    });
  }
  async updateSessionExpiration(sessionId: string, expiresAt: Date): Promise<void> {
    await this.db('sessions').where('id', sessionId).update({ expires_at: expiresAt });
  }
  async deleteSession(sessionId: string): Promise<void> {
    await this.db('sessions').where('id', sessionId).delete();
  }
  async deleteUserSessions(userId: number): Promise<void> {
    await this.db('sessions').where('user_id', userId).delete();
  }
  async deleteExpiredSessions(): Promise<void> {
    await this.db('sessions').where('expires_at', '<=', new Date()).delete();
  }
}

/**
 * Sessions expire after `idleHours` without use; lucia extends a session when it is used in the
 * second half of that window, so an active person stays signed in.
 */
export function createLucia(db: Db, idleHours: number, secure: boolean) {
  return new Lucia(new KnexSessionAdapter(db), {
    sessionExpiresIn: new TimeSpan(Math.max(1, Math.round(idleHours * 60)), 'm'),
    sessionCookie: { name: SESSION_COOKIE, expires: true, attributes: { sameSite: 'lax', secure, path: '/' } },
    getUserAttributes: (a) => ({ email: a.email, name: a.name, roles: a.roles }),
  });
}

export type AppLucia = ReturnType<typeof createLucia>;
