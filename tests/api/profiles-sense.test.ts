import { QueryTypes } from 'sequelize';
import { signUp, startTestApp } from '../helpers/app';
import type { Running } from '../../server/boot';
import * as estimateFields from '../../server/db/migrations/0007-estimate-profile-fields';
import { demoMachines, demoMaterials } from '../../shared/demo/profiles';
import { checkedMachineProfileSchema, checkedMaterialProfileSchema } from '../../shared/types/profiles';

let running: Running;
beforeAll(async () => {
  running = await startTestApp();
});
afterAll(async () => {
  await running.close();
});

describe('profiles that make no physical sense', () => {
  test('a handling temperature at or below the room, or a removal temperature below handling, answers 400 naming the field', async () => {
    const { agent: lead, labId } = await signUp(running, 'sensemachine');
    const cold = await lead.post(`/api/labs/${labId}/machines`).send({ ...demoMachines[0], name: 'Cold', handlingTempC: 20, ambientTempC: 25 });
    expect(cold.status).toBe(400);
    expect(cold.body.error).toMatchObject({ code: 'invalid_input', field: 'handlingTempC' });
    const ok = await lead.post(`/api/labs/${labId}/machines`).send({ ...demoMachines[0], name: 'Fine' });
    expect(ok.status).toBe(201);
    // A patch is checked merged with what is stored: removal at 35 C is below the stored handling temperature of 40 C.
    const patched = await lead.patch(`/api/labs/${labId}/machines/${ok.body.id}`).send({ removalTempC: 35 });
    expect(patched.status).toBe(400);
    expect(patched.body.error.field).toBe('removalTempC');
    const zeroSpeed = await lead.post(`/api/labs/${labId}/machines`).send({ ...demoMachines[0], name: 'Still', scannerMaxSpeedMmPerS: 0 });
    expect(zeroSpeed.body.error.field).toBe('scannerMaxSpeedMmPerS');
  });

  test('a bulk density at or above the solid density answers 400 naming it', async () => {
    const { agent: lead, labId } = await signUp(running, 'sensematerial');
    const res = await lead.post(`/api/labs/${labId}/materials`).send({ ...demoMaterials[0], name: 'Heavy dust', bulkDensityGPerCm3: 1.2 });
    expect(res.status).toBe(400);
    expect(res.body.error).toMatchObject({ code: 'invalid_input', field: 'bulkDensityGPerCm3' });
    const conductivity = await lead.post(`/api/labs/${labId}/materials`).send({ ...demoMaterials[0], name: 'Insulator', powderConductivityWPerMK: 0 });
    expect(conductivity.body.error.field).toBe('powderConductivityWPerMK');
  });
});

describe('profiles stored before the estimate fields existed', () => {
  test('the migration fills the new fields, turns the energy density volumetric (E_V = E_A / t) and keeps what a row already has', async () => {
    const { labId } = await signUp(running, 'oldprofiles');
    const { sequelize } = running.db;
    const { name: _m, scannerMaxSpeedMmPerS: _s, minLayerSeconds: _l, coolingSurfaceWPerM2K: _c, electricalPowerKw: _e, energyPricePerKWh: _p, inertGasM3PerHour: _g, inertGasPricePerM3: _gp, ...oldMachine } = demoMachines[1];
    const { name: _n, volumetricEnergyDensityJPerMm3: _v, contourPasses: _cp, powderConductivityWPerMK: _k, powderHeatCapacityJPerKgK: _h, sievingLossShare: _sl, crustLossShare: _cl, feedSurplusShare: _fs, ...oldMaterial } = demoMaterials[0];
    const [[machine]] = (await sequelize.query(
      `INSERT INTO machines (id, lab_id, name, profile, created_at, updated_at) VALUES (gen_random_uuid(), $1, 'Old bay', $2::jsonb, now(), now()) RETURNING id`,
      { bind: [labId, JSON.stringify({ ...oldMachine, coolingInMachinePerHour: 0.6, coolingOutsidePerHour: 0.08, minLayerSeconds: 7 })] },
    )) as [Array<{ id: string }>, unknown];
    const [[material]] = (await sequelize.query(
      `INSERT INTO materials (id, lab_id, name, profile, created_at, updated_at) VALUES (gen_random_uuid(), $1, 'Old powder', $2::jsonb, now(), now()) RETURNING id`,
      { bind: [labId, JSON.stringify({ ...oldMaterial, energyDensityJPerMm2: 0.024 })] },
    )) as [Array<{ id: string }>, unknown];

    await estimateFields.up(sequelize.getQueryInterface());

    const [m] = await sequelize.query<{ name: string; profile: Record<string, unknown> }>('SELECT name, profile FROM machines WHERE id = $1', { bind: [machine.id], type: QueryTypes.SELECT });
    const [t] = await sequelize.query<{ name: string; profile: Record<string, unknown> }>('SELECT name, profile FROM materials WHERE id = $1', { bind: [material.id], type: QueryTypes.SELECT });
    expect(m.profile).not.toHaveProperty('coolingInMachinePerHour');
    expect(m.profile.minLayerSeconds).toBe(7);
    expect(m.profile.scannerMaxSpeedMmPerS).toBe(10000);
    expect(t.profile).not.toHaveProperty('energyDensityJPerMm2');
    // 0.024 J/mm^2 at 0.11 mm layers is 0.2182 J/mm^3 (Gibson, Rosen & Stucker 2015, §5.4.2).
    expect(t.profile.volumetricEnergyDensityJPerMm3).toBeCloseTo(0.2182, 4);
    // The migrated rows are whole, valid profiles again.
    expect(checkedMachineProfileSchema.safeParse({ name: m.name, ...m.profile }).error?.issues ?? []).toEqual([]);
    expect(checkedMaterialProfileSchema.safeParse({ name: t.name, ...t.profile }).error?.issues ?? []).toEqual([]);
  });
});
