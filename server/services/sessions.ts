import type pg from 'pg';
import { notFound } from '../errors';
import { SESSION_HANDLE_SQL } from '../auth/sessions';
import type { SessionView } from '../../shared/schemas/auth';
import type { AuditService } from './audit';

/**
 * A user's own sessions: listed (newest use first), ended one at a time, or
 * all at once. Sessions are named by a digest of their id, since the id
 * itself is what the cookie carries.
 */
export function sessionsService(pool: pg.Pool, audit: AuditService) {
  return {
    async list(userId: string, currentSessionId: string): Promise<SessionView[]> {
      const { rows } = await pool.query<{ handle: string; created_at: Date; last_seen_at: Date; user_agent: string | null; ip_address: string | null; current: boolean }>(
        `SELECT ${SESSION_HANDLE_SQL} AS handle, created_at, last_seen_at, user_agent, ip_address, id = $2 AS current
           FROM user_sessions WHERE user_id = $1 AND expires_at > now()
          ORDER BY (id = $2) DESC, last_seen_at DESC`,
        [userId, currentSessionId],
      );
      return rows.map((r) => ({
        id: r.handle,
        createdAt: new Date(r.created_at).toISOString(),
        lastSeenAt: new Date(r.last_seen_at).toISOString(),
        userAgent: r.user_agent,
        ipAddress: r.ip_address,
        current: r.current,
      }));
    },

    /** Ends one of the user's sessions; returns whether it was the one asking. */
    async revoke(userId: string, handle: string, currentSessionId: string): Promise<boolean> {
      const { rows } = await pool.query<{ id: string }>(`DELETE FROM user_sessions WHERE user_id = $1 AND ${SESSION_HANDLE_SQL} = $2 RETURNING id`, [userId, handle]);
      if (rows.length === 0) throw notFound('That session');
      await audit.recordAccount(userId, { kind: 'account', action: 'session_revoked' }, null);
      return rows[0].id === currentSessionId;
    },

    /** Signs out everywhere: every session of the user ends, the asking one too. */
    async revokeAll(userId: string): Promise<number> {
      const { rowCount } = await pool.query('DELETE FROM user_sessions WHERE user_id = $1', [userId]);
      await audit.recordAccount(userId, { kind: 'account', action: 'signed_out_everywhere' }, { sessions: rowCount ?? 0 });
      return rowCount ?? 0;
    },
  };
}
export type SessionsService = ReturnType<typeof sessionsService>;
