import { createHash, randomBytes } from 'node:crypto';
import { Op } from 'sequelize';
import type { Database } from '../db';
import { AppError, conflict, notFound } from '../errors';
import type { Mailer } from '../mail/mailer';
import { passwordSchema, ROLES, type InvitePreviewView, type InviteView, type Role } from '../../shared/schemas/auth';
import type { AuthService } from './auth';
import type { LabsService } from './labs';
import { stampActor } from '../audit/actor';

const INVITE_DAYS = 7;
const hashToken = (token: string) => createHash('sha256').update(token).digest('hex');

export type { InviteView };

function view(row: any): InviteView {
  return {
    id: row.id,
    email: row.email,
    roles: ROLES.filter((r) => row.roles.includes(r)),
    createdAt: new Date(row.created_at ?? row.createdAt).toISOString(),
    expiresAt: new Date(row.expiresAt).toISOString(),
    acceptedAt: row.acceptedAt ? new Date(row.acceptedAt).toISOString() : null,
    invitedBy: row.invitedBy ?? null,
  };
}

export function invitesService(db: Database, deps: { labs: LabsService; auth: AuthService; mailer: Mailer; appUrl: string }) {
  const { Invite, Lab } = db.models;

  async function usable(token: string): Promise<any> {
    const row: any = await Invite.findOne({ where: { tokenHash: hashToken(token) }, raw: true });
    if (!row || row.acceptedAt || row.revokedAt || new Date(row.expiresAt) < new Date()) {
      throw notFound('That invite (it may have been used, revoked or have expired)');
    }
    return row;
  }

  return {
    async list(labId: string): Promise<InviteView[]> {
      const rows = await Invite.findAll({ where: { labId, revokedAt: null }, order: [['created_at', 'DESC']], raw: true });
      return rows.map(view);
    },

    async create(labId: string, invitedBy: { id: string; name: string }, email: string, roles: Role[]): Promise<InviteView> {
      const lab: any = await Lab.findByPk(labId, { raw: true });
      if (!lab) throw notFound('That lab');
      const existing = await deps.auth.findByEmail(email);
      if (existing && (await deps.labs.membership(labId, existing.id))) {
        throw conflict('already_member', `${email} is already a member of this lab.`, 'email');
      }
      const token = randomBytes(24).toString('base64url');
      const row: any = await db.sequelize.transaction(async (t) => {
        // A newer invite to the same address replaces the older, still open one.
        await Invite.update(
          { revokedAt: new Date() },
          { where: { labId, email, acceptedAt: null, revokedAt: null }, transaction: t },
        );
        const created: any = await Invite.create(
          { labId, email, roles, tokenHash: hashToken(token), invitedBy: invitedBy.id, expiresAt: new Date(Date.now() + INVITE_DAYS * 86400_000) },
          { transaction: t },
        );
        const link = `${deps.appUrl}/invite/${token}`;
        await deps.mailer.send({
          to: email,
          subject: `${invitedBy.name} invited you to ${lab.name} on Sinterstack`,
          text: [
            `${invitedBy.name} invited you to join ${lab.name} on Sinterstack as ${roles.join(', ')}.`,
            '',
            'Open this link to accept (it works for 7 days):',
            link,
            '',
            'If you did not expect this invite, you can ignore this message.',
          ].join('\n'),
        });
        return created.get({ plain: true });
      });
      return view(row);
    },

    async revoke(labId: string, inviteId: string): Promise<void> {
      const [count] = await Invite.update({ revokedAt: new Date() }, { where: { id: inviteId, labId, acceptedAt: null, revokedAt: null } });
      if (!count) throw notFound('That invite');
    },

    async lookup(token: string): Promise<InvitePreviewView> {
      const row = await usable(token);
      const lab: any = await Lab.findByPk(row.labId, { raw: true });
      const existing = await deps.auth.findByEmail(row.email);
      return {
        labName: lab.name,
        email: row.email,
        roles: ROLES.filter((r) => row.roles.includes(r)),
        existingUser: !!existing,
        expiresAt: new Date(row.expiresAt).toISOString(),
      };
    },

    /**
     * Joins the invited address to the lab. A new address gets an account
     * (name and password); an existing account proves itself by its session
     * or its password. Returns the user id to sign in.
     */
    async accept(token: string, input: { name?: string; password?: string }, sessionUserId?: string): Promise<string> {
      return db.sequelize.transaction(async (t) => {
        const row: any = await Invite.findOne({ where: { tokenHash: hashToken(token), acceptedAt: null, revokedAt: null, expiresAt: { [Op.gt]: new Date() } }, transaction: t, lock: t.LOCK.UPDATE });
        if (!row) throw notFound('That invite (it may have been used, revoked or have expired)');
        const existing = await deps.auth.findByEmail(row.email, t);
        let userId: string;
        if (existing) {
          if (sessionUserId === existing.id) userId = existing.id;
          else if (input.password && (await deps.auth.checkPassword(existing.id, input.password))) userId = existing.id;
          else throw new AppError(401, 'unauthenticated', `Sign in as ${row.email} (or give its password) to accept this invite.`, 'password');
        } else {
          if (!input.name) throw new AppError(400, 'invalid_input', 'name is required', 'name');
          if (!input.password) throw new AppError(400, 'invalid_input', 'password is required', 'password');
          const strong = passwordSchema.safeParse(input.password);
          if (!strong.success) throw new AppError(400, 'invalid_input', `password ${strong.error.issues[0].message}`, 'password');
          userId = await deps.auth.createUser({ email: row.email, name: input.name, password: input.password }, t);
        }
        // The new member acts here (they are not signed in yet), for the audit log.
        await stampActor(db.sequelize, t, userId);
        await deps.labs.addMember(row.labId, userId, row.roles, t);
        await row.update({ acceptedAt: new Date() }, { transaction: t });
        return userId;
      });
    },
  };
}
export type InvitesService = ReturnType<typeof invitesService>;
