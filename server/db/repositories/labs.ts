import { Op, type Transaction } from 'sequelize';
import type { Database } from '../index';

/** Plain records of labs, their members and invites (never ORM instances). */
export type LabRecord = { id: string; name: string; secondApproval: boolean | null; currency: string; minPackingDensityPercent: number };
export type MemberRecord = { userId: string; email: string; name: string; roles: string[]; joinedAt: Date };
export type InviteRecord = {
  id: string;
  labId: string;
  email: string;
  roles: string[];
  invitedBy: string | null;
  createdAt: Date;
  expiresAt: Date;
  acceptedAt: Date | null;
  revokedAt: Date | null;
};
export type NewInvite = { labId: string; email: string; roles: string[]; tokenHash: string; invitedBy: string; expiresAt: Date };

const inviteOf = (r: InviteRecord): InviteRecord => ({
  id: r.id,
  labId: r.labId,
  email: r.email,
  roles: r.roles,
  invitedBy: r.invitedBy,
  createdAt: r.createdAt,
  expiresAt: r.expiresAt,
  acceptedAt: r.acceptedAt,
  revokedAt: r.revokedAt,
});

/** Labs, memberships and invites. */
export function labsRepository(db: Database) {
  const { Lab, Membership, User, Invite } = db.models;
  const isLead = { roles: { [Op.contains]: ['lead'] } };

  return {
    async lab(labId: string, transaction?: Transaction): Promise<LabRecord | null> {
      const row = await Lab.findByPk(labId, { transaction });
      return row ? { id: row.id, name: row.name, secondApproval: row.secondApproval, currency: row.currency, minPackingDensityPercent: row.minPackingDensityPercent } : null;
    },

    async createLab(name: string, transaction: Transaction): Promise<string> {
      return (await Lab.create({ name }, { transaction })).id;
    },

    /** Changes the settings given, leaving the others as they are. */
    async updateLab(labId: string, patch: { secondApproval?: boolean | null; currency?: string; minPackingDensityPercent?: number }, transaction: Transaction): Promise<void> {
      const set = Object.fromEntries(Object.entries(patch).filter(([, v]) => v !== undefined));
      if (Object.keys(set).length) await Lab.update(set, { where: { id: labId }, transaction });
    },

    /** Locks the lab's row for the rest of the transaction: changes of one lab's members run one at a time. */
    async lockLab(labId: string, transaction: Transaction): Promise<void> {
      await Lab.findOne({ where: { id: labId }, attributes: ['id'], transaction, lock: transaction.LOCK.UPDATE });
    },

    async leadCount(labId: string, transaction?: Transaction): Promise<number> {
      return Membership.count({ where: { labId, ...isLead }, transaction });
    },

    /** The lab's leads, their membership rows locked. */
    async lockLeads(labId: string, transaction: Transaction): Promise<string[]> {
      const rows = await Membership.findAll({ where: { labId, ...isLead }, attributes: ['userId'], transaction, lock: transaction.LOCK.UPDATE });
      return rows.map((r) => r.userId);
    },

    /** The member's roles (their row locked when `lock` is set), or null when not a member. */
    async roles(labId: string, userId: string, opts: { transaction?: Transaction; lock?: boolean } = {}): Promise<string[] | null> {
      const row = await Membership.findOne({
        where: { labId, userId },
        attributes: ['roles'],
        transaction: opts.transaction,
        lock: opts.lock && opts.transaction ? opts.transaction.LOCK.UPDATE : undefined,
      });
      return row ? row.roles : null;
    },

    async addMembership(labId: string, userId: string, roles: string[], transaction: Transaction): Promise<void> {
      await Membership.create({ labId, userId, roles }, { transaction });
    },

    async setRoles(labId: string, userId: string, roles: string[], transaction: Transaction): Promise<void> {
      await Membership.update({ roles }, { where: { labId, userId }, transaction });
    },

    async removeMembership(labId: string, userId: string, transaction: Transaction): Promise<void> {
      await Membership.destroy({ where: { labId, userId }, transaction });
    },

    /** The user's labs by name, with the user's roles in each. */
    async labsOf(userId: string): Promise<Array<{ id: string; name: string; roles: string[] }>> {
      const rows = await Membership.findAll({
        where: { userId },
        include: [{ model: Lab, as: 'lab', attributes: ['id', 'name'], required: true }],
        order: [[{ model: Lab, as: 'lab' }, 'name', 'ASC']],
      });
      return rows.flatMap((m) => (m.lab ? [{ id: m.lab.id, name: m.lab.name, roles: m.roles }] : []));
    },

    /** The lab's members by name. */
    async members(labId: string): Promise<MemberRecord[]> {
      const rows = await Membership.findAll({
        where: { labId },
        include: [{ model: User, as: 'user', attributes: ['id', 'email', 'name'], required: true }],
        order: [[{ model: User, as: 'user' }, 'name', 'ASC']],
      });
      return rows.flatMap((m) => (m.user ? [{ userId: m.user.id, email: m.user.email, name: m.user.name, roles: m.roles, joinedAt: m.createdAt }] : []));
    },

    /** The lab's invites not revoked, newest first. */
    async invites(labId: string): Promise<InviteRecord[]> {
      const rows = await Invite.findAll({ where: { labId, revokedAt: null }, order: [['createdAt', 'DESC']] });
      return rows.map(inviteOf);
    },

    /** A new invite; an older one to the same address still open is revoked. */
    async createInvite(invite: NewInvite, transaction: Transaction): Promise<InviteRecord> {
      await Invite.update({ revokedAt: new Date() }, { where: { labId: invite.labId, email: invite.email, acceptedAt: null, revokedAt: null }, transaction });
      return inviteOf(await Invite.create(invite, { transaction }));
    },

    /** Revokes an open invite; returns whether there was one. */
    async revokeInvite(labId: string, inviteId: string): Promise<boolean> {
      const [count] = await Invite.update({ revokedAt: new Date() }, { where: { id: inviteId, labId, acceptedAt: null, revokedAt: null } });
      return count > 0;
    },

    /** The invite with this token, open and unexpired (locked for the rest of the transaction when one is given), or null. */
    async openInvite(tokenHash: string, transaction?: Transaction): Promise<InviteRecord | null> {
      const row = await Invite.findOne({
        where: { tokenHash, acceptedAt: null, revokedAt: null, expiresAt: { [Op.gt]: new Date() } },
        transaction,
        lock: transaction ? transaction.LOCK.UPDATE : undefined,
      });
      return row ? inviteOf(row) : null;
    },

    async markInviteAccepted(inviteId: string, transaction: Transaction): Promise<void> {
      await Invite.update({ acceptedAt: new Date() }, { where: { id: inviteId }, transaction });
    },
  };
}
export type LabsRepository = ReturnType<typeof labsRepository>;
