import { DataTypes, type QueryInterface } from 'sequelize';

const timestamps = {
  created_at: { type: DataTypes.DATE, allowNull: false, defaultValue: DataTypes.NOW },
  updated_at: { type: DataTypes.DATE, allowNull: false, defaultValue: DataTypes.NOW },
};

/** Users and sessions (the session table's shape is the one the auth library reads), labs, memberships, invites, machines, materials. */
export async function up(q: QueryInterface): Promise<void> {
  await q.sequelize.transaction(async (transaction) => {
    await q.createTable(
      'users',
      {
        id: { type: DataTypes.TEXT, primaryKey: true },
        email: { type: DataTypes.TEXT, allowNull: false },
        name: { type: DataTypes.TEXT, allowNull: false },
        password_hash: { type: DataTypes.TEXT, allowNull: false },
        ...timestamps,
      },
      { transaction },
    );
    await q.sequelize.query('CREATE UNIQUE INDEX users_email_lower ON users (lower(email))', { transaction });
    await q.createTable(
      'user_sessions',
      {
        id: { type: DataTypes.TEXT, primaryKey: true },
        user_id: { type: DataTypes.TEXT, allowNull: false, references: { model: 'users', key: 'id' }, onDelete: 'CASCADE' },
        expires_at: { type: DataTypes.DATE, allowNull: false },
      },
      { transaction },
    );
    await q.addIndex('user_sessions', ['user_id'], { transaction });
    await q.createTable(
      'labs',
      {
        id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
        name: { type: DataTypes.TEXT, allowNull: false },
        ...timestamps,
      },
      { transaction },
    );
    await q.createTable(
      'memberships',
      {
        lab_id: { type: DataTypes.UUID, primaryKey: true, references: { model: 'labs', key: 'id' }, onDelete: 'CASCADE' },
        user_id: { type: DataTypes.TEXT, primaryKey: true, references: { model: 'users', key: 'id' }, onDelete: 'CASCADE' },
        roles: { type: DataTypes.ARRAY(DataTypes.TEXT), allowNull: false },
        ...timestamps,
      },
      { transaction },
    );
    await q.addIndex('memberships', ['user_id'], { transaction });
    await q.createTable(
      'invites',
      {
        id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
        lab_id: { type: DataTypes.UUID, allowNull: false, references: { model: 'labs', key: 'id' }, onDelete: 'CASCADE' },
        email: { type: DataTypes.TEXT, allowNull: false },
        roles: { type: DataTypes.ARRAY(DataTypes.TEXT), allowNull: false },
        token_hash: { type: DataTypes.TEXT, allowNull: false, unique: true },
        invited_by: { type: DataTypes.TEXT, references: { model: 'users', key: 'id' }, onDelete: 'SET NULL' },
        expires_at: { type: DataTypes.DATE, allowNull: false },
        accepted_at: { type: DataTypes.DATE },
        revoked_at: { type: DataTypes.DATE },
        ...timestamps,
      },
      { transaction },
    );
    await q.addIndex('invites', ['lab_id'], { transaction });
    for (const table of ['machines', 'materials']) {
      await q.createTable(
        table,
        {
          id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
          lab_id: { type: DataTypes.UUID, allowNull: false, references: { model: 'labs', key: 'id' }, onDelete: 'CASCADE' },
          name: { type: DataTypes.TEXT, allowNull: false },
          // The rest of the profile, checked by the shared schema at the boundary.
          profile: { type: DataTypes.JSONB, allowNull: false },
          ...timestamps,
        },
        { transaction },
      );
      await q.addIndex(table, ['lab_id', 'name'], { unique: true, name: `${table}_lab_name`, transaction });
    }
  });
}

export async function down(q: QueryInterface): Promise<void> {
  for (const t of ['materials', 'machines', 'invites', 'memberships', 'labs', 'user_sessions', 'users']) await q.dropTable(t);
}
