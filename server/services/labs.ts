import { Op, QueryTypes, type Transaction } from 'sequelize';
import type { Database } from '../db';
import { AppError, conflict, forbidden, notFound } from '../errors';
import { ROLES, type LabSettingsUpdate, type LabSettingsView, type MemberView, type MeResponse, type Role } from '../../shared/schemas/auth';

export type Member = MemberView;

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

  /**
   * Member changes of one lab run one at a time: the lab's row is locked
   * first, so two leads changing each other's roles at once wait for each
   * other instead of deadlocking on the member rows; the one who waited then
   * sees the other's change (and may no longer be a lead).
   */
  async function lockLabForMemberChange(labId: string, actorId: string | undefined, t: Transaction): Promise<void> {
    await Lab.findOne({ where: { id: labId }, attributes: ['id'], transaction: t, lock: t.LOCK.UPDATE });
    if (actorId === undefined) return;
    const actor: any = await Membership.findOne({ where: { labId, userId: actorId }, attributes: ['roles'], transaction: t, raw: true });
    if (!actor || !actor.roles.includes('lead')) throw forbidden('Only a lead of this lab may change its members; your roles changed a moment ago.');
  }

  /** The member's sessions take a new id on their next request, so a session never outlives the roles it was opened with. */
  async function rotateSessions(userId: string, t: Transaction): Promise<void> {
    await db.sequelize.query('UPDATE user_sessions SET rotate = true WHERE user_id = $1', { bind: [userId], transaction: t });
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
    async setRoles(labId: string, userId: string, roles: Role[], actorId?: string): Promise<Member> {
      await db.sequelize.transaction(async (t) => {
        await lockLabForMemberChange(labId, actorId, t);
        const row: any = await Membership.findOne({ where: { labId, userId }, transaction: t, lock: t.LOCK.UPDATE });
        if (!row) throw notFound('That member');
        const leads = await leadsOf(labId, t);
        if (leads.length === 1 && leads[0] === userId && !roles.includes('lead')) {
          throw conflict('last_lead', 'A lab needs at least one lead: make someone else a lead first.', 'roles');
        }
        await row.update({ roles }, { transaction: t });
        await rotateSessions(userId, t);
      });
      return this.member(labId, userId);
    },

    async removeMember(labId: string, userId: string, actorId?: string): Promise<void> {
      await db.sequelize.transaction(async (t) => {
        await lockLabForMemberChange(labId, actorId, t);
        const row: any = await Membership.findOne({ where: { labId, userId }, transaction: t, lock: t.LOCK.UPDATE });
        if (!row) throw notFound('That member');
        const leads = await leadsOf(labId, t);
        if (leads.length === 1 && leads[0] === userId) {
          throw conflict('last_lead', 'The last lead of a lab cannot be removed.');
        }
        await row.destroy({ transaction: t });
        await rotateSessions(userId, t);
      });
    },

    /** The lab's settings, with the default applied. */
    async settings(labId: string, t?: Transaction): Promise<LabSettingsView> {
      const [row] = await db.sequelize.query<{ second_approval: boolean | null; leads: number; currency: string; min_density: number }>(
        `SELECT l.second_approval, l.currency, l.min_packing_density_percent AS min_density, (SELECT count(*)::int FROM memberships m WHERE m.lab_id = l.id AND 'lead' = ANY (m.roles)) AS leads
           FROM labs l WHERE l.id = $1`,
        { bind: [labId], type: QueryTypes.SELECT, transaction: t },
      );
      if (!row) throw notFound('That lab');
      return { secondApproval: row.second_approval ?? row.leads > 1, secondApprovalSet: row.second_approval !== null, leads: row.leads, currency: row.currency, minPackingDensityPercent: row.min_density };
    },

    /** Changes the settings named in `input`, leaving the others as they are. */
    async updateSettings(labId: string, input: LabSettingsUpdate): Promise<LabSettingsView> {
      await db.sequelize.transaction(async (t) => {
        if (input.secondApproval !== undefined) {
          await db.sequelize.query('UPDATE labs SET second_approval = $2, updated_at = now() WHERE id = $1', { bind: [labId, input.secondApproval], transaction: t });
        }
        if (input.currency !== undefined) {
          await db.sequelize.query('UPDATE labs SET currency = $2, updated_at = now() WHERE id = $1', { bind: [labId, input.currency], transaction: t });
        }
        if (input.minPackingDensityPercent !== undefined) {
          await db.sequelize.query('UPDATE labs SET min_packing_density_percent = $2, updated_at = now() WHERE id = $1', {
            bind: [labId, input.minPackingDensityPercent],
            transaction: t,
          });
        }
      });
      return this.settings(labId);
    },

    /**
     * When the lab asks for a second person's approval, the lead approving a
     * plan must not be the one who sent it for review (the four-eyes rule).
     */
    async assertSecondApprover(labId: string, planId: string, approverId: string, t: Transaction): Promise<void> {
      if (!(await this.settings(labId, t)).secondApproval) return;
      const [last] = await db.sequelize.query<{ user_id: string | null }>(
        `SELECT user_id FROM plan_events WHERE plan_id = $1 AND to_status = 'in_review' ORDER BY created_at DESC LIMIT 1`,
        { bind: [planId], type: QueryTypes.SELECT, transaction: t },
      );
      if (last?.user_id === approverId) {
        throw new AppError(
          403,
          'second_approval_required',
          "This lab requires a second person's approval: a lead cannot approve a plan they sent for review themselves; another lead must approve it.",
        );
      }
    },
  };
}
export type LabsService = ReturnType<typeof labsService>;
