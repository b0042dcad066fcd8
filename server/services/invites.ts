import { createHash, randomBytes } from 'node:crypto';
import type { Database } from '../db';
import { labsRepository, type InviteRecord } from '../db/repositories/labs';
import { AppError, conflict, notFound } from '../errors';
import type { Mailer } from '../mail/mailer';
import { passwordSchema, ROLES, type InvitePreviewView, type InviteView, type Role } from '../../shared/schemas/auth';
import type { AuthService } from './auth';
import type { LabsService } from './labs';
import { stampActor } from '../audit/actor';

const INVITE_DAYS = 7;
const hashToken = (token: string) => createHash('sha256').update(token).digest('hex');

export type { InviteView };

function view(row: InviteRecord): InviteView {
  return {
    id: row.id,
    email: row.email,
    roles: ROLES.filter((r) => row.roles.includes(r)),
    createdAt: row.createdAt.toISOString(),
    expiresAt: row.expiresAt.toISOString(),
    acceptedAt: row.acceptedAt ? row.acceptedAt.toISOString() : null,
    invitedBy: row.invitedBy,
  };
}

export function invitesService(db: Database, deps: { labs: LabsService; auth: AuthService; mailer: Mailer; appUrl: string }) {
  const repo = labsRepository(db);
  const gone = () => notFound('That invite (it may have been used, revoked or have expired)');

  return {
    async list(labId: string): Promise<InviteView[]> {
      return (await repo.invites(labId)).map(view);
    },

    async create(labId: string, invitedBy: { id: string; name: string }, email: string, roles: Role[]): Promise<InviteView> {
      const lab = await repo.lab(labId);
      if (!lab) throw notFound('That lab');
      const existing = await deps.auth.findByEmail(email);
      if (existing && (await deps.labs.membership(labId, existing.id))) {
        throw conflict('already_member', `${email} is already a member of this lab.`, 'email');
      }
      const token = randomBytes(24).toString('base64url');
      const row = await db.sequelize.transaction(async (t) => {
        // A newer invite to the same address replaces the older, still open one.
        const created = await repo.createInvite(
          { labId, email, roles, tokenHash: hashToken(token), invitedBy: invitedBy.id, expiresAt: new Date(Date.now() + INVITE_DAYS * 86400_000) },
          t,
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
        return created;
      });
      return view(row);
    },

    async revoke(labId: string, inviteId: string): Promise<void> {
      if (!(await repo.revokeInvite(labId, inviteId))) throw notFound('That invite');
    },

    async lookup(token: string): Promise<InvitePreviewView> {
      const row = await repo.openInvite(hashToken(token));
      const lab = row && (await repo.lab(row.labId));
      if (!row || !lab) throw gone();
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
        const row = await repo.openInvite(hashToken(token), t);
        if (!row) throw gone();
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
        await deps.labs.addMember(row.labId, userId, ROLES.filter((r) => row.roles.includes(r)), t);
        await repo.markInviteAccepted(row.id, t);
        return userId;
      });
    },
  };
}
export type InvitesService = ReturnType<typeof invitesService>;
