import { Op, type Transaction, type WhereOptions } from 'sequelize';
import type { Database } from '../index';
import type { AuditEntryRow } from '../models/accounts';

/** A plain entry of the lab's audit log (never an ORM instance). */
export type AuditRecord = {
  id: string;
  at: Date;
  kind: string;
  action: string;
  actorId: string | null;
  actorName: string | null;
  targetId: string | null;
  targetLabel: string | null;
  before: Record<string, unknown> | null;
  after: Record<string, unknown> | null;
};
export type AuditFilter = { kind?: string; actorId?: string; from?: Date; toBefore?: Date; toAtMost?: Date; beforeId?: string; limit: number };

/** The append-only audit log: account events are added here; the lab's row changes are written by triggers. */
export function auditRepository(db: Database) {
  const { AuditEntry, Membership, User } = db.models;
  return {
    /** One entry in every lab the user belongs to, named by the user. */
    async addAccountEvent(userId: string, kind: string, action: string, details: Record<string, unknown> | null, transaction?: Transaction): Promise<void> {
      const memberships = await Membership.findAll({
        where: { userId },
        attributes: ['labId'],
        include: [{ model: User, as: 'user', attributes: ['name'], required: true }],
        transaction,
      });
      if (!memberships.length) return;
      await AuditEntry.bulkCreate(
        memberships.map((m) => ({ labId: m.labId, actorId: userId, kind, action, targetId: userId, targetLabel: m.user?.name ?? null, before: null, after: details })),
        { transaction, fields: ['labId', 'actorId', 'kind', 'action', 'targetId', 'targetLabel', 'before', 'after'] },
      );
    },

    /** One entry in the lab's log for a change the services make themselves (the triggers see only rows). */
    async addLabEvent(
      entry: { labId: string; actorId: string; kind: string; action: string; targetId: string; targetLabel: string; after: Record<string, unknown> },
      transaction: Transaction,
    ): Promise<void> {
      await AuditEntry.create({ ...entry, before: null }, { transaction, fields: ['labId', 'actorId', 'kind', 'action', 'targetId', 'targetLabel', 'after'] });
    },

    /** The lab's entries matching the filter, newest first, at most `limit`. */
    async entries(labId: string, f: AuditFilter): Promise<AuditRecord[]> {
      const at: Array<WhereOptions<AuditEntryRow>> = [];
      if (f.from) at.push({ at: { [Op.gte]: f.from } });
      if (f.toBefore) at.push({ at: { [Op.lt]: f.toBefore } });
      if (f.toAtMost) at.push({ at: { [Op.lte]: f.toAtMost } });
      const rows = await AuditEntry.findAll({
        where: {
          labId,
          ...(f.kind ? { kind: f.kind } : {}),
          ...(f.actorId ? { actorId: f.actorId } : {}),
          ...(f.beforeId ? { id: { [Op.lt]: f.beforeId } } : {}),
          [Op.and]: at,
        },
        include: [{ model: User, as: 'actor', attributes: ['name'], required: false }],
        order: [['id', 'DESC']],
        limit: f.limit,
      });
      return rows.map((r) => ({
        id: String(r.id),
        at: r.at,
        kind: r.kind,
        action: r.action,
        actorId: r.actorId,
        actorName: r.actor?.name ?? null,
        targetId: r.targetId,
        targetLabel: r.targetLabel,
        before: r.before,
        after: r.after,
      }));
    },
  };
}
export type AuditRepository = ReturnType<typeof auditRepository>;
