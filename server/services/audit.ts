import type { Knex } from 'knex';

export interface AuditEntry {
  actorId?: number | null;
  action: string;
  targetType?: string;
  targetId?: string | number | null;
  details?: unknown;
  ip?: string | null;
}

/** Writes one audit row (inside the caller's transaction when given one). */
export async function audit(db: Knex | Knex.Transaction, entry: AuditEntry) {
  await db('audit_log').insert({
    actor_id: entry.actorId ?? null,
    action: entry.action,
    target_type: entry.targetType ?? null,
    target_id: entry.targetId == null ? null : String(entry.targetId),
    details: entry.details === undefined ? null : JSON.stringify(entry.details),
    ip: entry.ip ?? null,
  });
}

export async function listAudit(db: Knex, { limit = 200, action }: { limit?: number; action?: string }) {
  const q = db('audit_log as a').leftJoin('users as u', 'u.id', 'a.actor_id').orderBy('a.id', 'desc').limit(Math.min(limit, 1000));
  if (action) q.where('a.action', 'like', `${action}%`);
  const rows = await q.select('a.*', 'u.email as actor_email', 'u.name as actor_name');
  return rows.map((r) => ({
    id: Number(r.id),
    at: new Date(r.at).toISOString(),
    action: r.action,
    actor: r.actor_id ? { id: r.actor_id, email: r.actor_email, name: r.actor_name } : null,
    targetType: r.target_type,
    targetId: r.target_id,
    details: r.details ? JSON.parse(r.details) : null,
    ip: r.ip,
  }));
}
