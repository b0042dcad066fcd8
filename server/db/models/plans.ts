import { DataTypes, type Model, type ModelStatic, type Sequelize } from 'sequelize';

type AnyModel = ModelStatic<Model<any, any>>;
export type PlanModels = { Plan: AnyModel; PlanLine: AnyModel; Layout: AnyModel; PlanEvent: AnyModel };

const base = { underscored: true, timestamps: true, createdAt: 'created_at', updatedAt: 'updated_at' } as const;

/** Build plans, their lines, layouts and status history (the schema itself is in the migrations). */
export function planModels(sequelize: Sequelize): PlanModels {
  const Plan = sequelize.define(
    'Plan',
    {
      id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
      labId: { type: DataTypes.UUID, allowNull: false, field: 'lab_id' },
      name: { type: DataTypes.TEXT, allowNull: false },
      machineId: { type: DataTypes.UUID, allowNull: false, field: 'machine_id' },
      materialId: { type: DataTypes.UUID, allowNull: false, field: 'material_id' },
      status: { type: DataTypes.TEXT, allowNull: false },
      version: { type: DataTypes.INTEGER, allowNull: false },
      chosenLayoutId: { type: DataTypes.UUID, field: 'chosen_layout_id' },
      queuePosition: { type: DataTypes.INTEGER, field: 'queue_position' },
      draft: { type: DataTypes.JSONB },
      createdBy: { type: DataTypes.TEXT, field: 'created_by' },
    },
    { ...base, tableName: 'plans' },
  );
  const PlanLine = sequelize.define(
    'PlanLine',
    {
      id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
      planId: { type: DataTypes.UUID, allowNull: false, field: 'plan_id' },
      requestLineId: { type: DataTypes.UUID, allowNull: false, field: 'request_line_id' },
      position: { type: DataTypes.INTEGER, allowNull: false },
      quantity: { type: DataTypes.INTEGER, allowNull: false },
      orientation: { type: DataTypes.TEXT },
    },
    { ...base, tableName: 'plan_lines' },
  );
  const Layout = sequelize.define(
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
      locked: { type: DataTypes.BOOLEAN, allowNull: false },
      createdBy: { type: DataTypes.TEXT, field: 'created_by' },
    },
    { ...base, updatedAt: false, tableName: 'layouts' },
  );
  const PlanEvent = sequelize.define(
    'PlanEvent',
    {
      id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
      planId: { type: DataTypes.UUID, allowNull: false, field: 'plan_id' },
      fromStatus: { type: DataTypes.TEXT, field: 'from_status' },
      toStatus: { type: DataTypes.TEXT, allowNull: false, field: 'to_status' },
      userId: { type: DataTypes.TEXT, field: 'user_id' },
      comment: { type: DataTypes.TEXT },
    },
    { ...base, updatedAt: false, tableName: 'plan_events' },
  );
  return { Plan, PlanLine, Layout, PlanEvent };
}
