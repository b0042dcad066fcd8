import { Sequelize, type QueryInterface } from 'sequelize';
import { Umzug, SequelizeStorage } from 'umzug';
import { migrations } from './migrations';
import { initModels, type Models } from './models';
import { stampTransactions } from '../audit/actor';

export type Database = { sequelize: Sequelize; models: Models; close(): Promise<void> };

/** One Sequelize instance per process; models are plain definitions on it. */
export function connectDatabase(databaseUrl: string, opts: { logging?: boolean } = {}): Database {
  const sequelize = new Sequelize(databaseUrl, {
    dialect: 'postgres',
    logging: opts.logging ? console.log : false,
    pool: { max: 10, min: 0, idle: 10_000, acquire: 10_000 },
    dialectOptions: { connectionTimeoutMillis: 5_000 },
  });
  const models = initModels(sequelize);
  // Every transaction names who acts, for the audit log's triggers.
  stampTransactions(sequelize);
  return { sequelize, models, close: () => sequelize.close() };
}

export function migrator(sequelize: Sequelize) {
  return new Umzug<QueryInterface>({
    migrations: migrations.map((m) => ({
      name: m.name,
      up: ({ context }: { context: QueryInterface }) => m.up(context),
      down: ({ context }: { context: QueryInterface }) => m.down(context),
    })),
    context: sequelize.getQueryInterface(),
    storage: new SequelizeStorage({ sequelize, tableName: 'schema_migrations' }),
    logger: undefined,
  });
}

/** Applies every pending migration; returns the names applied. */
export async function migrate(sequelize: Sequelize): Promise<string[]> {
  const applied = await migrator(sequelize).up();
  return applied.map((m) => m.name);
}
