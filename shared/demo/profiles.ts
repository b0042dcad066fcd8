import type { MachineProfile, MaterialProfile } from '../types/profiles';

/*
 * The demo lab's machines and powders. Names are invented. Where a value comes from a published source it is
 * named; "memory" marks values recalled rather than read, "common practice" marks trade habits without a source.
 */

const LAYER_HEIGHTS_MM = [0.08, 0.1, 0.11, 0.12, 0.15];

/**
 * Cooling constants: a full nylon cake held at about 174 C, in a 25 C room, should reach the removal temperature
 * of 100 C in about an hour (common practice): ln((174 - 25) / (100 - 25)) = 0.687, so k near 0.6-0.7 per hour.
 * Outside, cooling on to 40 C over most of a day matches "cooling usually takes about as long as printing"
 * (Appl. Sci. 2024, 14(3):976) for a full build that prints in about a day: ln(75 / 15) = 1.61, k near 0.08-0.1 per hour.
 */
export const demoMachines: readonly MachineProfile[] = [
  {
    name: 'Wren',
    chamberMm: [300, 300, 380],
    layerHeightsMm: LAYER_HEIGHTS_MM,
    laserPowerW: 30,
    // Recoat 6-15 s a layer (memory: a machine setting).
    recoatSeconds: 9,
    preheatSeconds: 1.5 * 3600,
    coolingInMachinePerHour: 0.7,
    coolingOutsidePerHour: 0.1,
    removalTempC: 100,
    handlingTempC: 40,
    ambientTempC: 25,
    hourlyRate: 30,
    labourHoursPerBuild: 2,
    labourRate: 40,
    chamberCount: 1,
  },
  {
    name: 'Heron',
    chamberMm: [340, 340, 600],
    layerHeightsMm: LAYER_HEIGHTS_MM,
    laserPowerW: 60,
    recoatSeconds: 10,
    preheatSeconds: 2 * 3600,
    // A larger cake holds its heat longer.
    coolingInMachinePerHour: 0.6,
    coolingOutsidePerHour: 0.08,
    removalTempC: 100,
    handlingTempC: 40,
    ambientTempC: 25,
    hourlyRate: 45,
    labourHoursPerBuild: 2.5,
    labourRate: 40,
    chamberCount: 2,
  },
];

/**
 * Shared powder settings: 0.11 mm layers (common practice; Gibson, Rosen & Stucker 2015 p. 124 give about 0.1 mm
 * for nylon 12); 30 % fresh / 70 % used (Polymers 2025, 17(5):577); 3 mm spacing and 8 / 5 / 5 mm margins
 * (common practice); bulk densities within 0.43-0.50 g/cm^3 for unfilled nylon (memory); energy densities near the
 * 0.04 J/mm^2 example of Gibson, Rosen & Stucker 2015 §5.4.2 and hatch spacing 0.25 mm (memory).
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
    energyDensityJPerMm2: 0.024,
    hatchSpacingMm: 0.25,
    // About 174 C, inside the sintering window (Gibson, Rosen & Stucker 2015 pp. 124, 132).
    bedTempC: 174,
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
    energyDensityJPerMm2: 0.028,
    hatchSpacingMm: 0.25,
    // Below nylon 11's melting point of about 189 C (CAMEO); the offset from it is memory.
    bedTempC: 183,
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
    energyDensityJPerMm2: 0.026,
    hatchSpacingMm: 0.25,
    bedTempC: 172,
  },
];
