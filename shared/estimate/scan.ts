/**
 * Laser scanning, from the energy density the powder is sintered with (Gibson, Rosen & Stucker, Additive
 * Manufacturing Technologies, 2nd ed. 2015, §5.4.2): areal E_A = P / (v h) (eq. 5.1, the "Andrew number") and
 * volumetric E_V = P / (v h t), with P laser power (W), v scan speed (mm/s), h hatch spacing (mm), t layer height (mm).
 */

export function arealEnergyDensityJPerMm2(laserPowerW: number, scanSpeedMmPerS: number, hatchSpacingMm: number): number {
  return laserPowerW / (scanSpeedMmPerS * hatchSpacingMm);
}

export function volumetricEnergyDensityJPerMm3(laserPowerW: number, scanSpeedMmPerS: number, hatchSpacingMm: number, layerHeightMm: number): number {
  return laserPowerW / (scanSpeedMmPerS * hatchSpacingMm * layerHeightMm);
}

/**
 * The material keeps E_V, so the speed follows from the machine's power and the layer height, v = P / (E_V h t),
 * and never exceeds the scanner's top speed (then the layer gets more energy than it needs, never less).
 */
export function scanSpeedMmPerS(
  laserPowerW: number,
  volumetricEnergyDensity: number,
  hatchSpacingMm: number,
  layerHeightMm: number,
  scannerMaxSpeedMmPerS = Infinity,
): { speedMmPerS: number; capped: boolean } {
  const wanted = laserPowerW / (volumetricEnergyDensity * hatchSpacingMm * layerHeightMm);
  return wanted > scannerMaxSpeedMmPerS ? { speedMmPerS: scannerMaxSpeedMmPerS, capped: true } : { speedMmPerS: wanted, capped: false };
}

/** Hatching an area A with lines h apart is a path of length A / h, drawn at speed v. */
export function hatchSeconds(areaMm2: number, scanSpeed: number, hatchSpacingMm: number): number {
  return areaMm2 / (scanSpeed * hatchSpacingMm);
}
