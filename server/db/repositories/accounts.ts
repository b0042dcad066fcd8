import { createHash } from 'node:crypto';
import { Op, fn, col, where, type Transaction } from 'sequelize';
import type { Database } from '../index';

/** Plain records of accounts, their sessions and password reset tokens (never ORM instances). */
export type UserRecord = { id: string; email: string; name: string; passwordHash: string };
export type SessionRecord = { id: string; handle: string; createdAt: Date; lastSeenAt: Date; userAgent: string | null; ipAddress: string | null };

/** A session's public handle: a digest of its secret id (the id itself is the bearer credential). */
export const sessionHandle = (id: string) => createHash('sha256').update(id, 'utf8').digest('hex').slice(0, 24);

const userOf = (u: { id: string; email: string; name: string; passwordHash: string }): UserRecord => ({ id: u.id, email: u.email, name: u.name, passwordHash: u.passwordHash });

/** Users, sessions and password resets. */
export function accountsRepository(db: Database) {
  const { User, UserSession, PasswordReset } = db.models;
  return {
    /** E-mail addresses are matched without regard to case (the unique index is on lower(email)). */
    async userByEmail(email: string, transaction?: Transaction): Promise<UserRecord | null> {
      const row = await User.findOne({ where: where(fn('lower', col('email')), email.toLowerCase()), transaction });
      return row ? userOf(row) : null;
    },

    async userById(id: string, transaction?: Transaction): Promise<UserRecord | null> {
      const row = await User.findByPk(id, { transaction });
      return row ? userOf(row) : null;
    },

    async createUser(user: UserRecord, transaction: Transaction): Promise<void> {
      await User.create(user, { transaction });
    },

    async setPasswordHash(userId: string, passwordHash: string, transaction: Transaction): Promise<void> {
      await User.update({ passwordHash }, { where: { id: userId }, transaction });
    },

    /** The user's sessions still in force, newest use first. */
    async sessions(userId: string): Promise<SessionRecord[]> {
      const rows = await UserSession.findAll({ where: { userId, expiresAt: { [Op.gt]: fn('now') } }, order: [['lastSeenAt', 'DESC']] });
      return rows.map((r) => ({ id: r.id, handle: sessionHandle(r.id), createdAt: r.createdAt, lastSeenAt: r.lastSeenAt, userAgent: r.userAgent, ipAddress: r.ipAddress }));
    },

    /** Ends the user's session named by its handle; returns its id, or null when the user has none by that handle. */
    async endSessionByHandle(userId: string, handle: string): Promise<string | null> {
      const rows = await UserSession.findAll({ where: { userId }, attributes: ['id'] });
      const found = rows.find((r) => sessionHandle(r.id) === handle);
      if (!found) return null;
      const count = await UserSession.destroy({ where: { id: found.id, userId } });
      return count ? found.id : null;
    },

    /** Ends every session of the user but `keepId` (when given); returns how many ended. */
    async endSessions(userId: string, opts: { keepId?: string; transaction?: Transaction } = {}): Promise<number> {
      const id = opts.keepId === undefined ? {} : { id: { [Op.ne]: opts.keepId } };
      return UserSession.destroy({ where: { userId, ...id }, transaction: opts.transaction });
    },

    /** The user's sessions take a new id on their next request. */
    async rotateSessions(userId: string, transaction: Transaction): Promise<void> {
      await UserSession.update({ rotate: true }, { where: { userId }, transaction });
    },

    /** Stores a new reset token's hash; the user's earlier unused ones stop working. */
    async replaceResetToken(userId: string, tokenHash: string, lifetimeMs: number, transaction: Transaction): Promise<void> {
      await PasswordReset.destroy({ where: { userId, usedAt: null }, transaction });
      await PasswordReset.create({ tokenHash, userId, expiresAt: new Date(Date.now() + lifetimeMs), usedAt: null }, { transaction });
    },

    /**
     * Spends an unused, unexpired reset token: its row is locked for the rest
     * of the transaction (a second use of the same link waits, then finds it
     * spent). Returns the account it resets, or null.
     */
    async spendResetToken(tokenHash: string, transaction: Transaction): Promise<UserRecord | null> {
      const row = await PasswordReset.findOne({
        where: { tokenHash, usedAt: null, expiresAt: { [Op.gt]: fn('now') } },
        lock: transaction.LOCK.UPDATE,
        transaction,
      });
      if (!row) return null;
      const user = await User.findByPk(row.userId, { transaction });
      if (!user) return null;
      await row.update({ usedAt: new Date() }, { transaction });
      return userOf(user);
    },
  };
}
export type AccountsRepository = ReturnType<typeof accountsRepository>;
