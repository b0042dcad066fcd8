import { DataTypes, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Model, type NonAttribute, type Sequelize } from 'sequelize';
import type { PlanRow, LayoutRow } from './plans';
import type { ProfileRow, UserRow } from './accounts';

export interface RunRow extends Model<InferAttributes<RunRow>, InferCreationAttributes<RunRow>> {
  id: CreationOptional<string>;
  planId: string;
  labId: string;
  machineId: string;
  layoutId: string | null;
  checklist: { chamberInPlace: boolean; opticalWindowClean: boolean };
  freshPowderLoadedKg: number;
  reusedPowderLoadedKg: number;
  startedAt: Date;
  startedBy: string | null;
  printEndedAt: CreationOptional<Date | null>;
  leftMachineAt: CreationOptional<Date | null>;
  breakoutAt: CreationOptional<Date | null>;
  finishingAt: CreationOptional<Date | null>;
  doneAt: CreationOptional<Date | null>;
  abortedAt: CreationOptional<Date | null>;
  abortReason: CreationOptional<string | null>;
  finishingChecklist: CreationOptional<{ powderRemoved: boolean; blasted: boolean; inspected: boolean } | null>;
  estimatedPrintHours: number;
  estimatedCoolingHours: number;
  estimatedPreheatHours: number | null;
  estimatedLayerHours: number | null;
  estimatedScanHours: number | null;
  printTimeScaleUsed: CreationOptional<number>;
  coolingScaleUsed: CreationOptional<number>;
  actualPrintHours: CreationOptional<number | null>;
  actualCoolingHours: CreationOptional<number | null>;
  powderUsedKg: CreationOptional<number | null>;
  calibrationChoice: CreationOptional<'exclude' | 'include' | null>;
  calibrationReason: CreationOptional<string | null>;
  calibrationBy: CreationOptional<string | null>;
  calibrationAt: CreationOptional<Date | null>;
  createdAt: CreationOptional<Date>;
  updatedAt: CreationOptional<Date>;
  plan?: NonAttribute<PlanRow>;
  machine?: NonAttribute<ProfileRow>;
  layout?: NonAttribute<LayoutRow | null>;
  calibrator?: NonAttribute<UserRow | null>;
  starter?: NonAttribute<UserRow | null>;
}

export interface RunReadingRow extends Model<InferAttributes<RunReadingRow>, InferCreationAttributes<RunReadingRow>> {
  id: CreationOptional<string>;
  runId: string;
  tempC: number;
  place: string;
  takenAt: Date;
  userId: string | null;
  coolestC: number | null;
  checkStatus: CreationOptional<'explained' | 'unexplained' | 'confirmed' | 'accepted'>;
  confirmedByReadingId: CreationOptional<string | null>;
  acceptedBy: CreationOptional<string | null>;
  acceptedReason: CreationOptional<string | null>;
  acceptedAt: CreationOptional<Date | null>;
  createdAt: CreationOptional<Date>;
  user?: NonAttribute<UserRow | null>;
  acceptor?: NonAttribute<UserRow | null>;
}

export interface RunLineRow extends Model<InferAttributes<RunLineRow>, InferCreationAttributes<RunLineRow>> {
  runId: string;
  planLineId: string;
  requestLineId: string;
  plannedCount: number;
  goodCount: number;
  failedCount: number;
}

const timed = { underscored: true, timestamps: true, createdAt: 'createdAt', updatedAt: 'updatedAt' } as const;

/** Runs of plans on the machine, their temperature readings and per-line counts (the schema is in the migrations). */
export function runModels(sequelize: Sequelize) {
  const Run = sequelize.define<RunRow>(
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
      estimatedPreheatHours: { type: DataTypes.DOUBLE, field: 'estimated_preheat_hours' },
      estimatedLayerHours: { type: DataTypes.DOUBLE, field: 'estimated_layer_hours' },
      estimatedScanHours: { type: DataTypes.DOUBLE, field: 'estimated_scan_hours' },
      printTimeScaleUsed: { type: DataTypes.DOUBLE, allowNull: false, defaultValue: 1, field: 'print_time_scale_used' },
      coolingScaleUsed: { type: DataTypes.DOUBLE, allowNull: false, defaultValue: 1, field: 'cooling_scale_used' },
      actualPrintHours: { type: DataTypes.DOUBLE, field: 'actual_print_hours' },
      actualCoolingHours: { type: DataTypes.DOUBLE, field: 'actual_cooling_hours' },
      powderUsedKg: { type: DataTypes.DOUBLE, field: 'powder_used_kg' },
      calibrationChoice: { type: DataTypes.TEXT, field: 'calibration_choice' },
      calibrationReason: { type: DataTypes.TEXT, field: 'calibration_reason' },
      calibrationBy: { type: DataTypes.TEXT, field: 'calibration_by' },
      calibrationAt: { type: DataTypes.DATE, field: 'calibration_at' },
      createdAt: { type: DataTypes.DATE, allowNull: false, field: 'created_at' },
      updatedAt: { type: DataTypes.DATE, allowNull: false, field: 'updated_at' },
    },
    { ...timed, tableName: 'runs' },
  );
  const RunReading = sequelize.define<RunReadingRow>(
    'RunReading',
    {
      id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
      runId: { type: DataTypes.UUID, allowNull: false, field: 'run_id' },
      tempC: { type: DataTypes.DOUBLE, allowNull: false, field: 'temp_c' },
      place: { type: DataTypes.TEXT, allowNull: false },
      takenAt: { type: DataTypes.DATE, allowNull: false, field: 'taken_at' },
      userId: { type: DataTypes.TEXT, field: 'user_id' },
      coolestC: { type: DataTypes.DOUBLE, field: 'coolest_c' },
      checkStatus: { type: DataTypes.TEXT, allowNull: false, defaultValue: 'explained', field: 'check_status' },
      confirmedByReadingId: { type: DataTypes.UUID, field: 'confirmed_by_reading_id' },
      acceptedBy: { type: DataTypes.TEXT, field: 'accepted_by' },
      acceptedReason: { type: DataTypes.TEXT, field: 'accepted_reason' },
      acceptedAt: { type: DataTypes.DATE, field: 'accepted_at' },
      createdAt: { type: DataTypes.DATE, allowNull: false, field: 'created_at' },
    },
    { ...timed, updatedAt: false, tableName: 'run_readings' },
  );
  const RunLine = sequelize.define<RunLineRow>(
    'RunLine',
    {
      runId: { type: DataTypes.UUID, primaryKey: true, field: 'run_id' },
      planLineId: { type: DataTypes.UUID, primaryKey: true, field: 'plan_line_id' },
      requestLineId: { type: DataTypes.UUID, allowNull: false, field: 'request_line_id' },
      plannedCount: { type: DataTypes.INTEGER, allowNull: false, field: 'planned_count' },
      goodCount: { type: DataTypes.INTEGER, allowNull: false, field: 'good_count' },
      failedCount: { type: DataTypes.INTEGER, allowNull: false, field: 'failed_count' },
    },
    { underscored: true, timestamps: false, tableName: 'run_lines' },
  );

  Run.hasMany(RunReading, { foreignKey: 'runId', as: 'readings' });
  RunReading.belongsTo(Run, { foreignKey: 'runId', as: 'run' });
  Run.hasMany(RunLine, { foreignKey: 'runId', as: 'lines' });
  return { Run, RunReading, RunLine };
}
