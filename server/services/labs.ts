import type { Transaction } from 'sequelize';
import type { Database } from '../db';
import { labsRepository } from '../db/repositories/labs';
import { accountsRepository } from '../db/repositories/accounts';
import { plansRepository } from '../db/repositories/plans';
import { AppError, conflict, forbidden, notFound } from '../errors';
import { ROLES, type LabSettingsUpdate, type LabSettingsView, type MemberView, type MeResponse, type Role } from '../../shared/schemas/auth';

export type Member = MemberView;

const sortRoles = (roles: string[]) => ROLES.filter((r) => roles.includes(r));

export function labsService(db: Database) {
  const repo = labsRepository(db);
  const accounts = accountsRepository(db);
  const plans = plansRepository(db);

  /**
   * Member changes of one lab run one at a time: the lab's row is locked
   * first, so two leads changing each other's roles at once wait for each
   * other instead of deadlocking on the member rows; the one who waited then
   * sees the other's change (and may no longer be a lead).
   */
  async function lockLabForMemberChange(labId: string, actorId: string | undefined, t: Transaction): Promise<void> {
    await repo.lockLab(labId, t);
    if (actorId === undefined) return;
    const roles = await repo.roles(labId, actorId, { transaction: t });
    if (!roles || !roles.includes('lead')) throw forbidden('Only a lead of this lab may change its members; your roles changed a moment ago.');
  }

  /** Locks the member's row and checks that the change leaves the lab a lead. */
  async function checkLeadsKept(labId: string, userId: string, stillLead: boolean, t: Transaction, message: string, field?: string): Promise<void> {
    if (!(await repo.roles(labId, userId, { transaction: t, lock: true }))) throw notFound('That member');
    const leads = await repo.lockLeads(labId, t);
    if (leads.length === 1 && leads[0] === userId && !stillLead) throw conflict('last_lead', message, field);
  }

  return {
    async membership(labId: string, userId: string): Promise<{ roles: Role[] } | null> {
      const roles = await repo.roles(labId, userId);
      return roles ? { roles: sortRoles(roles) } : null;
    },

    async createLab(name: string, ownerId: string, t: Transaction): Promise<string> {
      const labId = await repo.createLab(name, t);
      await repo.addMembership(labId, ownerId, [...ROLES], t);
      return labId;
    },

    async addMember(labId: string, userId: string, roles: Role[], t: Transaction): Promise<void> {
      const existing = await repo.roles(labId, userId, { transaction: t });
      if (existing) await repo.setRoles(labId, userId, sortRoles([...new Set([...existing, ...roles])]), t);
      else await repo.addMembership(labId, userId, roles, t);
    },

    async me(userId: string): Promise<MeResponse | null> {
      const user = await accounts.userById(userId);
      if (!user) return null;
      const labs = await repo.labsOf(userId);
      return {
        user: { id: user.id, email: user.email, name: user.name },
        labs: labs.map((l) => ({ id: l.id, name: l.name, roles: sortRoles(l.roles) })),
      };
    },

    async members(labId: string): Promise<Member[]> {
      return (await repo.members(labId)).map((m) => ({ userId: m.userId, email: m.email, name: m.name, roles: sortRoles(m.roles), joinedAt: m.joinedAt.toISOString() }));
    },

    async member(labId: string, userId: string): Promise<Member> {
      const found = (await this.members(labId)).find((m) => m.userId === userId);
      if (!found) throw notFound('That member');
      return found;
    },

    /** Changes roles; a lab always keeps at least one lead. The member's sessions take a new id on their next request, so a session never outlives the roles it was opened with. */
    async setRoles(labId: string, userId: string, roles: Role[], actorId?: string): Promise<Member> {
      await db.sequelize.transaction(async (t) => {
        await lockLabForMemberChange(labId, actorId, t);
        await checkLeadsKept(labId, userId, roles.includes('lead'), t, 'A lab needs at least one lead: make someone else a lead first.', 'roles');
        await repo.setRoles(labId, userId, roles, t);
        await accounts.rotateSessions(userId, t);
      });
      return this.member(labId, userId);
    },

    async removeMember(labId: string, userId: string, actorId?: string): Promise<void> {
      await db.sequelize.transaction(async (t) => {
        await lockLabForMemberChange(labId, actorId, t);
        await checkLeadsKept(labId, userId, false, t, 'The last lead of a lab cannot be removed.');
        await repo.removeMembership(labId, userId, t);
        await accounts.rotateSessions(userId, t);
      });
    },

    /** The lab's settings, with the default applied. */
    async settings(labId: string, t?: Transaction): Promise<LabSettingsView> {
      const lab = await repo.lab(labId, t);
      if (!lab) throw notFound('That lab');
      const leads = await repo.leadCount(labId, t);
      return {
        secondApproval: lab.secondApproval ?? leads > 1,
        secondApprovalSet: lab.secondApproval !== null,
        leads,
        currency: lab.currency,
        minPackingDensityPercent: lab.minPackingDensityPercent,
      };
    },

    /** Changes the settings named in `input`, leaving the others as they are. */
    async updateSettings(labId: string, input: LabSettingsUpdate): Promise<LabSettingsView> {
      await db.sequelize.transaction(async (t) => {
        await repo.updateLab(labId, { secondApproval: input.secondApproval, currency: input.currency, minPackingDensityPercent: input.minPackingDensityPercent }, t);
      });
      return this.settings(labId);
    },

    /**
     * When the lab asks for a second person's approval, the lead approving a
     * plan must not be the one who sent it for review (the four-eyes rule).
     */
    async assertSecondApprover(labId: string, planId: string, approverId: string, t: Transaction): Promise<void> {
      if (!(await this.settings(labId, t)).secondApproval) return;
      if ((await plans.lastSentForReviewBy(planId, t)) === approverId) {
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
