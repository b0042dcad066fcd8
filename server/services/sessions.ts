import type { Database } from '../db';
import { accountsRepository } from '../db/repositories/accounts';
import { notFound } from '../errors';
import type { SessionView } from '../../shared/schemas/auth';
import type { AuditService } from './audit';

/**
 * A user's own sessions: listed (the asking one first, then newest use
 * first), ended one at a time, or all at once. Sessions are named by a
 * digest of their id, since the id itself is what the cookie carries.
 */
export function sessionsService(db: Database, audit: AuditService) {
  const accounts = accountsRepository(db);
  return {
    async list(userId: string, currentSessionId: string): Promise<SessionView[]> {
      const rows = await accounts.sessions(userId);
      const current = rows.filter((r) => r.id === currentSessionId);
      return [...current, ...rows.filter((r) => r.id !== currentSessionId)].map((r) => ({
        id: r.handle,
        createdAt: r.createdAt.toISOString(),
        lastSeenAt: r.lastSeenAt.toISOString(),
        userAgent: r.userAgent,
        ipAddress: r.ipAddress,
        current: r.id === currentSessionId,
      }));
    },

    /** Ends one of the user's sessions; returns whether it was the one asking. */
    async revoke(userId: string, handle: string, currentSessionId: string): Promise<boolean> {
      const ended = await accounts.endSessionByHandle(userId, handle);
      if (ended === null) throw notFound('That session');
      await audit.recordAccount(userId, { kind: 'account', action: 'session_revoked' }, null);
      return ended === currentSessionId;
    },

    /** Signs out everywhere: every session of the user ends, the asking one too. */
    async revokeAll(userId: string): Promise<number> {
      const count = await accounts.endSessions(userId);
      await audit.recordAccount(userId, { kind: 'account', action: 'signed_out_everywhere' }, { sessions: count });
      return count;
    },
  };
}
export type SessionsService = ReturnType<typeof sessionsService>;
