import { DataTypes, type ModelStatic, type Model, type Sequelize } from 'sequelize';
import { planModels, type PlanModels } from './plans';
import { runModels, type RunModels } from './runs';
import { powderModels, type PowderModels } from './powder';

type AnyModel = ModelStatic<Model<any, any>>;
export type Models = {
  User: AnyModel;
  Lab: AnyModel;
  Membership: AnyModel;
  Invite: AnyModel;
  Machine: AnyModel;
  Material: AnyModel;
  StoredFile: AnyModel;
  Part: AnyModel;
  Request: AnyModel;
  RequestLine: AnyModel;
} & PlanModels &
  RunModels &
  PowderModels;

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
  return { User, Lab, Membership, Invite, Machine, Material, ...partModels(sequelize), ...planModels(sequelize), ...runModels(sequelize), ...powderModels(sequelize) };
}

/** Stored files, parts, requests and request lines. */
function partModels(sequelize: Sequelize) {
  const StoredFile = sequelize.define(
    'StoredFile',
    {
      key: { type: DataTypes.TEXT, primaryKey: true },
      sizeBytes: { type: DataTypes.BIGINT, allowNull: false, field: 'size_bytes' },
      location: { type: DataTypes.TEXT, allowNull: false },
      data: { type: DataTypes.BLOB },
      refCount: { type: DataTypes.INTEGER, allowNull: false, field: 'ref_count' },
    },
    { ...base, updatedAt: false, tableName: 'files' },
  );
  const Part = sequelize.define(
    'Part',
    {
      id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
      labId: { type: DataTypes.UUID, allowNull: false, field: 'lab_id' },
      name: { type: DataTypes.TEXT, allowNull: false },
      tags: { type: DataTypes.ARRAY(DataTypes.TEXT), allowNull: false },
      fileKey: { type: DataTypes.TEXT, allowNull: false, field: 'file_key' },
      fileName: { type: DataTypes.TEXT, allowNull: false, field: 'file_name' },
      fileFormat: { type: DataTypes.TEXT, allowNull: false, field: 'file_format' },
      fileUnit: { type: DataTypes.TEXT, allowNull: false, field: 'file_unit' },
      fileSplit: { type: DataTypes.BOOLEAN, allowNull: false, field: 'file_split' },
      filePartIndex: { type: DataTypes.INTEGER, allowNull: false, field: 'file_part_index' },
      uploadedSizeMm: { type: DataTypes.ARRAY(DataTypes.DOUBLE), allowNull: false, field: 'uploaded_size_mm' },
      rotationDeg: { type: DataTypes.ARRAY(DataTypes.INTEGER), allowNull: false, field: 'rotation_deg' },
      sizeXMm: { type: DataTypes.DOUBLE, allowNull: false, field: 'size_x_mm' },
      sizeYMm: { type: DataTypes.DOUBLE, allowNull: false, field: 'size_y_mm' },
      sizeZMm: { type: DataTypes.DOUBLE, allowNull: false, field: 'size_z_mm' },
      volumeMm3: { type: DataTypes.DOUBLE, allowNull: false, field: 'volume_mm3' },
      areaMm2: { type: DataTypes.DOUBLE, allowNull: false, field: 'area_mm2' },
      triangles: { type: DataTypes.INTEGER, allowNull: false },
      watertight: { type: DataTypes.BOOLEAN, allowNull: false },
      metrics: { type: DataTypes.JSONB, allowNull: false },
      warnings: { type: DataTypes.JSONB, allowNull: false },
      orientation: { type: DataTypes.TEXT, allowNull: false },
      defaultMaterialId: { type: DataTypes.UUID, field: 'default_material_id' },
      uploadedBy: { type: DataTypes.TEXT, field: 'uploaded_by' },
    },
    { ...base, tableName: 'parts' },
  );
  const Request = sequelize.define(
    'Request',
    {
      id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
      labId: { type: DataTypes.UUID, allowNull: false, field: 'lab_id' },
      title: { type: DataTypes.TEXT, allowNull: false },
      materialId: { type: DataTypes.UUID, field: 'material_id' },
      dueDate: { type: DataTypes.DATEONLY, allowNull: false, field: 'due_date' },
      priority: { type: DataTypes.TEXT, allowNull: false },
      notes: { type: DataTypes.TEXT, allowNull: false },
      status: { type: DataTypes.TEXT, allowNull: false },
      createdBy: { type: DataTypes.TEXT, field: 'created_by' },
    },
    { ...base, tableName: 'requests' },
  );
  const RequestLine = sequelize.define(
    'RequestLine',
    {
      id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
      requestId: { type: DataTypes.UUID, allowNull: false, field: 'request_id' },
      partId: { type: DataTypes.UUID, allowNull: false, field: 'part_id' },
      position: { type: DataTypes.INTEGER, allowNull: false },
      quantity: { type: DataTypes.INTEGER, allowNull: false },
      plannedCount: { type: DataTypes.INTEGER, allowNull: false, field: 'planned_count' },
      printedCount: { type: DataTypes.INTEGER, allowNull: false, field: 'printed_count' },
    },
    { ...base, tableName: 'request_lines' },
  );
  return { StoredFile, Part, Request, RequestLine };
}
