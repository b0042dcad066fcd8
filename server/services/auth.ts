import { generateIdFromEntropySize } from 'lucia';
import type { Database } from '../db';
import { AppError, conflict } from '../errors';
import { dummyHash, hashPassword, verifyPassword } from '../auth/password';
import { assertStrongPassword } from '../auth/policy';
import type { SignInInput, SignUpInput } from '../../shared/schemas/auth';
import type { LabsService } from './labs';
import type { Transaction } from 'sequelize';
import { fn, col, where } from 'sequelize';

const WRONG = 'That e-mail and password do not match an account.';

export function authService(db: Database, labs: LabsService) {
  const { User } = db.models;

  async function findByEmail(email: string, t?: Transaction): Promise<any | null> {
    return User.findOne({ where: where(fn('lower', col('email')), email.toLowerCase()), transaction: t, raw: true });
  }

  async function createUser(input: { email: string; name: string; password: string }, t: Transaction): Promise<string> {
    assertStrongPassword(input.password, { email: input.email, name: input.name });
    if (await findByEmail(input.email, t)) throw conflict('email_taken', 'An account with that e-mail already exists.', 'email');
    const id = generateIdFromEntropySize(10);
    try {
      await User.create({ id, email: input.email, name: input.name, passwordHash: await hashPassword(input.password) }, { transaction: t });
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
      if (!(await verifyPassword(user.password_hash ?? user.passwordHash, input.password))) {
        throw new AppError(401, 'unauthenticated', WRONG);
      }
      return user.id;
    },

    /**
     * Changes a password: the current one proves it is the owner, the new one
     * passes the policy, and every other session of the account ends (a
     * thief's included); the session that asked stays signed in.
     */
    async changePassword(userId: string, keepSessionId: string, input: { currentPassword: string; newPassword: string }): Promise<void> {
      const user: any = await User.findByPk(userId, { raw: true });
      if (!user || !(await verifyPassword(user.passwordHash ?? user.password_hash, input.currentPassword))) {
        throw new AppError(400, 'wrong_password', 'currentPassword is not your current password.', 'currentPassword');
      }
      assertStrongPassword(input.newPassword, { email: user.email, name: user.name }, 'newPassword');
      const hash = await hashPassword(input.newPassword);
      await db.sequelize.transaction(async (t) => {
        await User.update({ passwordHash: hash }, { where: { id: userId }, transaction: t });
        await db.sequelize.query('DELETE FROM user_sessions WHERE user_id = $1 AND id <> $2', { bind: [userId, keepSessionId], transaction: t });
      });
    },

    async checkPassword(userId: string, password: string): Promise<boolean> {
      const user: any = await User.findByPk(userId, { raw: true });
      return !!user && verifyPassword(user.passwordHash ?? user.password_hash, password);
    },
  };
}
export type AuthService = ReturnType<typeof authService>;
