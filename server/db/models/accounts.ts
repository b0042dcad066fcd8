import { DataTypes, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Model, type NonAttribute, type Sequelize } from 'sequelize';

/** A row of `users`. */
export interface UserRow extends Model<InferAttributes<UserRow>, InferCreationAttributes<UserRow>> {
  id: string;
  email: string;
  name: string;
  passwordHash: string;
  createdAt: CreationOptional<Date>;
  updatedAt: CreationOptional<Date>;
}

/** A row of `user_sessions` (its shape is the one the session library reads). */
export interface UserSessionRow extends Model<InferAttributes<UserSessionRow>, InferCreationAttributes<UserSessionRow>> {
  id: string;
  userId: string;
  expiresAt: Date;
  createdAt: CreationOptional<Date>;
  lastSeenAt: CreationOptional<Date>;
  userAgent: string | null;
  ipAddress: string | null;
  rotate: CreationOptional<boolean>;
}

/** A row of `password_resets`: a mailed token, stored as its hash. */
export interface PasswordResetRow extends Model<InferAttributes<PasswordResetRow>, InferCreationAttributes<PasswordResetRow>> {
  tokenHash: string;
  userId: string;
  expiresAt: Date;
  usedAt: Date | null;
  createdAt: CreationOptional<Date>;
  user?: NonAttribute<UserRow>;
}

export interface LabRow extends Model<InferAttributes<LabRow>, InferCreationAttributes<LabRow>> {
  id: CreationOptional<string>;
  name: string;
  /** NULL: the default (on when the lab has more than one lead). */
  secondApproval: CreationOptional<boolean | null>;
  currency: CreationOptional<string>;
  /** Below this packing density a plan is flagged at review; 0 turns the flag off. */
  minPackingDensityPercent: CreationOptional<number>;
  createdAt: CreationOptional<Date>;
  updatedAt: CreationOptional<Date>;
}

export interface MembershipRow extends Model<InferAttributes<MembershipRow>, InferCreationAttributes<MembershipRow>> {
  labId: string;
  userId: string;
  roles: string[];
  createdAt: CreationOptional<Date>;
  updatedAt: CreationOptional<Date>;
  user?: NonAttribute<UserRow>;
  lab?: NonAttribute<LabRow>;
}

export interface InviteRow extends Model<InferAttributes<InviteRow>, InferCreationAttributes<InviteRow>> {
  id: CreationOptional<string>;
  labId: string;
  email: string;
  roles: string[];
  tokenHash: string;
  invitedBy: string | null;
  expiresAt: Date;
  acceptedAt: CreationOptional<Date | null>;
  revokedAt: CreationOptional<Date | null>;
  createdAt: CreationOptional<Date>;
  updatedAt: CreationOptional<Date>;
  lab?: NonAttribute<LabRow>;
}

/** A machine or a material: a name unique in the lab and its profile (checked by the shared schemas). */
export interface ProfileRow extends Model<InferAttributes<ProfileRow>, InferCreationAttributes<ProfileRow>> {
  id: CreationOptional<string>;
  labId: string;
  name: string;
  profile: Record<string, unknown>;
  createdAt: CreationOptional<Date>;
  updatedAt: CreationOptional<Date>;
}

/** A row of the append-only `audit_log` (lab rows are written by triggers; account events by the audit repository). */
export interface AuditEntryRow extends Model<InferAttributes<AuditEntryRow>, InferCreationAttributes<AuditEntryRow>> {
  id: CreationOptional<string>;
  labId: string | null;
  at: CreationOptional<Date>;
  actorId: string | null;
  kind: string;
  action: string;
  targetId: string | null;
  targetLabel: string | null;
  before: Record<string, unknown> | null;
  after: Record<string, unknown> | null;
  actor?: NonAttribute<UserRow>;
}

const stamps = {
  createdAt: { type: DataTypes.DATE, allowNull: false, field: 'created_at' },
  updatedAt: { type: DataTypes.DATE, allowNull: false, field: 'updated_at' },
} as const;
const timed = { underscored: true, timestamps: true, createdAt: 'createdAt', updatedAt: 'updatedAt' } as const;
const untimed = { underscored: true, timestamps: false } as const;

/** Accounts, labs, their members, invites, machines, materials and the audit log. */
export function accountModels(sequelize: Sequelize) {
  const User = sequelize.define<UserRow>(
    'User',
    {
      id: { type: DataTypes.TEXT, primaryKey: true },
      email: { type: DataTypes.TEXT, allowNull: false },
      name: { type: DataTypes.TEXT, allowNull: false },
      passwordHash: { type: DataTypes.TEXT, allowNull: false, field: 'password_hash' },
      ...stamps,
    },
    { ...timed, tableName: 'users' },
  );
  const UserSession = sequelize.define<UserSessionRow>(
    'UserSession',
    {
      id: { type: DataTypes.TEXT, primaryKey: true },
      userId: { type: DataTypes.TEXT, allowNull: false, field: 'user_id' },
      expiresAt: { type: DataTypes.DATE, allowNull: false, field: 'expires_at' },
      createdAt: { type: DataTypes.DATE, allowNull: false, field: 'created_at', defaultValue: DataTypes.NOW },
      lastSeenAt: { type: DataTypes.DATE, allowNull: false, field: 'last_seen_at', defaultValue: DataTypes.NOW },
      userAgent: { type: DataTypes.TEXT, field: 'user_agent' },
      ipAddress: { type: DataTypes.TEXT, field: 'ip_address' },
      rotate: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
    },
    { ...untimed, tableName: 'user_sessions' },
  );
  const PasswordReset = sequelize.define<PasswordResetRow>(
    'PasswordReset',
    {
      tokenHash: { type: DataTypes.TEXT, primaryKey: true, field: 'token_hash' },
      userId: { type: DataTypes.TEXT, allowNull: false, field: 'user_id' },
      expiresAt: { type: DataTypes.DATE, allowNull: false, field: 'expires_at' },
      usedAt: { type: DataTypes.DATE, field: 'used_at' },
      createdAt: { type: DataTypes.DATE, allowNull: false, field: 'created_at' },
    },
    { ...timed, updatedAt: false, tableName: 'password_resets' },
  );
  const Lab = sequelize.define<LabRow>(
    'Lab',
    {
      id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
      name: { type: DataTypes.TEXT, allowNull: false },
      secondApproval: { type: DataTypes.BOOLEAN, field: 'second_approval' },
      currency: { type: DataTypes.CHAR(3), allowNull: false, defaultValue: 'EUR' },
      minPackingDensityPercent: { type: DataTypes.REAL, allowNull: false, defaultValue: 8, field: 'min_packing_density_percent' },
      ...stamps,
    },
    { ...timed, tableName: 'labs' },
  );
  const Membership = sequelize.define<MembershipRow>(
    'Membership',
    {
      labId: { type: DataTypes.UUID, primaryKey: true, field: 'lab_id' },
      userId: { type: DataTypes.TEXT, primaryKey: true, field: 'user_id' },
      roles: { type: DataTypes.ARRAY(DataTypes.TEXT), allowNull: false },
      ...stamps,
    },
    { ...timed, tableName: 'memberships' },
  );
  const Invite = sequelize.define<InviteRow>(
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
      ...stamps,
    },
    { ...timed, tableName: 'invites' },
  );
  const profileTable = (name: string, tableName: string) =>
    sequelize.define<ProfileRow>(
      name,
      {
        id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
        labId: { type: DataTypes.UUID, allowNull: false, field: 'lab_id' },
        name: { type: DataTypes.TEXT, allowNull: false },
        profile: { type: DataTypes.JSONB, allowNull: false },
        ...stamps,
      },
      { ...timed, tableName },
    );
  const Machine = profileTable('Machine', 'machines');
  const Material = profileTable('Material', 'materials');
  const AuditEntry = sequelize.define<AuditEntryRow>(
    'AuditEntry',
    {
      id: { type: DataTypes.BIGINT, primaryKey: true, autoIncrement: true },
      labId: { type: DataTypes.UUID, field: 'lab_id' },
      at: { type: DataTypes.DATE, allowNull: false },
      actorId: { type: DataTypes.TEXT, field: 'actor_id' },
      kind: { type: DataTypes.TEXT, allowNull: false },
      action: { type: DataTypes.TEXT, allowNull: false },
      targetId: { type: DataTypes.TEXT, field: 'target_id' },
      targetLabel: { type: DataTypes.TEXT, field: 'target_label' },
      before: { type: DataTypes.JSONB },
      after: { type: DataTypes.JSONB },
    },
    { ...untimed, tableName: 'audit_log' },
  );

  User.hasMany(UserSession, { foreignKey: 'userId', as: 'sessions' });
  UserSession.belongsTo(User, { foreignKey: 'userId', as: 'user' });
  PasswordReset.belongsTo(User, { foreignKey: 'userId', as: 'user' });
  Membership.belongsTo(User, { foreignKey: 'userId', as: 'user' });
  Membership.belongsTo(Lab, { foreignKey: 'labId', as: 'lab' });
  Lab.hasMany(Membership, { foreignKey: 'labId', as: 'memberships' });
  Invite.belongsTo(Lab, { foreignKey: 'labId', as: 'lab' });
  AuditEntry.belongsTo(User, { foreignKey: 'actorId', as: 'actor', constraints: false });
  return { User, UserSession, PasswordReset, Lab, Membership, Invite, Machine, Material, AuditEntry };
}
