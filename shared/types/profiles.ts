import { z } from 'zod';

/** The layer heights a machine may print and a material may default to (mm). */
export const LAYER_HEIGHT_MIN_MM = 0.01;
export const LAYER_HEIGHT_MAX_MM = 1;

/**
 * A machine's profile: what the estimates and the packing instance need.
 * Temperatures in degrees Celsius, times in seconds, lengths in millimetres.
 * docs/estimate.md explains how the estimates use each field.
 */
export const machineProfileSchema = z.strictObject({
  name: z.string().trim().min(1).max(120),
  /** Usable build volume x, y, z (mm). */
  chamberMm: z.tuple([z.number().positive().max(5000), z.number().positive().max(5000), z.number().positive().max(5000)]),
  /** Layer heights the machine can print (mm). */
  layerHeightsMm: z.array(z.number().min(LAYER_HEIGHT_MIN_MM).max(LAYER_HEIGHT_MAX_MM)).min(1).max(20),
  laserPowerW: z.number().positive().max(10000),
  /** The scanner's top speed (mm/s): the scan speed never exceeds it. */
  scannerMaxSpeedMmPerS: z.number().positive().max(100000),
  recoatSeconds: z.number().min(0).max(600),
  /** Shortest time a layer may take (s), so it can cool before the next one; 0 when the machine has none. */
  minLayerSeconds: z.number().min(0).max(3600),
  preheatSeconds: z.number().min(0).max(86400),
  /**
   * Heat transfer coefficient from the cake's faces to its surroundings (W/(m^2 K)), convection and radiation
   * together; free convection of gases is 2 to 25 (Incropera & DeWitt, Table 1.1).
   */
  coolingSurfaceWPerM2K: z.number().positive().max(1000),
  /** Temperature at which the chamber may leave the machine. */
  removalTempC: z.number().min(-50).max(400),
  /** Temperature at which the cake may be broken out by hand. */
  handlingTempC: z.number().min(-50).max(400),
  ambientTempC: z.number().min(-50).max(60),
  /** Machine rate per hour it is held (lab's currency). */
  hourlyRate: z.number().min(0).max(100000),
  /** Labour per build (setup, breakout, cleaning), hours, and its rate per hour. */
  labourHoursPerBuild: z.number().min(0).max(1000),
  labourRate: z.number().min(0).max(100000),
  /** Mean electrical draw while preheating and printing (kW), and the price of a kWh. */
  electricalPowerKw: z.number().min(0).max(1000),
  energyPricePerKWh: z.number().min(0).max(1000),
  /** Inert gas used while preheating, printing and cooling in the machine (m^3/h); 0 when it uses none. */
  inertGasM3PerHour: z.number().min(0).max(1000),
  inertGasPricePerM3: z.number().min(0).max(10000),
  /** Swappable build chambers: with 2 or more, the next build starts while the last one cools outside. */
  chamberCount: z.number().int().min(1).max(10),
});
export type MachineProfile = z.infer<typeof machineProfileSchema>;

/** A powder's profile. Densities in g/cm^3, energy density in J/mm^3. */
export const materialProfileSchema = z.strictObject({
  name: z.string().trim().min(1).max(120),
  solidDensityGPerCm3: z.number().positive().max(25),
  bulkDensityGPerCm3: z.number().positive().max(25),
  /** Share of fresh powder in each fill, 0..1. */
  refreshRatio: z.number().min(0).max(1),
  defaultLayerHeightMm: z.number().min(LAYER_HEIGHT_MIN_MM).max(LAYER_HEIGHT_MAX_MM),
  pricePerKg: z.number().min(0).max(100000),
  /** Minimum gap between parts (mm). */
  spacingMm: z.number().min(0).max(100),
  /** Keep-out from the side walls, the floor and the top (mm). */
  marginXyMm: z.number().min(0).max(500),
  marginBottomMm: z.number().min(0).max(500),
  marginTopMm: z.number().min(0).max(500),
  /** Volumetric energy density E_V = P / (v h t) the powder is sintered with (J/mm^3). */
  volumetricEnergyDensityJPerMm3: z.number().positive().max(100),
  hatchSpacingMm: z.number().positive().max(5),
  /** Contour passes around each cross-section, drawn at the hatch speed; 0 for none. */
  contourPasses: z.number().int().min(0).max(10),
  /** Bed temperature while printing: the start of cooling. */
  bedTempC: z.number().min(-50).max(400),
  /** Effective thermal conductivity of the packed powder (W/(m K)). */
  powderConductivityWPerMK: z.number().positive().max(100),
  /** Specific heat capacity of the powder (J/(kg K)). */
  powderHeatCapacityJPerKgK: z.number().positive().max(10000),
  /** Losses, each a share 0..1: sieving (of the loose powder), crust (of the parts' mass), feed surplus (of the cake). */
  sievingLossShare: z.number().min(0).max(1),
  crustLossShare: z.number().min(0).max(1),
  feedSurplusShare: z.number().min(0).max(1),
});
export type MaterialProfile = z.infer<typeof materialProfileSchema>;

/**
 * What a new profile starts with for the fields most labs take as given (the same values fill these fields of
 * profiles stored before they existed). The sources are in docs/estimate.md.
 */
export const machineFieldDefaults = {
  scannerMaxSpeedMmPerS: 10000,
  minLayerSeconds: 0,
  coolingSurfaceWPerM2K: 8,
  ambientTempC: 25,
  electricalPowerKw: 0,
  energyPricePerKWh: 0,
  inertGasM3PerHour: 0,
  inertGasPricePerM3: 0,
  chamberCount: 1,
} satisfies Partial<MachineProfile>;

export const materialFieldDefaults = {
  contourPasses: 1,
  powderConductivityWPerMK: 0.1,
  powderHeatCapacityJPerKgK: 1700,
  sievingLossShare: 0.02,
  crustLossShare: 0.1,
  feedSurplusShare: 0.05,
} satisfies Partial<MaterialProfile>;

/** A profile value that makes no physical sense, named by its field. */
export interface ProfileProblem {
  field: string;
  message: string;
}

/** Ambient < handling < removal, within one machine. */
export function machineSenseProblems(m: Pick<MachineProfile, 'ambientTempC' | 'handlingTempC' | 'removalTempC'>): ProfileProblem[] {
  const problems: ProfileProblem[] = [];
  if (!(m.handlingTempC > m.ambientTempC)) {
    problems.push({ field: 'handlingTempC', message: 'must be above the room temperature, which cooling only approaches' });
  }
  if (!(m.removalTempC > m.handlingTempC)) {
    problems.push({ field: 'removalTempC', message: 'must be above the handling temperature' });
  }
  return problems;
}

/** A loose powder is lighter than the solid it fuses into. */
export function materialSenseProblems(m: Pick<MaterialProfile, 'bulkDensityGPerCm3' | 'solidDensityGPerCm3'>): ProfileProblem[] {
  if (!(m.bulkDensityGPerCm3 < m.solidDensityGPerCm3)) {
    return [{ field: 'bulkDensityGPerCm3', message: 'must be below the solid density: loose powder is lighter than the fused part' }];
  }
  return [];
}

/** Removal below the bed temperature: the cake starts cooling from the bed. Machine and material together. */
export function pairSenseProblems(
  machine: Pick<MachineProfile, 'removalTempC'>,
  material: Pick<MaterialProfile, 'bedTempC'>,
): ProfileProblem[] {
  if (!(machine.removalTempC < material.bedTempC)) {
    return [{ field: 'material.bedTempC', message: `must be above the machine's removal temperature (${machine.removalTempC} °C)` }];
  }
  return [];
}

function refineWith<T>(check: (v: T) => ProfileProblem[]) {
  return (value: T, ctx: z.RefinementCtx) => {
    for (const p of check(value)) ctx.addIssue({ code: 'custom', path: [p.field], message: p.message });
  };
}

/** The profiles with their physical-sense checks: what the server stores and the settings forms submit. */
export const checkedMachineProfileSchema = machineProfileSchema.superRefine(refineWith(machineSenseProblems));
export const checkedMaterialProfileSchema = materialProfileSchema.superRefine(refineWith(materialSenseProblems));
