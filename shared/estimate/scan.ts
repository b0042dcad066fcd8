/**
 * Laser scanning, from the areal energy density ("Andrew number") E = P / (v h)
 * (Gibson, Rosen & Stucker, Additive Manufacturing Technologies, 2nd ed. 2015, §5.4.2 eq. 5.1):
 * P laser power (W), v scan speed (mm/s), h hatch spacing (mm), E in J/mm^2.
 */

export function arealEnergyDensityJPerMm2(laserPowerW: number, scanSpeedMmPerS: number, hatchSpacingMm: number): number {
  return laserPowerW / (scanSpeedMmPerS * hatchSpacingMm);
}

/** The material fixes E and h, so the speed follows from the machine's power: v = P / (E h). */
export function scanSpeedMmPerS(laserPowerW: number, energyDensityJPerMm2: number, hatchSpacingMm: number): number {
  return laserPowerW / (energyDensityJPerMm2 * hatchSpacingMm);
}

/** Hatching an area A with lines h apart is a path of length A / h, drawn at speed v. */
export function hatchSeconds(areaMm2: number, scanSpeed: number, hatchSpacingMm: number): number {
  return areaMm2 / (scanSpeed * hatchSpacingMm);
}
