import type { MeshMetrics } from '../../../shared/geometry/metrics';
import type { UserRow } from './accounts';
import { DataTypes, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Model, type NonAttribute, type Sequelize } from 'sequelize';

/** A stored file's bytes (or where they are), shared by every part cut from it. */
export interface StoredFileRow extends Model<InferAttributes<StoredFileRow>, InferCreationAttributes<StoredFileRow>> {
  key: string;
  /** BIGINT: the driver gives it as a string. */
  sizeBytes: string | number;
  location: string;
  data: Buffer | null;
  refCount: CreationOptional<number>;
  createdAt: CreationOptional<Date>;
}

export interface PartRow extends Model<InferAttributes<PartRow>, InferCreationAttributes<PartRow>> {
  id: CreationOptional<string>;
  labId: string;
  name: string;
  tags: CreationOptional<string[]>;
  fileKey: string;
  fileName: string;
  fileFormat: string;
  fileUnit: string;
  fileSplit: boolean;
  filePartIndex: number;
  uploadedSizeMm: number[];
  rotationDeg: CreationOptional<number[]>;
  sizeXMm: number;
  sizeYMm: number;
  sizeZMm: number;
  volumeMm3: number;
  areaMm2: number;
  triangles: number;
  watertight: boolean;
  /** Older rows may lack fields measured since. */
  metrics: Partial<MeshMetrics>;
  warnings: CreationOptional<unknown[]>;
  orientation: CreationOptional<string>;
  defaultMaterialId: CreationOptional<string | null>;
  uploadedBy: string | null;
  /** The file's revision: 1 for the first file, then one more for each new file of the part. */
  revision: CreationOptional<number>;
  /** The part's first revision (null on the first itself). */
  firstRevisionId: CreationOptional<string | null>;
  /** The next revision, once a newer file was added. */
  supersededBy: CreationOptional<string | null>;
  createdAt: CreationOptional<Date>;
  updatedAt: CreationOptional<Date>;
  uploader?: NonAttribute<UserRow | null>;
}

/** A part's picture, drawn once per stored file and view. */
export interface PartThumbnailRow extends Model<InferAttributes<PartThumbnailRow>, InferCreationAttributes<PartThumbnailRow>> {
  fileKey: string;
  view: string;
  png: Buffer;
  createdAt: CreationOptional<Date>;
}

export interface RequestRow extends Model<InferAttributes<RequestRow>, InferCreationAttributes<RequestRow>> {
  id: CreationOptional<string>;
  labId: string;
  title: string;
  materialId: string | null;
  dueDate: string;
  priority: CreationOptional<string>;
  notes: CreationOptional<string>;
  status: CreationOptional<string>;
  createdBy: string | null;
  createdAt: CreationOptional<Date>;
  updatedAt: CreationOptional<Date>;
  lines?: NonAttribute<RequestLineRow[]>;
  creator?: NonAttribute<UserRow | null>;
}

export interface RequestLineRow extends Model<InferAttributes<RequestLineRow>, InferCreationAttributes<RequestLineRow>> {
  id: CreationOptional<string>;
  requestId: string;
  partId: string;
  position: number;
  quantity: number;
  plannedCount: CreationOptional<number>;
  printedCount: CreationOptional<number>;
  createdAt: CreationOptional<Date>;
  updatedAt: CreationOptional<Date>;
  part?: NonAttribute<PartRow>;
  request?: NonAttribute<RequestRow>;
}

const stamps = {
  createdAt: { type: DataTypes.DATE, allowNull: false, field: 'created_at' },
  updatedAt: { type: DataTypes.DATE, allowNull: false, field: 'updated_at' },
} as const;
const timed = { underscored: true, timestamps: true, createdAt: 'createdAt', updatedAt: 'updatedAt' } as const;

/** Stored files, parts and their pictures, requests and request lines. */
export function partModels(sequelize: Sequelize) {
  const StoredFile = sequelize.define<StoredFileRow>(
    'StoredFile',
    {
      key: { type: DataTypes.TEXT, primaryKey: true },
      sizeBytes: { type: DataTypes.BIGINT, allowNull: false, field: 'size_bytes' },
      location: { type: DataTypes.TEXT, allowNull: false },
      data: { type: DataTypes.BLOB },
      refCount: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0, field: 'ref_count' },
      createdAt: stamps.createdAt,
    },
    { ...timed, updatedAt: false, tableName: 'files' },
  );
  const Part = sequelize.define<PartRow>(
    'Part',
    {
      id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
      labId: { type: DataTypes.UUID, allowNull: false, field: 'lab_id' },
      name: { type: DataTypes.TEXT, allowNull: false },
      tags: { type: DataTypes.ARRAY(DataTypes.TEXT), allowNull: false, defaultValue: [] },
      fileKey: { type: DataTypes.TEXT, allowNull: false, field: 'file_key' },
      fileName: { type: DataTypes.TEXT, allowNull: false, field: 'file_name' },
      fileFormat: { type: DataTypes.TEXT, allowNull: false, field: 'file_format' },
      fileUnit: { type: DataTypes.TEXT, allowNull: false, field: 'file_unit' },
      fileSplit: { type: DataTypes.BOOLEAN, allowNull: false, field: 'file_split' },
      filePartIndex: { type: DataTypes.INTEGER, allowNull: false, field: 'file_part_index' },
      uploadedSizeMm: { type: DataTypes.ARRAY(DataTypes.DOUBLE), allowNull: false, field: 'uploaded_size_mm' },
      rotationDeg: { type: DataTypes.ARRAY(DataTypes.INTEGER), allowNull: false, defaultValue: [0, 0, 0], field: 'rotation_deg' },
      sizeXMm: { type: DataTypes.DOUBLE, allowNull: false, field: 'size_x_mm' },
      sizeYMm: { type: DataTypes.DOUBLE, allowNull: false, field: 'size_y_mm' },
      sizeZMm: { type: DataTypes.DOUBLE, allowNull: false, field: 'size_z_mm' },
      volumeMm3: { type: DataTypes.DOUBLE, allowNull: false, field: 'volume_mm3' },
      areaMm2: { type: DataTypes.DOUBLE, allowNull: false, field: 'area_mm2' },
      triangles: { type: DataTypes.INTEGER, allowNull: false },
      watertight: { type: DataTypes.BOOLEAN, allowNull: false },
      metrics: { type: DataTypes.JSONB, allowNull: false },
      warnings: { type: DataTypes.JSONB, allowNull: false, defaultValue: [] },
      orientation: { type: DataTypes.TEXT, allowNull: false, defaultValue: 'any' },
      defaultMaterialId: { type: DataTypes.UUID, field: 'default_material_id' },
      uploadedBy: { type: DataTypes.TEXT, field: 'uploaded_by' },
      revision: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 1 },
      firstRevisionId: { type: DataTypes.UUID, field: 'first_revision_id' },
      supersededBy: { type: DataTypes.UUID, field: 'superseded_by' },
      ...stamps,
    },
    { ...timed, tableName: 'parts' },
  );
  const PartThumbnail = sequelize.define<PartThumbnailRow>(
    'PartThumbnail',
    {
      fileKey: { type: DataTypes.TEXT, primaryKey: true, field: 'file_key' },
      view: { type: DataTypes.TEXT, primaryKey: true },
      png: { type: DataTypes.BLOB, allowNull: false },
      createdAt: stamps.createdAt,
    },
    { ...timed, updatedAt: false, tableName: 'part_thumbnails' },
  );
  const Request = sequelize.define<RequestRow>(
    'Request',
    {
      id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
      labId: { type: DataTypes.UUID, allowNull: false, field: 'lab_id' },
      title: { type: DataTypes.TEXT, allowNull: false },
      materialId: { type: DataTypes.UUID, field: 'material_id' },
      dueDate: { type: DataTypes.DATEONLY, allowNull: false, field: 'due_date' },
      priority: { type: DataTypes.TEXT, allowNull: false, defaultValue: 'normal' },
      notes: { type: DataTypes.TEXT, allowNull: false, defaultValue: '' },
      status: { type: DataTypes.TEXT, allowNull: false, defaultValue: 'open' },
      createdBy: { type: DataTypes.TEXT, field: 'created_by' },
      ...stamps,
    },
    { ...timed, tableName: 'requests' },
  );
  const RequestLine = sequelize.define<RequestLineRow>(
    'RequestLine',
    {
      id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
      requestId: { type: DataTypes.UUID, allowNull: false, field: 'request_id' },
      partId: { type: DataTypes.UUID, allowNull: false, field: 'part_id' },
      position: { type: DataTypes.INTEGER, allowNull: false },
      quantity: { type: DataTypes.INTEGER, allowNull: false },
      plannedCount: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0, field: 'planned_count' },
      printedCount: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0, field: 'printed_count' },
      ...stamps,
    },
    { ...timed, tableName: 'request_lines' },
  );

  Part.belongsTo(StoredFile, { foreignKey: 'fileKey', targetKey: 'key', as: 'file' });
  PartThumbnail.belongsTo(StoredFile, { foreignKey: 'fileKey', targetKey: 'key', as: 'file' });
  Request.hasMany(RequestLine, { foreignKey: 'requestId', as: 'lines' });
  RequestLine.belongsTo(Request, { foreignKey: 'requestId', as: 'request' });
  RequestLine.belongsTo(Part, { foreignKey: 'partId', as: 'part' });
  return { StoredFile, Part, PartThumbnail, Request, RequestLine };
}
