import { DataTypes, type QueryInterface } from 'sequelize';

/**
 * One row per stored file key, locked (SELECT ... FOR UPDATE) by every step
 * that writes or removes that key's object, for the rest of its transaction.
 * A row of its own, because the file's row may not exist yet.
 */
export async function up(q: QueryInterface): Promise<void> {
  await q.createTable('file_key_locks', { key: { type: DataTypes.TEXT, primaryKey: true } });
}

export async function down(q: QueryInterface): Promise<void> {
  await q.dropTable('file_key_locks');
}
