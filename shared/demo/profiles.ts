import type { MachineProfile, MaterialProfile } from '../types/profiles';

/*
 * The demo lab's machines and powders. Names are invented. Where a value comes from a published source it is
 * named; "memory" marks values recalled rather than read, "common practice" marks trade habits without a source.
 */

const LAYER_HEIGHTS_MM = [0.08, 0.1, 0.11, 0.12, 0.15];

/**
 * Surface coefficient 8 W/(m^2 K): inside the 2-25 W/(m^2 K) Incropera & DeWitt (Table 1.1) give for free
 * convection of gases. Scanner top speeds, electrical draw, nitrogen flow and prices: memory, plausible values for
 * invented machines, meant to be replaced by the lab's own figures.
 */
export const demoMachines: readonly MachineProfile[] = [
  {
    name: 'Wren',
    chamberMm: [300, 300, 380],
    layerHeightsMm: LAYER_HEIGHTS_MM,
    laserPowerW: 30,
    scannerMaxSpeedMmPerS: 8000,
    // Recoat 6-15 s a layer (memory: a machine setting).
    recoatSeconds: 9,
    minLayerSeconds: 0,
    preheatSeconds: 1.5 * 3600,
    coolingSurfaceWPerM2K: 8,
    removalTempC: 100,
    handlingTempC: 40,
    ambientTempC: 25,
    hourlyRate: 30,
    labourHoursPerBuild: 2,
    labourRate: 40,
    electricalPowerKw: 3.5,
    energyPricePerKWh: 0.25,
    // Prints in air: no inert gas.
    inertGasM3PerHour: 0,
    inertGasPricePerM3: 0,
    chamberCount: 1,
  },
  {
    name: 'Heron',
    chamberMm: [340, 340, 600],
    layerHeightsMm: LAYER_HEIGHTS_MM,
    laserPowerW: 60,
    scannerMaxSpeedMmPerS: 12000,
    recoatSeconds: 10,
    // A short layer waits so the bed can settle before the next one (memory: a machine setting).
    minLayerSeconds: 12,
    preheatSeconds: 2 * 3600,
    coolingSurfaceWPerM2K: 8,
    removalTempC: 100,
    handlingTempC: 40,
    ambientTempC: 25,
    hourlyRate: 45,
    labourHoursPerBuild: 2.5,
    labourRate: 40,
    electricalPowerKw: 6,
    energyPricePerKWh: 0.25,
    // Nitrogen atmosphere (memory: about a cubic metre an hour).
    inertGasM3PerHour: 1.2,
    inertGasPricePerM3: 0.4,
    chamberCount: 2,
  },
];

/**
 * Shared powder settings: 0.11 mm layers (common practice; Gibson, Rosen & Stucker 2015 p. 124 give about 0.1 mm
 * for nylon 12); 30 % fresh / 70 % used (Polymers 2025, 17(5):577); 3 mm spacing and 8 / 5 / 5 mm margins
 * (common practice); bulk densities within 0.43-0.50 g/cm^3 for unfilled nylon (memory); volumetric energy densities
 * E_V = P / (v h t) near the 0.2 J/mm^3 reported for polyamide (Franco, Lanzetta & Romoli, J. Cleaner Production 2010;
 * value from memory) and hatch spacing 0.25 mm (memory); powder conductivity about 0.1 W/(m K) (memory); heat capacity
 * of nylon about 1.7 kJ/(kg K) (memory); losses of 2 % at sieving, crust of 10 % of the parts' mass and a 5 % feed
 * surplus (memory: common practice, for the lab to replace with its own).
 */
export const demoMaterials: readonly MaterialProfile[] = [
  {
    name: 'Nylon 12 powder',
    // 1.01 g/cm^3: memory.
    solidDensityGPerCm3: 1.01,
    bulkDensityGPerCm3: 0.45,
    refreshRatio: 0.3,
    defaultLayerHeightMm: 0.11,
    pricePerKg: 60,
    spacingMm: 3,
    marginXyMm: 8,
    marginBottomMm: 5,
    marginTopMm: 5,
    volumetricEnergyDensityJPerMm3: 0.22,
    hatchSpacingMm: 0.25,
    contourPasses: 1,
    // About 174 C, inside the sintering window (Gibson, Rosen & Stucker 2015 pp. 124, 132).
    bedTempC: 174,
    powderConductivityWPerMK: 0.1,
    powderHeatCapacityJPerKgK: 1700,
    sievingLossShare: 0.02,
    crustLossShare: 0.1,
    feedSurplusShare: 0.05,
  },
  {
    name: 'Nylon 11 powder',
    // 1.04 g/cm^3: CAMEO materials database, citing Brady's Materials Handbook.
    solidDensityGPerCm3: 1.04,
    bulkDensityGPerCm3: 0.48,
    refreshRatio: 0.3,
    defaultLayerHeightMm: 0.11,
    pricePerKg: 70,
    spacingMm: 3,
    marginXyMm: 8,
    marginBottomMm: 5,
    marginTopMm: 5,
    volumetricEnergyDensityJPerMm3: 0.25,
    hatchSpacingMm: 0.25,
    contourPasses: 1,
    // Below nylon 11's melting point of about 189 C (CAMEO); the offset from it is memory.
    bedTempC: 183,
    powderConductivityWPerMK: 0.1,
    powderHeatCapacityJPerKgK: 1750,
    sievingLossShare: 0.02,
    crustLossShare: 0.1,
    feedSurplusShare: 0.05,
  },
  {
    name: 'Glass-filled nylon 12 powder',
    // Glass beads raise both densities (memory: about 1.3 solid, 0.65 bulk).
    solidDensityGPerCm3: 1.3,
    bulkDensityGPerCm3: 0.65,
    refreshRatio: 0.3,
    defaultLayerHeightMm: 0.11,
    pricePerKg: 75,
    spacingMm: 3,
    marginXyMm: 8,
    marginBottomMm: 5,
    marginTopMm: 5,
    volumetricEnergyDensityJPerMm3: 0.24,
    hatchSpacingMm: 0.25,
    contourPasses: 1,
    bedTempC: 172,
    // Glass conducts better and stores less heat than nylon (memory).
    powderConductivityWPerMK: 0.12,
    powderHeatCapacityJPerKgK: 1400,
    sievingLossShare: 0.02,
    crustLossShare: 0.1,
    feedSurplusShare: 0.05,
  },
];
