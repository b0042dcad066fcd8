import type { Database } from '..';
import type { Services } from '../../app';
import { demoMachines, demoMaterials } from '../../../shared/demo/profiles';
import { ROLES, type Role } from '../../../shared/schemas/auth';

/**
 * The demo lab: an invented robotics start-up's prototyping lab. Every demo
 * member signs in with the same password; the README lists them.
 */
export const DEMO_LAB_NAME = 'Tinkerfin Robotics – prototyping lab';
export const DEMO_PASSWORD = 'sinter-demo-2026';
export const DEMO_MEMBERS: { email: string; name: string; roles: Role[] }[] = [
  { email: 'owner@tinkerfin.example', name: 'Demo Owner (all roles)', roles: [...ROLES] },
  { email: 'lead@tinkerfin.example', name: 'Demo Lead', roles: ['lead'] },
  { email: 'planner@tinkerfin.example', name: 'Demo Planner', roles: ['planner'] },
  { email: 'designer@tinkerfin.example', name: 'Demo Designer', roles: ['designer'] },
  { email: 'operator@tinkerfin.example', name: 'Demo Operator', roles: ['operator'] },
];

/** Seeds the demo lab when the database holds no lab yet; returns whether it did. */
export async function seedDemoIfEmpty(db: Database, services: Services): Promise<boolean> {
  const labs = await db.models.Lab.count();
  if (labs > 0) return false;
  await db.sequelize.transaction(async (t) => {
    const [owner, ...others] = DEMO_MEMBERS;
    const ownerId = await services.auth.createUser({ ...owner, password: DEMO_PASSWORD }, t);
    const labId = await services.labs.createLab(DEMO_LAB_NAME, ownerId, t);
    for (const m of others) {
      const id = await services.auth.createUser({ ...m, password: DEMO_PASSWORD }, t);
      await services.labs.addMember(labId, id, m.roles, t);
    }
    for (const machine of demoMachines) {
      const { name, ...profile } = machine;
      await db.models.Machine.create({ labId, name, profile }, { transaction: t });
    }
    for (const material of demoMaterials) {
      const { name, ...profile } = material;
      await db.models.Material.create({ labId, name, profile }, { transaction: t });
    }
  });
  return true;
}
