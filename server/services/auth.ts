import { generateIdFromEntropySize } from 'lucia';
import type { Database } from '../db';
import { AppError, conflict } from '../errors';
import { dummyHash, hashPassword, verifyPassword } from '../auth/password';
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

    async checkPassword(userId: string, password: string): Promise<boolean> {
      const user: any = await User.findByPk(userId, { raw: true });
      return !!user && verifyPassword(user.passwordHash ?? user.password_hash, password);
    },
  };
}
export type AuthService = ReturnType<typeof authService>;
