import { DataTypes, type ModelStatic, type Model, type Sequelize } from 'sequelize';

type AnyModel = ModelStatic<Model<any, any>>;
export type Models = {
  User: AnyModel;
  Lab: AnyModel;
  Membership: AnyModel;
  Invite: AnyModel;
  Machine: AnyModel;
  Material: AnyModel;
};

const base = { underscored: true, timestamps: true, createdAt: 'created_at', updatedAt: 'updated_at' } as const;

/**
 * The tables as Sequelize models. The schema itself comes only from
 * migrations; these definitions never call sync().
 */
export function initModels(sequelize: Sequelize): Models {
  const User = sequelize.define(
    'User',
    {
      id: { type: DataTypes.TEXT, primaryKey: true },
      email: { type: DataTypes.TEXT, allowNull: false },
      name: { type: DataTypes.TEXT, allowNull: false },
      passwordHash: { type: DataTypes.TEXT, allowNull: false, field: 'password_hash' },
    },
    { ...base, tableName: 'users' },
  );
  const Lab = sequelize.define(
    'Lab',
    {
      id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
      name: { type: DataTypes.TEXT, allowNull: false },
    },
    { ...base, tableName: 'labs' },
  );
  const Membership = sequelize.define(
    'Membership',
    {
      labId: { type: DataTypes.UUID, primaryKey: true, field: 'lab_id' },
      userId: { type: DataTypes.TEXT, primaryKey: true, field: 'user_id' },
      roles: { type: DataTypes.ARRAY(DataTypes.TEXT), allowNull: false },
    },
    { ...base, tableName: 'memberships' },
  );
  const Invite = sequelize.define(
    'Invite',
    {
      id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
      labId: { type: DataTypes.UUID, allowNull: false, field: 'lab_id' },
      email: { type: DataTypes.TEXT, allowNull: false },
      roles: { type: DataTypes.ARRAY(DataTypes.TEXT), allowNull: false },
      tokenHash: { type: DataTypes.TEXT, allowNull: false, field: 'token_hash' },
      invitedBy: { type: DataTypes.TEXT, field: 'invited_by' },
      expiresAt: { type: DataTypes.DATE, allowNull: false, field: 'expires_at' },
      acceptedAt: { type: DataTypes.DATE, field: 'accepted_at' },
      revokedAt: { type: DataTypes.DATE, field: 'revoked_at' },
    },
    { ...base, tableName: 'invites' },
  );
  const profileTable = (name: string, tableName: string) =>
    sequelize.define(
      name,
      {
        id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
        labId: { type: DataTypes.UUID, allowNull: false, field: 'lab_id' },
        name: { type: DataTypes.TEXT, allowNull: false },
        profile: { type: DataTypes.JSONB, allowNull: false },
      },
      { ...base, tableName },
    );
  const Machine = profileTable('Machine', 'machines');
  const Material = profileTable('Material', 'materials');

  Membership.belongsTo(User, { foreignKey: 'userId', as: 'user' });
  Membership.belongsTo(Lab, { foreignKey: 'labId', as: 'lab' });
  return { User, Lab, Membership, Invite, Machine, Material };
}
