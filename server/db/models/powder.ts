import { DataTypes, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Model, type ModelStatic, type Sequelize } from 'sequelize';
import type { MovementKind } from '../../../shared/powder';

/** A material's powder rules and the row every movement of that material locks. */
export interface PowderMaterialRow extends Model<InferAttributes<PowderMaterialRow>, InferCreationAttributes<PowderMaterialRow>> {
  materialId: string;
  labId: string;
  maxMeanAgeBuilds: number;
  minRefreshRatio: number;
  minMvrCm3Per10Min: number | null;
  reorderLevelKg: number;
  leadTimeDays: number;
  updatedBy: string | null;
  createdAt: CreationOptional<Date>;
  updatedAt: CreationOptional<Date>;
}

export interface PowderLotRow extends Model<InferAttributes<PowderLotRow>, InferCreationAttributes<PowderLotRow>> {
  id: CreationOptional<string>;
  labId: string;
  materialId: string;
  code: string;
  makerLot: string;
  receivedOn: string;
  expiresOn: string | null;
  note: string;
  createdBy: string | null;
  createdAt: CreationOptional<Date>;
}

export interface PowderMovementRow extends Model<InferAttributes<PowderMovementRow>, InferCreationAttributes<PowderMovementRow>> {
  id: CreationOptional<string>;
  seq: CreationOptional<string>;
  labId: string;
  materialId: string;
  lotId: string | null;
  kind: MovementKind;
  deltaKg: number;
  runId: string | null;
  planId: string | null;
  countedKg: number | null;
  cakeDiscardedKg: number | null;
  reason: string;
  poolAgeAfter: number | null;
  fillAgeBuilds: number | null;
  at: Date;
  byUser: string | null;
  createdAt: CreationOptional<Date>;
}

export interface PowderCheckRow extends Model<InferAttributes<PowderCheckRow>, InferCreationAttributes<PowderCheckRow>> {
  id: CreationOptional<string>;
  labId: string;
  materialId: string;
  mvrCm3Per10Min: number;
  testTempC: number | null;
  testLoadKg: number | null;
  thresholdCm3Per10Min: number | null;
  passed: boolean;
  note: string;
  measuredAt: Date;
  measuredBy: string | null;
  releasedAt: Date | null;
  releasedBy: string | null;
  releaseReason: string | null;
  createdAt: CreationOptional<Date>;
}

export interface PowderShortageRow extends Model<InferAttributes<PowderShortageRow>, InferCreationAttributes<PowderShortageRow>> {
  id: CreationOptional<string>;
  labId: string;
  materialId: string;
  belowAt: Date;
  neededKg: number;
  openedAt: CreationOptional<Date>;
  mailedAt: Date | null;
  closedAt: Date | null;
}

export type PowderModels = {
  PowderMaterial: ModelStatic<PowderMaterialRow>;
  PowderLot: ModelStatic<PowderLotRow>;
  PowderMovement: ModelStatic<PowderMovementRow>;
  PowderCheck: ModelStatic<PowderCheckRow>;
  PowderShortage: ModelStatic<PowderShortageRow>;
};

const base = { underscored: true } as const;

/** Powder stock tables (the schema is in the migrations). */
export function powderModels(sequelize: Sequelize): PowderModels {
  const PowderMaterial = sequelize.define<PowderMaterialRow>(
    'PowderMaterial',
    {
      materialId: { type: DataTypes.UUID, primaryKey: true, field: 'material_id' },
      labId: { type: DataTypes.UUID, allowNull: false, field: 'lab_id' },
      maxMeanAgeBuilds: { type: DataTypes.DOUBLE, allowNull: false, field: 'max_mean_age_builds' },
      minRefreshRatio: { type: DataTypes.DOUBLE, allowNull: false, field: 'min_refresh_ratio' },
      minMvrCm3Per10Min: { type: DataTypes.DOUBLE, field: 'min_mvr_cm3_per_10min' },
      reorderLevelKg: { type: DataTypes.DOUBLE, allowNull: false, field: 'reorder_level_kg' },
      leadTimeDays: { type: DataTypes.INTEGER, allowNull: false, field: 'lead_time_days' },
      updatedBy: { type: DataTypes.TEXT, field: 'updated_by' },
      createdAt: { type: DataTypes.DATE, allowNull: false, field: 'created_at' },
      updatedAt: { type: DataTypes.DATE, allowNull: false, field: 'updated_at' },
    },
    { ...base, tableName: 'powder_materials', timestamps: true, createdAt: 'createdAt', updatedAt: 'updatedAt' },
  );
  const PowderLot = sequelize.define<PowderLotRow>(
    'PowderLot',
    {
      id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
      labId: { type: DataTypes.UUID, allowNull: false, field: 'lab_id' },
      materialId: { type: DataTypes.UUID, allowNull: false, field: 'material_id' },
      code: { type: DataTypes.TEXT, allowNull: false },
      makerLot: { type: DataTypes.TEXT, allowNull: false, field: 'maker_lot' },
      receivedOn: { type: DataTypes.DATEONLY, allowNull: false, field: 'received_on' },
      expiresOn: { type: DataTypes.DATEONLY, field: 'expires_on' },
      note: { type: DataTypes.TEXT, allowNull: false },
      createdBy: { type: DataTypes.TEXT, field: 'created_by' },
      createdAt: { type: DataTypes.DATE, allowNull: false, field: 'created_at' },
    },
    { ...base, tableName: 'powder_lots', timestamps: true, createdAt: 'createdAt', updatedAt: false },
  );
  const PowderMovement = sequelize.define<PowderMovementRow>(
    'PowderMovement',
    {
      id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
      seq: { type: DataTypes.BIGINT, allowNull: false, autoIncrement: true },
      labId: { type: DataTypes.UUID, allowNull: false, field: 'lab_id' },
      materialId: { type: DataTypes.UUID, allowNull: false, field: 'material_id' },
      lotId: { type: DataTypes.UUID, field: 'lot_id' },
      kind: { type: DataTypes.TEXT, allowNull: false },
      deltaKg: { type: DataTypes.DOUBLE, allowNull: false, field: 'delta_kg' },
      runId: { type: DataTypes.UUID, field: 'run_id' },
      planId: { type: DataTypes.UUID, field: 'plan_id' },
      countedKg: { type: DataTypes.DOUBLE, field: 'counted_kg' },
      cakeDiscardedKg: { type: DataTypes.DOUBLE, field: 'cake_discarded_kg' },
      reason: { type: DataTypes.TEXT, allowNull: false },
      poolAgeAfter: { type: DataTypes.DOUBLE, field: 'pool_age_after' },
      fillAgeBuilds: { type: DataTypes.DOUBLE, field: 'fill_age_builds' },
      at: { type: DataTypes.DATE, allowNull: false },
      byUser: { type: DataTypes.TEXT, field: 'by_user' },
      createdAt: { type: DataTypes.DATE, allowNull: false, field: 'created_at' },
    },
    { ...base, tableName: 'powder_movements', timestamps: true, createdAt: 'createdAt', updatedAt: false },
  );
  const PowderCheck = sequelize.define<PowderCheckRow>(
    'PowderCheck',
    {
      id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
      labId: { type: DataTypes.UUID, allowNull: false, field: 'lab_id' },
      materialId: { type: DataTypes.UUID, allowNull: false, field: 'material_id' },
      mvrCm3Per10Min: { type: DataTypes.DOUBLE, allowNull: false, field: 'mvr_cm3_per_10min' },
      testTempC: { type: DataTypes.DOUBLE, field: 'test_temp_c' },
      testLoadKg: { type: DataTypes.DOUBLE, field: 'test_load_kg' },
      thresholdCm3Per10Min: { type: DataTypes.DOUBLE, field: 'threshold_cm3_per_10min' },
      passed: { type: DataTypes.BOOLEAN, allowNull: false },
      note: { type: DataTypes.TEXT, allowNull: false },
      measuredAt: { type: DataTypes.DATE, allowNull: false, field: 'measured_at' },
      measuredBy: { type: DataTypes.TEXT, field: 'measured_by' },
      releasedAt: { type: DataTypes.DATE, field: 'released_at' },
      releasedBy: { type: DataTypes.TEXT, field: 'released_by' },
      releaseReason: { type: DataTypes.TEXT, field: 'release_reason' },
      createdAt: { type: DataTypes.DATE, allowNull: false, field: 'created_at' },
    },
    { ...base, tableName: 'powder_checks', timestamps: true, createdAt: 'createdAt', updatedAt: false },
  );
  const PowderShortage = sequelize.define<PowderShortageRow>(
    'PowderShortage',
    {
      id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
      labId: { type: DataTypes.UUID, allowNull: false, field: 'lab_id' },
      materialId: { type: DataTypes.UUID, allowNull: false, field: 'material_id' },
      belowAt: { type: DataTypes.DATE, allowNull: false, field: 'below_at' },
      neededKg: { type: DataTypes.DOUBLE, allowNull: false, field: 'needed_kg' },
      openedAt: { type: DataTypes.DATE, allowNull: false, field: 'opened_at' },
      mailedAt: { type: DataTypes.DATE, field: 'mailed_at' },
      closedAt: { type: DataTypes.DATE, field: 'closed_at' },
    },
    { ...base, tableName: 'powder_shortages', timestamps: false },
  );
  return { PowderMaterial, PowderLot, PowderMovement, PowderCheck, PowderShortage };
}
