import { z } from 'zod';

/**
 * A machine's profile: what the estimates and the packing instance need.
 * Temperatures in degrees Celsius, times in seconds, lengths in millimetres.
 */
export const machineProfileSchema = z.strictObject({
  name: z.string().trim().min(1).max(120),
  /** Usable build volume x, y, z (mm). */
  chamberMm: z.tuple([z.number().positive().max(5000), z.number().positive().max(5000), z.number().positive().max(5000)]),
  /** Layer heights the machine can print (mm). */
  layerHeightsMm: z.array(z.number().min(0.01).max(1)).min(1).max(20),
  laserPowerW: z.number().positive().max(10000),
  recoatSeconds: z.number().min(0).max(600),
  preheatSeconds: z.number().min(0).max(86400),
  /**
   * Newton cooling constant inside the machine for the reference cake, a full chamber (1/hour);
   * the estimates scale it for other cakes by their surface-to-volume ratio.
   */
  coolingInMachinePerHour: z.number().positive().max(100),
  /** Newton cooling constant outside the machine for the reference cake, a full chamber (1/hour). */
  coolingOutsidePerHour: z.number().positive().max(100),
  /** Temperature at which the chamber may leave the machine. */
  removalTempC: z.number().min(-50).max(400),
  /** Temperature at which the cake may be broken out by hand. */
  handlingTempC: z.number().min(-50).max(400),
  ambientTempC: z.number().min(-50).max(60),
  hourlyRate: z.number().min(0).max(100000),
  /** Labour per build (setup, breakout, cleaning), hours, and its rate per hour. */
  labourHoursPerBuild: z.number().min(0).max(1000),
  labourRate: z.number().min(0).max(100000),
  /** Swappable build chambers: with 2 or more, the next build starts while the last one cools outside. */
  chamberCount: z.number().int().min(1).max(10),
});
export type MachineProfile = z.infer<typeof machineProfileSchema>;

/** A powder's profile. Densities in g/cm^3, energy density in J/mm^2. */
export const materialProfileSchema = z.strictObject({
  name: z.string().trim().min(1).max(120),
  solidDensityGPerCm3: z.number().positive().max(25),
  bulkDensityGPerCm3: z.number().positive().max(25),
  /** Share of fresh powder in each fill, 0..1. */
  refreshRatio: z.number().min(0).max(1),
  defaultLayerHeightMm: z.number().min(0.01).max(1),
  pricePerKg: z.number().min(0).max(100000),
  /** Minimum gap between parts (mm). */
  spacingMm: z.number().min(0).max(100),
  /** Keep-out from the side walls, the floor and the top (mm). */
  marginXyMm: z.number().min(0).max(500),
  marginBottomMm: z.number().min(0).max(500),
  marginTopMm: z.number().min(0).max(500),
  /** Areal energy density E = P / (v h) the powder is sintered with (J/mm^2). */
  energyDensityJPerMm2: z.number().positive().max(10),
  hatchSpacingMm: z.number().positive().max(5),
  /** Bed temperature while printing: the start of cooling. */
  bedTempC: z.number().min(-50).max(400),
});
export type MaterialProfile = z.infer<typeof materialProfileSchema>;
