import { DataTypes, type Model, type ModelStatic, type Sequelize } from 'sequelize';

type AnyModel = ModelStatic<Model<any, any>>;
export type RunModels = { Run: AnyModel; RunReading: AnyModel; RunLine: AnyModel };

const base = { underscored: true, timestamps: true, createdAt: 'created_at', updatedAt: 'updated_at' } as const;

/** Runs of plans on the machine, their temperature readings and per-line counts (the schema is in the migrations). */
export function runModels(sequelize: Sequelize): RunModels {
  const Run = sequelize.define(
    'Run',
    {
      id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
      planId: { type: DataTypes.UUID, allowNull: false, field: 'plan_id' },
      labId: { type: DataTypes.UUID, allowNull: false, field: 'lab_id' },
      machineId: { type: DataTypes.UUID, allowNull: false, field: 'machine_id' },
      layoutId: { type: DataTypes.UUID, field: 'layout_id' },
      checklist: { type: DataTypes.JSONB, allowNull: false },
      freshPowderLoadedKg: { type: DataTypes.DOUBLE, allowNull: false, field: 'fresh_powder_loaded_kg' },
      reusedPowderLoadedKg: { type: DataTypes.DOUBLE, allowNull: false, field: 'reused_powder_loaded_kg' },
      startedAt: { type: DataTypes.DATE, allowNull: false, field: 'started_at' },
      startedBy: { type: DataTypes.TEXT, field: 'started_by' },
      printEndedAt: { type: DataTypes.DATE, field: 'print_ended_at' },
      leftMachineAt: { type: DataTypes.DATE, field: 'left_machine_at' },
      breakoutAt: { type: DataTypes.DATE, field: 'breakout_at' },
      finishingAt: { type: DataTypes.DATE, field: 'finishing_at' },
      doneAt: { type: DataTypes.DATE, field: 'done_at' },
      abortedAt: { type: DataTypes.DATE, field: 'aborted_at' },
      abortReason: { type: DataTypes.TEXT, field: 'abort_reason' },
      finishingChecklist: { type: DataTypes.JSONB, field: 'finishing_checklist' },
      estimatedPrintHours: { type: DataTypes.DOUBLE, allowNull: false, field: 'estimated_print_hours' },
      estimatedCoolingHours: { type: DataTypes.DOUBLE, allowNull: false, field: 'estimated_cooling_hours' },
      printTimeScaleUsed: { type: DataTypes.DOUBLE, allowNull: false, field: 'print_time_scale_used' },
      coolingScaleUsed: { type: DataTypes.DOUBLE, allowNull: false, field: 'cooling_scale_used' },
      actualPrintHours: { type: DataTypes.DOUBLE, field: 'actual_print_hours' },
      actualCoolingHours: { type: DataTypes.DOUBLE, field: 'actual_cooling_hours' },
      powderUsedKg: { type: DataTypes.DOUBLE, field: 'powder_used_kg' },
    },
    { ...base, tableName: 'runs' },
  );
  const RunReading = sequelize.define(
    'RunReading',
    {
      id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
      runId: { type: DataTypes.UUID, allowNull: false, field: 'run_id' },
      tempC: { type: DataTypes.DOUBLE, allowNull: false, field: 'temp_c' },
      place: { type: DataTypes.TEXT, allowNull: false },
      takenAt: { type: DataTypes.DATE, allowNull: false, field: 'taken_at' },
      userId: { type: DataTypes.TEXT, field: 'user_id' },
    },
    { ...base, updatedAt: false, tableName: 'run_readings' },
  );
  const RunLine = sequelize.define(
    'RunLine',
    {
      runId: { type: DataTypes.UUID, primaryKey: true, field: 'run_id' },
      planLineId: { type: DataTypes.UUID, primaryKey: true, field: 'plan_line_id' },
      requestLineId: { type: DataTypes.UUID, allowNull: false, field: 'request_line_id' },
      plannedCount: { type: DataTypes.INTEGER, allowNull: false, field: 'planned_count' },
      goodCount: { type: DataTypes.INTEGER, allowNull: false, field: 'good_count' },
      failedCount: { type: DataTypes.INTEGER, allowNull: false, field: 'failed_count' },
    },
    { ...base, timestamps: false, tableName: 'run_lines' },
  );
  return { Run, RunReading, RunLine };
}
