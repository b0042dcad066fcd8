/**
 * The models are a second description of the tables, beside the migrations.
 * A model that names a column the database does not have fails its query at
 * run time; one that leaves a column out cannot read it. This test compares
 * each model with the migrated test database (information_schema): the same
 * columns, the same types, the same NOT NULLs, the same primary key.
 */
import { QueryTypes, type ModelStatic, type Model } from 'sequelize';
import { connectDatabase, type Database } from '../../server/db';

/** Tables no model describes, each with its reason. */
const WITHOUT_MODEL: Record<string, string> = {
  schema_migrations: 'the migrator keeps it',
  file_key_locks: 'only ever locked by key (SELECT ... FOR UPDATE) in the file store',
  rate_limit_hits: "the rate limiter's counter store, one upsert",
};

/** Sequelize's type key and PostgreSQL's data_type, for every type the models use. */
const PG_TYPE: Record<string, string> = {
  TEXT: 'text',
  UUID: 'uuid',
  INTEGER: 'integer',
  BIGINT: 'bigint',
  DOUBLE: 'double precision',
  'DOUBLE PRECISION': 'double precision',
  REAL: 'real',
  BOOLEAN: 'boolean',
  JSONB: 'jsonb',
  DATE: 'timestamp with time zone',
  DATEONLY: 'date',
  BLOB: 'bytea',
  ARRAY: 'ARRAY',
  CHAR: 'character',
};

type Column = { table_name: string; column_name: string; data_type: string; is_nullable: 'YES' | 'NO' };

let db: Database;
let columns: Column[];
let primaryKeys: Array<{ table_name: string; column_name: string }>;
beforeAll(async () => {
  if (!process.env.DATABASE_URL) throw new Error('DATABASE_URL is not set: run the suite with `npm test`');
  db = connectDatabase(process.env.DATABASE_URL);
  columns = await db.sequelize.query<Column>(
    "SELECT table_name, column_name, data_type, is_nullable FROM information_schema.columns WHERE table_schema = 'public'",
    { type: QueryTypes.SELECT },
  );
  primaryKeys = await db.sequelize.query(
    `SELECT k.table_name, k.column_name FROM information_schema.table_constraints c
       JOIN information_schema.key_column_usage k ON k.constraint_name = c.constraint_name AND k.table_schema = c.table_schema
      WHERE c.table_schema = 'public' AND c.constraint_type = 'PRIMARY KEY'`,
    { type: QueryTypes.SELECT },
  );
});
afterAll(() => db.close());

const models = () => Object.values(db.models) as Array<ModelStatic<Model>>;

test('every table of the database has a model, or a reason to have none', () => {
  const modelled = new Set(models().map((m) => m.getTableName() as string));
  const tables = [...new Set(columns.map((c) => c.table_name))].sort();
  expect(tables.filter((t) => !modelled.has(t) && !(t in WITHOUT_MODEL))).toEqual([]);
  expect([...modelled].filter((t) => !tables.includes(t))).toEqual([]);
});

test("each model has exactly its table's columns, with their types, NOT NULLs and primary key", () => {
  const problems: string[] = [];
  for (const model of models()) {
    const table = model.getTableName() as string;
    const dbColumns = new Map(columns.filter((c) => c.table_name === table).map((c) => [c.column_name, c]));
    const attributes = Object.values(model.getAttributes());
    const fields = new Set(attributes.map((a) => a.field ?? ''));
    for (const name of dbColumns.keys()) if (!fields.has(name)) problems.push(`${table}.${name}: no attribute of ${model.name}`);
    for (const a of attributes) {
      const column = dbColumns.get(a.field ?? '');
      if (!column) {
        problems.push(`${table}.${a.field}: ${model.name} has it, the table does not`);
        continue;
      }
      const key = (a.type as unknown as { key: string }).key;
      if (PG_TYPE[key] !== column.data_type) problems.push(`${table}.${a.field}: ${model.name} says ${key}, the table ${column.data_type}`);
      const notNull = a.allowNull === false || a.primaryKey === true;
      if (notNull !== (column.is_nullable === 'NO')) problems.push(`${table}.${a.field}: ${model.name} ${notNull ? 'refuses' : 'allows'} NULL, the table does the other`);
    }
    const modelKey = attributes.filter((a) => a.primaryKey).map((a) => a.field).sort();
    const tableKey = primaryKeys.filter((k) => k.table_name === table).map((k) => k.column_name).sort();
    if (modelKey.join() !== tableKey.join()) problems.push(`${table}: primary key (${modelKey}) in ${model.name}, (${tableKey}) in the table`);
  }
  expect(problems).toEqual([]);
});
