import { QueryTypes, type Transaction } from 'sequelize';
import type { Database } from '../db';
import type { AuditEntryView, AuditPageView, AuditQuery } from '../../shared/schemas/audit';

/** Account events (no lab row changes): recorded in every lab the user belongs to. */
export type AccountEvent =
  | { kind: 'sign_in'; action: 'signed_in' | 'failed' }
  | { kind: 'account'; action: 'password_changed' | 'password_reset' | 'reset_requested' | 'session_revoked' | 'signed_out_everywhere' };

/**
 * The lab's audit log. Changes of the lab's records are written by database
 * triggers in the same transaction as the change; what has no row of its own
 * (a sign-in, a password change) is written here, also inside the caller's
 * transaction when it has one.
 */
export function auditService(db: Database) {
  const { sequelize } = db;
  return {
    async recordAccount(userId: string, event: AccountEvent, details: Record<string, unknown> | null, transaction?: Transaction): Promise<void> {
      await sequelize.query(
        `INSERT INTO audit_log (lab_id, actor_id, kind, action, target_id, target_label, after)
         SELECT m.lab_id, $1, $2, $3, $1, u.name, $4::jsonb
           FROM memberships m JOIN users u ON u.id = m.user_id
          WHERE m.user_id = $1`,
        { bind: [userId, event.kind, event.action, details ? JSON.stringify(details) : null], transaction },
      );
    },

    async list(labId: string, q: AuditQuery): Promise<AuditPageView> {
      const where = ['a.lab_id = $1'];
      const bind: unknown[] = [labId];
      const add = (sql: string, v: unknown) => {
        bind.push(v);
        where.push(sql.replace('?', `$${bind.length}`));
      };
      if (q.kind) add('a.kind = ?', q.kind);
      if (q.actor) add('a.actor_id = ?', q.actor);
      // A bare date means that whole day (UTC): from its start, to its end.
      if (q.from) add('a.at >= ?::timestamptz', q.from.length === 10 ? `${q.from}T00:00:00Z` : q.from);
      if (q.to) add(q.to.length === 10 ? "a.at < ?::timestamptz + interval '1 day'" : 'a.at <= ?::timestamptz', q.to.length === 10 ? `${q.to}T00:00:00Z` : q.to);
      if (q.before) add('a.id < ?::bigint', q.before);
      bind.push(q.limit + 1);
      const rows = await sequelize.query<{
        id: string;
        at: Date;
        kind: string;
        action: string;
        actor_id: string | null;
        actor_name: string | null;
        target_id: string | null;
        target_label: string | null;
        before: Record<string, unknown> | null;
        after: Record<string, unknown> | null;
      }>(
        `SELECT a.id::text AS id, a.at, a.kind, a.action, a.actor_id, u.name AS actor_name, a.target_id, a.target_label, a.before, a.after
           FROM audit_log a LEFT JOIN users u ON u.id = a.actor_id
          WHERE ${where.join(' AND ')}
          ORDER BY a.id DESC
          LIMIT $${bind.length}`,
        { bind, type: QueryTypes.SELECT },
      );
      const page = rows.slice(0, q.limit);
      const entries: AuditEntryView[] = page.map((r) => ({
        id: r.id,
        at: new Date(r.at).toISOString(),
        kind: r.kind,
        action: r.action,
        actor: r.actor_id ? { id: r.actor_id, name: r.actor_name } : null,
        target: { id: r.target_id, label: r.target_label },
        before: r.before,
        after: r.after,
      }));
      return { entries, next: rows.length > q.limit ? page[page.length - 1].id : null };
    },
  };
}
export type AuditService = ReturnType<typeof auditService>;
