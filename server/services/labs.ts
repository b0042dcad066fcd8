import { Op, type Transaction } from 'sequelize';
import type { Database } from '../db';
import { conflict, notFound } from '../errors';
import { ROLES, type MeResponse, type Role } from '../../shared/schemas/auth';

export type Member = { userId: string; email: string; name: string; roles: Role[]; joinedAt: string };

const sortRoles = (roles: string[]) => ROLES.filter((r) => roles.includes(r));

export function labsService(db: Database) {
  const { Lab, Membership, User } = db.models;

  async function leadsOf(labId: string, t?: Transaction): Promise<string[]> {
    const rows = await Membership.findAll({
      where: { labId, roles: { [Op.contains]: ['lead'] } },
      attributes: ['userId'],
      transaction: t,
      lock: t ? t.LOCK.UPDATE : undefined,
      raw: true,
    });
    return rows.map((r: any) => r.userId);
  }

  return {
    async membership(labId: string, userId: string): Promise<{ roles: Role[] } | null> {
      const row: any = await Membership.findOne({ where: { labId, userId }, attributes: ['roles'], raw: true });
      return row ? { roles: sortRoles(row.roles) } : null;
    },

    async createLab(name: string, ownerId: string, t: Transaction): Promise<string> {
      const lab: any = await Lab.create({ name }, { transaction: t });
      await Membership.create({ labId: lab.id, userId: ownerId, roles: [...ROLES] }, { transaction: t });
      return lab.id;
    },

    async addMember(labId: string, userId: string, roles: Role[], t: Transaction): Promise<void> {
      const existing: any = await Membership.findOne({ where: { labId, userId }, transaction: t });
      if (existing) {
        await existing.update({ roles: sortRoles([...new Set([...existing.roles, ...roles])]) }, { transaction: t });
      } else {
        await Membership.create({ labId, userId, roles }, { transaction: t });
      }
    },

    async me(userId: string): Promise<MeResponse | null> {
      const user: any = await User.findByPk(userId, { attributes: ['id', 'email', 'name'], raw: true });
      if (!user) return null;
      const rows: any[] = await Membership.findAll({
        where: { userId },
        include: [{ model: Lab, as: 'lab', attributes: ['id', 'name'] }],
        order: [[{ model: Lab, as: 'lab' }, 'name', 'ASC']],
      });
      return {
        user: { id: user.id, email: user.email, name: user.name },
        labs: rows.map((m) => ({ id: m.lab.id, name: m.lab.name, roles: sortRoles(m.roles) })),
      };
    },

    async members(labId: string): Promise<Member[]> {
      const rows: any[] = await Membership.findAll({
        where: { labId },
        include: [{ model: User, as: 'user', attributes: ['id', 'email', 'name'] }],
        order: [[{ model: User, as: 'user' }, 'name', 'ASC']],
      });
      return rows.map((m) => ({
        userId: m.user.id,
        email: m.user.email,
        name: m.user.name,
        roles: sortRoles(m.roles),
        joinedAt: new Date(m.get('created_at') ?? m.createdAt).toISOString(),
      }));
    },

    async member(labId: string, userId: string): Promise<Member> {
      const found = (await this.members(labId)).find((m) => m.userId === userId);
      if (!found) throw notFound('That member');
      return found;
    },

    /** Changes roles; a lab always keeps at least one lead. */
    async setRoles(labId: string, userId: string, roles: Role[]): Promise<Member> {
      await db.sequelize.transaction(async (t) => {
        const row: any = await Membership.findOne({ where: { labId, userId }, transaction: t, lock: t.LOCK.UPDATE });
        if (!row) throw notFound('That member');
        const leads = await leadsOf(labId, t);
        if (leads.length === 1 && leads[0] === userId && !roles.includes('lead')) {
          throw conflict('last_lead', 'A lab needs at least one lead: make someone else a lead first.', 'roles');
        }
        await row.update({ roles }, { transaction: t });
      });
      return this.member(labId, userId);
    },

    async removeMember(labId: string, userId: string): Promise<void> {
      await db.sequelize.transaction(async (t) => {
        const row: any = await Membership.findOne({ where: { labId, userId }, transaction: t, lock: t.LOCK.UPDATE });
        if (!row) throw notFound('That member');
        const leads = await leadsOf(labId, t);
        if (leads.length === 1 && leads[0] === userId) {
          throw conflict('last_lead', 'The last lead of a lab cannot be removed.');
        }
        await row.destroy({ transaction: t });
      });
    },
  };
}
export type LabsService = ReturnType<typeof labsService>;
