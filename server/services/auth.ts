import { createHash, randomBytes } from 'node:crypto';
import { generateIdFromEntropySize } from 'lucia';
import type { Database } from '../db';
import { AppError, conflict } from '../errors';
import { dummyHash, hashPassword, verifyPassword } from '../auth/password';
import { assertStrongPassword } from '../auth/policy';
import type { ResetInput, SignInInput, SignUpInput } from '../../shared/schemas/auth';
import type { Mailer } from '../mail/mailer';
import type { AuditService } from './audit';
import type { LabsService } from './labs';
import type { Transaction } from 'sequelize';
import { accountsRepository, type UserRecord } from '../db/repositories/accounts';

const WRONG = 'That e-mail and password do not match an account.';

const hashToken = (token: string) => createHash('sha256').update(token).digest('hex');

export type AuthDeps = { labs: LabsService; audit: AuditService; mailer: Mailer; appUrl: string; resetTokenMs: number; log?: (msg: string) => void };

export function authService(db: Database, deps: AuthDeps) {
  const { labs, audit } = deps;
  const accounts = accountsRepository(db);

  async function findByEmail(email: string, t?: Transaction): Promise<UserRecord | null> {
    return accounts.userByEmail(email, t);
  }

  async function createUser(input: { email: string; name: string; password: string }, t: Transaction): Promise<string> {
    assertStrongPassword(input.password, { email: input.email, name: input.name });
    if (await findByEmail(input.email, t)) throw conflict('email_taken', 'An account with that e-mail already exists.', 'email');
    const id = generateIdFromEntropySize(10);
    try {
      await accounts.createUser({ id, email: input.email, name: input.name, passwordHash: await hashPassword(input.password) }, t);
    } catch (err) {
      // Two sign-ups racing for one address: the unique index decides.
      if ((err as { name?: string }).name === 'SequelizeUniqueConstraintError') {
        throw conflict('email_taken', 'An account with that e-mail already exists.', 'email');
      }
      throw err;
    }
    return id;
  }

  return {
    findByEmail,
    createUser,

    /** A new user, a new lab and a membership holding all four roles, together or not at all. */
    async signUp(input: SignUpInput): Promise<string> {
      return db.sequelize.transaction(async (t) => {
        const userId = await createUser(input, t);
        await labs.createLab(input.labName, userId, t);
        return userId;
      });
    },

    async signIn(input: SignInInput): Promise<string> {
      const user = await findByEmail(input.email);
      if (!user) {
        await verifyPassword(await dummyHash(), input.password);
        throw new AppError(401, 'unauthenticated', WRONG);
      }
      if (!(await verifyPassword(user.passwordHash, input.password))) {
        await audit.recordAccount(user.id, { kind: 'sign_in', action: 'failed' }, null);
        throw new AppError(401, 'unauthenticated', WRONG);
      }
      await audit.recordAccount(user.id, { kind: 'sign_in', action: 'signed_in' }, null);
      return user.id;
    },

    /**
     * Changes a password: the current one proves it is the owner, the new one
     * passes the policy, and every other session of the account ends (a
     * thief's included); the session that asked stays signed in.
     */
    async changePassword(userId: string, keepSessionId: string, input: { currentPassword: string; newPassword: string }): Promise<void> {
      const user = await accounts.userById(userId);
      if (!user || !(await verifyPassword(user.passwordHash, input.currentPassword))) {
        throw new AppError(400, 'wrong_password', 'currentPassword is not your current password.', 'currentPassword');
      }
      assertStrongPassword(input.newPassword, { email: user.email, name: user.name }, 'newPassword');
      const hash = await hashPassword(input.newPassword);
      await db.sequelize.transaction(async (t) => {
        await accounts.setPasswordHash(userId, hash, t);
        await accounts.endSessions(userId, { keepId: keepSessionId, transaction: t });
        await audit.recordAccount(userId, { kind: 'account', action: 'password_changed' }, null, t);
      });
    },

    /**
     * Mails a single-use reset link when the address has an account, and
     * does nothing otherwise. The caller answers the same either way, and
     * the work runs after the answer, so neither the answer nor its timing
     * tells whether the address has an account. Only the newest link works.
     */
    requestReset(email: string): void {
      const work = async () => {
        const user = await findByEmail(email);
        if (!user) return;
        const token = randomBytes(32).toString('base64url');
        await db.sequelize.transaction(async (t) => {
          await accounts.replaceResetToken(user.id, hashToken(token), deps.resetTokenMs, t);
          await audit.recordAccount(user.id, { kind: 'account', action: 'reset_requested' }, null, t);
        });
        const minutes = Math.round(deps.resetTokenMs / 60_000);
        await deps.mailer.send({
          to: user.email,
          subject: 'Reset your Sinterstack password',
          text: [
            `Someone (we hope you) asked to reset the password of the Sinterstack account ${user.email}.`,
            '',
            `Open this link within ${minutes} minutes to choose a new password. It works once:`,
            `${deps.appUrl}/reset/${token}`,
            '',
            'If you did not ask for this, ignore this message: your password stays as it is.',
          ].join('\n'),
        });
      };
      work().catch((err: unknown) => deps.log?.(`password reset mail failed: ${(err as Error).message}`));
    },

    /**
     * Sets a new password with a mailed token: the token must be unused and
     * unexpired, the password must pass the policy, and then the token is
     * spent and every session of the account ends, all in one transaction.
     */
    async resetPassword(input: ResetInput): Promise<void> {
      const hash = hashToken(input.token);
      await db.sequelize.transaction(async (t) => {
        const found = await accounts.spendResetToken(hash, t);
        if (!found) throw new AppError(400, 'invalid_token', 'This reset link has expired or was already used: ask for a new one.', 'token');
        assertStrongPassword(input.password, { email: found.email, name: found.name }, 'password');
        await accounts.setPasswordHash(found.id, await hashPassword(input.password), t);
        await accounts.endSessions(found.id, { transaction: t });
        await audit.recordAccount(found.id, { kind: 'account', action: 'password_reset' }, null, t);
      });
    },

    async checkPassword(userId: string, password: string): Promise<boolean> {
      const user = await accounts.userById(userId);
      return !!user && verifyPassword(user.passwordHash, password);
    },
  };
}
export type AuthService = ReturnType<typeof authService>;
