import { DataTypes, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Model, type NonAttribute, type Sequelize } from 'sequelize';
import type { PlanStatus } from '../../../shared/plans/status';
import type { RequestLineRow } from './parts';
import type { ProfileRow, UserRow } from './accounts';
import type { RunRow } from './runs';

export interface PlanRow extends Model<InferAttributes<PlanRow>, InferCreationAttributes<PlanRow>> {
  id: CreationOptional<string>;
  labId: string;
  name: string;
  machineId: string;
  materialId: string;
  status: CreationOptional<PlanStatus>;
  version: CreationOptional<number>;
  chosenLayoutId: CreationOptional<string | null>;
  queuePosition: CreationOptional<number | null>;
  draft: CreationOptional<unknown>;
  createdBy: string | null;
  createdAt: CreationOptional<Date>;
  updatedAt: CreationOptional<Date>;
  lines?: NonAttribute<PlanLineRow[]>;
  machine?: NonAttribute<ProfileRow | null>;
  material?: NonAttribute<ProfileRow | null>;
  chosenLayout?: NonAttribute<LayoutRow | null>;
  run?: NonAttribute<RunRow | null>;
  creator?: NonAttribute<UserRow | null>;
}

export interface PlanLineRow extends Model<InferAttributes<PlanLineRow>, InferCreationAttributes<PlanLineRow>> {
  requestLine?: NonAttribute<RequestLineRow>;
  plan?: NonAttribute<PlanRow>;
  id: CreationOptional<string>;
  planId: string;
  requestLineId: string;
  position: number;
  quantity: number;
  orientation: CreationOptional<string | null>;
  createdAt: CreationOptional<Date>;
  updatedAt: CreationOptional<Date>;
}

export interface LayoutRow extends Model<InferAttributes<LayoutRow>, InferCreationAttributes<LayoutRow>> {
  id: CreationOptional<string>;
  planId: string;
  label: string;
  settings: unknown;
  instance: unknown;
  linesKey: string;
  resultFormat: string;
  placementsFormat: number;
  placementCount: number;
  partIds: string[];
  placements: Buffer;
  summary: unknown;
  estimate: unknown;
  locked: CreationOptional<boolean>;
  createdBy: string | null;
  createdAt: CreationOptional<Date>;
  plan?: NonAttribute<PlanRow>;
  creator?: NonAttribute<UserRow | null>;
}

export interface PlanEventRow extends Model<InferAttributes<PlanEventRow>, InferCreationAttributes<PlanEventRow>> {
  id: CreationOptional<string>;
  planId: string;
  fromStatus: PlanStatus | null;
  toStatus: PlanStatus;
  userId: string | null;
  comment: string | null;
  createdAt: CreationOptional<Date>;
  user?: NonAttribute<UserRow | null>;
}

/** A lead's reordering of a machine's queue, with the order before and after it (so it can be undone). */
export interface QueueMoveRow extends Model<InferAttributes<QueueMoveRow>, InferCreationAttributes<QueueMoveRow>> {
  id: CreationOptional<string>;
  labId: string;
  machineId: string;
  userId: string | null;
  beforeIds: string[];
  afterIds: string[];
  createdAt: CreationOptional<Date>;
  undoneAt: CreationOptional<Date | null>;
}

const stamps = {
  createdAt: { type: DataTypes.DATE, allowNull: false, field: 'created_at' },
  updatedAt: { type: DataTypes.DATE, allowNull: false, field: 'updated_at' },
} as const;
const timed = { underscored: true, timestamps: true, createdAt: 'createdAt', updatedAt: 'updatedAt' } as const;

/** Build plans, their lines, layouts and status history (the schema itself is in the migrations). */
export function planModels(sequelize: Sequelize) {
  const Plan = sequelize.define<PlanRow>(
    'Plan',
    {
      id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
      labId: { type: DataTypes.UUID, allowNull: false, field: 'lab_id' },
      name: { type: DataTypes.TEXT, allowNull: false },
      machineId: { type: DataTypes.UUID, allowNull: false, field: 'machine_id' },
      materialId: { type: DataTypes.UUID, allowNull: false, field: 'material_id' },
      status: { type: DataTypes.TEXT, allowNull: false, defaultValue: 'draft' },
      version: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 1 },
      chosenLayoutId: { type: DataTypes.UUID, field: 'chosen_layout_id' },
      queuePosition: { type: DataTypes.INTEGER, field: 'queue_position' },
      draft: { type: DataTypes.JSONB },
      createdBy: { type: DataTypes.TEXT, field: 'created_by' },
      ...stamps,
    },
    { ...timed, tableName: 'plans' },
  );
  const PlanLine = sequelize.define<PlanLineRow>(
    'PlanLine',
    {
      id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
      planId: { type: DataTypes.UUID, allowNull: false, field: 'plan_id' },
      requestLineId: { type: DataTypes.UUID, allowNull: false, field: 'request_line_id' },
      position: { type: DataTypes.INTEGER, allowNull: false },
      quantity: { type: DataTypes.INTEGER, allowNull: false },
      orientation: { type: DataTypes.TEXT },
      ...stamps,
    },
    { ...timed, tableName: 'plan_lines' },
  );
  const Layout = sequelize.define<LayoutRow>(
    'Layout',
    {
      id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
      planId: { type: DataTypes.UUID, allowNull: false, field: 'plan_id' },
      label: { type: DataTypes.TEXT, allowNull: false },
      settings: { type: DataTypes.JSONB, allowNull: false },
      instance: { type: DataTypes.JSONB, allowNull: false },
      linesKey: { type: DataTypes.TEXT, allowNull: false, field: 'lines_key' },
      resultFormat: { type: DataTypes.TEXT, allowNull: false, field: 'result_format' },
      placementsFormat: { type: DataTypes.INTEGER, allowNull: false, field: 'placements_format' },
      placementCount: { type: DataTypes.INTEGER, allowNull: false, field: 'placement_count' },
      partIds: { type: DataTypes.ARRAY(DataTypes.TEXT), allowNull: false, field: 'part_ids' },
      placements: { type: DataTypes.BLOB, allowNull: false },
      summary: { type: DataTypes.JSONB, allowNull: false },
      estimate: { type: DataTypes.JSONB, allowNull: false },
      locked: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
      createdBy: { type: DataTypes.TEXT, field: 'created_by' },
      createdAt: stamps.createdAt,
    },
    { ...timed, updatedAt: false, tableName: 'layouts' },
  );
  const PlanEvent = sequelize.define<PlanEventRow>(
    'PlanEvent',
    {
      id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
      planId: { type: DataTypes.UUID, allowNull: false, field: 'plan_id' },
      fromStatus: { type: DataTypes.TEXT, field: 'from_status' },
      toStatus: { type: DataTypes.TEXT, allowNull: false, field: 'to_status' },
      userId: { type: DataTypes.TEXT, field: 'user_id' },
      comment: { type: DataTypes.TEXT },
      createdAt: stamps.createdAt,
    },
    { ...timed, updatedAt: false, tableName: 'plan_events' },
  );

  const QueueMove = sequelize.define<QueueMoveRow>(
    'QueueMove',
    {
      id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
      labId: { type: DataTypes.UUID, allowNull: false, field: 'lab_id' },
      machineId: { type: DataTypes.UUID, allowNull: false, field: 'machine_id' },
      userId: { type: DataTypes.TEXT, field: 'user_id' },
      beforeIds: { type: DataTypes.ARRAY(DataTypes.UUID), allowNull: false, field: 'before_ids' },
      afterIds: { type: DataTypes.ARRAY(DataTypes.UUID), allowNull: false, field: 'after_ids' },
      createdAt: stamps.createdAt,
      undoneAt: { type: DataTypes.DATE, field: 'undone_at' },
    },
    { ...timed, updatedAt: false, tableName: 'queue_moves' },
  );

  Plan.hasMany(PlanLine, { foreignKey: 'planId', as: 'lines' });
  PlanLine.belongsTo(Plan, { foreignKey: 'planId', as: 'plan' });
  Plan.hasMany(Layout, { foreignKey: 'planId', as: 'layouts' });
  Layout.belongsTo(Plan, { foreignKey: 'planId', as: 'plan' });
  Plan.belongsTo(Layout, { foreignKey: 'chosenLayoutId', as: 'chosenLayout', constraints: false });
  Plan.hasMany(PlanEvent, { foreignKey: 'planId', as: 'events' });
  return { Plan, PlanLine, Layout, PlanEvent, QueueMove };
}
