import type { QueryInterface } from 'sequelize';

/**
 * Machine and material fields for the conduction cooling model, the volumetric energy density, contours, the
 * minimum layer time, the scanner's top speed, energy, inert gas and powder losses. Existing rows get the defaults
 * below (the same as a new machine's or material's in the settings forms); the energy density becomes volumetric,
 * E_V = E_A / t at the material's default layer height t; the Newton cooling constants give way to the cake's
 * surface coefficient.
 */
const MACHINE_DEFAULTS = {
  scannerMaxSpeedMmPerS: 10000,
  minLayerSeconds: 0,
  coolingSurfaceWPerM2K: 8,
  electricalPowerKw: 0,
  energyPricePerKWh: 0,
  inertGasM3PerHour: 0,
  inertGasPricePerM3: 0,
};
const MATERIAL_DEFAULTS = {
  contourPasses: 1,
  powderConductivityWPerMK: 0.1,
  powderHeatCapacityJPerKgK: 1700,
  sievingLossShare: 0.02,
  crustLossShare: 0.1,
  feedSurplusShare: 0.05,
};

export async function up(q: QueryInterface): Promise<void> {
  await q.sequelize.transaction(async (transaction) => {
    // Defaults first, then the row's own values: a field a row already has is kept.
    await q.sequelize.query(
      `UPDATE machines SET profile = $1::jsonb || (profile - 'coolingInMachinePerHour' - 'coolingOutsidePerHour')`,
      { bind: [JSON.stringify(MACHINE_DEFAULTS)], transaction },
    );
    await q.sequelize.query(
      `UPDATE materials SET profile = $1::jsonb
         || jsonb_build_object('volumetricEnergyDensityJPerMm3',
              COALESCE(profile->'volumetricEnergyDensityJPerMm3',
                       to_jsonb(round(((profile->>'energyDensityJPerMm2')::numeric / NULLIF((profile->>'defaultLayerHeightMm')::numeric, 0)), 4)),
                       to_jsonb(0.2)))
         || (profile - 'energyDensityJPerMm2')`,
      { bind: [JSON.stringify(MATERIAL_DEFAULTS)], transaction },
    );
  });
}

export async function down(q: QueryInterface): Promise<void> {
  await q.sequelize.transaction(async (transaction) => {
    await q.sequelize.query(
      `UPDATE machines SET profile = jsonb_build_object('coolingInMachinePerHour', 0.7, 'coolingOutsidePerHour', 0.1)
         || (profile - $1::text[])`,
      { bind: [Object.keys(MACHINE_DEFAULTS)], transaction },
    );
    await q.sequelize.query(
      `UPDATE materials SET profile = jsonb_build_object('energyDensityJPerMm2',
              round((profile->>'volumetricEnergyDensityJPerMm3')::numeric * (profile->>'defaultLayerHeightMm')::numeric, 4))
         || (profile - $1::text[] - 'volumetricEnergyDensityJPerMm3')`,
      { bind: [Object.keys(MATERIAL_DEFAULTS)], transaction },
    );
  });
}
