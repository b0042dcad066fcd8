import type { Transaction } from 'sequelize';
import type { Database } from '../index';

/** A machine or a material as stored: its name and the rest of its profile (never an ORM instance). */
export type ProfileRecord = { id: string; labId: string; name: string; profile: Record<string, unknown>; createdAt: Date; updatedAt: Date };
export type ProfileTable = 'machines' | 'materials';

/**
 * Machines and materials share one shape, so one repository serves both.
 * Errors from the name's unique index and from plans that keep a profile
 * (foreign keys) reach the caller as Sequelize's constraint errors.
 */
export function profilesRepository(db: Database, table: ProfileTable) {
  const model = table === 'machines' ? db.models.Machine : db.models.Material;
  const plain = (r: ProfileRecord): ProfileRecord => ({ id: r.id, labId: r.labId, name: r.name, profile: r.profile, createdAt: r.createdAt, updatedAt: r.updatedAt });
  return {
    async list(labId: string): Promise<ProfileRecord[]> {
      return (await model.findAll({ where: { labId }, order: [['name', 'ASC']] })).map(plain);
    },
    /** Inside a transaction the row is share-locked: it cannot change or go until the transaction ends. */
    async find(labId: string, id: string, transaction?: Transaction): Promise<ProfileRecord | null> {
      const row = await model.findOne({ where: { id, labId }, transaction, lock: transaction ? transaction.LOCK.SHARE : undefined });
      return row ? plain(row) : null;
    },
    async create(labId: string, name: string, profile: Record<string, unknown>): Promise<ProfileRecord> {
      return plain(await model.create({ labId, name, profile }));
    },
    /** Returns the row as changed, or null when the lab has no such one. */
    async update(labId: string, id: string, name: string, profile: Record<string, unknown>): Promise<ProfileRecord | null> {
      const row = await model.findOne({ where: { id, labId } });
      return row ? plain(await row.update({ name, profile })) : null;
    },
    /** Returns whether there was one to remove. */
    async remove(labId: string, id: string): Promise<boolean> {
      return (await model.destroy({ where: { id, labId } })) > 0;
    },
  };
}
export type ProfilesRepository = ReturnType<typeof profilesRepository>;
