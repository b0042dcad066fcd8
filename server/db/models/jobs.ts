import { DataTypes, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Model, type ModelStatic, type NonAttribute, type Sequelize } from 'sequelize';
import type { JobState } from '../../../shared/schemas/jobs';
import type { RejectedFile } from '../../../shared/schemas/parts';

/** One upload (or one layout to slice) on the job queue. `options` is the upload's measuring options, or the layout's plan. */
export interface MeshJobRow extends Model<InferAttributes<MeshJobRow>, InferCreationAttributes<MeshJobRow>> {
  id: string;
  labId: string;
  userId: string | null;
  state: CreationOptional<JobState>;
  kind: CreationOptional<'measure' | 'layout'>;
  options: object;
  createdAt: CreationOptional<Date>;
  startedAt: CreationOptional<Date | null>;
  finishedAt: CreationOptional<Date | null>;
}

export type MeshJobFileState = 'waiting' | 'queued' | 'running' | 'done' | 'rejected';

/** One file of a job (or a layout job's one row): its turn, its state, and what came of it. */
export interface MeshJobFileRow extends Model<InferAttributes<MeshJobFileRow>, InferCreationAttributes<MeshJobFileRow>> {
  id: string;
  jobId: string;
  labId: string;
  position: number;
  fileName: string;
  fileKey: CreationOptional<string | null>;
  sizeBytes: CreationOptional<string | number>;
  turn: number;
  state: MeshJobFileState;
  attempts: CreationOptional<number>;
  worker: CreationOptional<string | null>;
  partIds: CreationOptional<string[]>;
  rejected: CreationOptional<RejectedFile | null>;
  /** What to slice, for a layout job's row (its parts' file keys and placements). */
  task: CreationOptional<object | null>;
  /** The sliced sections, once a layout job's row is done. */
  result: CreationOptional<object | null>;
  startedAt: CreationOptional<Date | null>;
  finishedAt: CreationOptional<Date | null>;
  job?: NonAttribute<MeshJobRow>;
}

export type JobModels = { MeshJob: ModelStatic<MeshJobRow>; MeshJobFile: ModelStatic<MeshJobFileRow> };

const base = { underscored: true, timestamps: false } as const;

/** The job queue's tables (the schema is in the migrations). */
export function jobModels(sequelize: Sequelize): JobModels {
  const MeshJob = sequelize.define<MeshJobRow>(
    'MeshJob',
    {
      id: { type: DataTypes.UUID, primaryKey: true },
      labId: { type: DataTypes.UUID, allowNull: false, field: 'lab_id' },
      userId: { type: DataTypes.TEXT, field: 'user_id' },
      state: { type: DataTypes.TEXT, allowNull: false, defaultValue: 'queued' },
      kind: { type: DataTypes.TEXT, allowNull: false, defaultValue: 'measure' },
      options: { type: DataTypes.JSONB, allowNull: false },
      createdAt: { type: DataTypes.DATE, allowNull: false, field: 'created_at' },
      startedAt: { type: DataTypes.DATE, field: 'started_at' },
      finishedAt: { type: DataTypes.DATE, field: 'finished_at' },
    },
    { ...base, tableName: 'mesh_jobs' },
  );
  const MeshJobFile = sequelize.define<MeshJobFileRow>(
    'MeshJobFile',
    {
      id: { type: DataTypes.UUID, primaryKey: true },
      jobId: { type: DataTypes.UUID, allowNull: false, field: 'job_id' },
      labId: { type: DataTypes.UUID, allowNull: false, field: 'lab_id' },
      position: { type: DataTypes.INTEGER, allowNull: false },
      fileName: { type: DataTypes.TEXT, allowNull: false, field: 'file_name' },
      fileKey: { type: DataTypes.TEXT, field: 'file_key' },
      sizeBytes: { type: DataTypes.BIGINT, allowNull: false, defaultValue: 0, field: 'size_bytes' },
      turn: { type: DataTypes.INTEGER, allowNull: false },
      state: { type: DataTypes.TEXT, allowNull: false },
      attempts: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
      worker: { type: DataTypes.TEXT },
      partIds: { type: DataTypes.ARRAY(DataTypes.UUID), allowNull: false, defaultValue: [], field: 'part_ids' },
      rejected: { type: DataTypes.JSONB },
      task: { type: DataTypes.JSONB },
      result: { type: DataTypes.JSONB },
      startedAt: { type: DataTypes.DATE, field: 'started_at' },
      finishedAt: { type: DataTypes.DATE, field: 'finished_at' },
    },
    { ...base, tableName: 'mesh_job_files' },
  );
  MeshJobFile.belongsTo(MeshJob, { foreignKey: 'jobId', as: 'job' });
  MeshJob.hasMany(MeshJobFile, { foreignKey: 'jobId', as: 'files' });
  return { MeshJob, MeshJobFile };
}
