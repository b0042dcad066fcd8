import type { Transaction } from 'sequelize';
import type { Database } from '../db';
import { auditRepository } from '../db/repositories/audit';
import type { AuditEntryView, AuditPageView, AuditQuery } from '../../shared/schemas/audit';

/** Account events (no lab row changes): recorded in every lab the user belongs to. */
export type AccountEvent =
  | { kind: 'sign_in'; action: 'signed_in' | 'failed' }
  | { kind: 'account'; action: 'password_changed' | 'password_reset' | 'reset_requested' | 'session_revoked' | 'signed_out_everywhere' };

const DAY_MS = 86_400_000;
const isDay = (s: string) => s.length === 10;
/** A date and time without an offset is read as UTC (the database session's zone). */
const instant = (s: string) => new Date(isDay(s) ? `${s}T00:00:00Z` : /(Z|[+-]\d{2}:\d{2})$/.test(s) ? s : `${s}Z`);

/**
 * The lab's audit log. Changes of the lab's records are written by database
 * triggers in the same transaction as the change; what has no row of its own
 * (a sign-in, a password change) is written here, also inside the caller's
 * transaction when it has one.
 */
export function auditService(db: Database) {
  const repo = auditRepository(db);
  return {
    async recordAccount(userId: string, event: AccountEvent, details: Record<string, unknown> | null, transaction?: Transaction): Promise<void> {
      await repo.addAccountEvent(userId, event.kind, event.action, details, transaction);
    },

    async list(labId: string, q: AuditQuery): Promise<AuditPageView> {
      // A bare date means that whole day (UTC): from its start, to its end.
      const rows = await repo.entries(labId, {
        kind: q.kind,
        actorId: q.actor,
        from: q.from ? instant(q.from) : undefined,
        toBefore: q.to && isDay(q.to) ? new Date(instant(q.to).getTime() + DAY_MS) : undefined,
        toAtMost: q.to && !isDay(q.to) ? instant(q.to) : undefined,
        beforeId: q.before,
        limit: q.limit + 1,
      });
      const page = rows.slice(0, q.limit);
      const entries: AuditEntryView[] = page.map((r) => ({
        id: r.id,
        at: r.at.toISOString(),
        kind: r.kind,
        action: r.action,
        actor: r.actorId ? { id: r.actorId, name: r.actorName } : null,
        target: { id: r.targetId, label: r.targetLabel },
        before: r.before,
        after: r.after,
      }));
      return { entries, next: rows.length > q.limit ? page[page.length - 1].id : null };
    },
  };
}
export type AuditService = ReturnType<typeof auditService>;
