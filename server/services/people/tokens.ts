/** API tokens: named, shown once, stored hashed; they act with their owner's roles until revoked. */
import type { Db } from '../../db.js';
import { fastQuery } from '../../db.js';
import { notFound } from '../../lib/errors.js';
import { randomToken, sha256 } from '../../lib/secrets.js';
import { parseRoles } from '../../auth/lucia.js';
import type { ApiToken, PublicUser } from '../../schemas/people.js';
import { audit } from '../audit.js';

export const TOKEN_PREFIX = 'tg_';

export async function createToken(db: Db, userId: number, name: string, ip?: string) {
  const token = TOKEN_PREFIX + randomToken(32);
  const [id] = await db('api_tokens').insert({ user_id: userId, name, token_hash: sha256(token), prefix: token.slice(0, 10) });
  await audit(db, { actorId: userId, action: 'token.create', targetType: 'api_token', targetId: id, details: { name }, ip });
  return { id, name, token, prefix: token.slice(0, 10) };
}

export async function listTokens(db: Db, userId: number): Promise<ApiToken[]> {
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
