import type { Sequelize } from 'sequelize';
import { accountModels } from './accounts';
import { partModels } from './parts';
import { planModels } from './plans';
import { runModels } from './runs';
import { powderModels } from './powder';
import { jobModels } from './jobs';

/**
 * The tables as typed Sequelize models. The schema itself comes only from
 * migrations; these definitions never call sync(), and a test compares
 * each model's columns with the migrated database's.
 */
export function initModels(sequelize: Sequelize) {
  const models = { ...accountModels(sequelize), ...partModels(sequelize), ...planModels(sequelize), ...runModels(sequelize), ...powderModels(sequelize), ...jobModels(sequelize) };
  const { Lab, Machine, Material, Part, Plan, PlanEvent, Run, RunReading, Layout, PlanLine, Request, RequestLine, User } = models;
  // Associations across the files above.
  Lab.hasMany(Machine, { foreignKey: 'labId', as: 'machines' });
  Lab.hasMany(Material, { foreignKey: 'labId', as: 'materials' });
  Lab.hasMany(Part, { foreignKey: 'labId', as: 'parts' });
  Lab.hasMany(Plan, { foreignKey: 'labId', as: 'plans' });
  Plan.belongsTo(Machine, { foreignKey: 'machineId', as: 'machine' });
  Plan.belongsTo(Material, { foreignKey: 'materialId', as: 'material' });
  // Authors are kept as ids; an account since removed leaves its id without a user.
  Plan.belongsTo(User, { foreignKey: 'createdBy', as: 'creator', constraints: false });
  Layout.belongsTo(User, { foreignKey: 'createdBy', as: 'creator', constraints: false });
  PlanEvent.belongsTo(User, { foreignKey: 'userId', as: 'user', constraints: false });
  PlanLine.belongsTo(RequestLine, { foreignKey: 'requestLineId', as: 'requestLine' });
  Run.belongsTo(Plan, { foreignKey: 'planId', as: 'plan' });
  Plan.hasOne(Run, { foreignKey: 'planId', as: 'run' });
  Run.belongsTo(Layout, { foreignKey: 'layoutId', as: 'layout' });
  Run.belongsTo(Machine, { foreignKey: 'machineId', as: 'machine' });
  Run.belongsTo(User, { foreignKey: 'calibrationBy', as: 'calibrator' });
  Run.belongsTo(User, { foreignKey: 'startedBy', as: 'starter' });
  RunReading.belongsTo(User, { foreignKey: 'userId', as: 'user' });
  RunReading.belongsTo(User, { foreignKey: 'acceptedBy', as: 'acceptor' });
  Request.belongsTo(User, { foreignKey: 'createdBy', as: 'creator' });
  Part.belongsTo(User, { foreignKey: 'uploadedBy', as: 'uploader' });
  return models;
}
export type Models = ReturnType<typeof initModels>;
