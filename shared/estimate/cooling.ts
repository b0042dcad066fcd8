/**
 * Cooling of the powder cake by Newton's law, T(t) = A + (T0 - A) e^(-k t)
 * (Edwards & Penney, Differential Equations, §1.1): A the surrounding temperature, k the cooling constant.
 */

export function newtonTemperatureC(startTempC: number, ambientTempC: number, kPerHour: number, hours: number): number {
  return ambientTempC + (startTempC - ambientTempC) * Math.exp(-kPerHour * hours);
}

/**
 * Hours to cool from T0 to T*: t = ln((T0 - A) / (T* - A)) / k.
 * 0 when the body is already at or below the target; Infinity when the target is at or below the surroundings,
 * which Newton's law only approaches.
 */
export function newtonHoursTo(startTempC: number, ambientTempC: number, targetTempC: number, kPerHour: number): number {
  if (startTempC <= targetTempC) return 0;
  if (targetTempC <= ambientTempC) return Infinity;
  return Math.log((startTempC - ambientTempC) / (targetTempC - ambientTempC)) / kPerHour;
}

/**
 * The cooling constant k of a lumped body is h S / (rho c V): at the same powder and surroundings it is
 * proportional to the body's surface-to-volume ratio. A machine's constants are given for its reference cake,
 * the full chamber; a shorter cake has more surface per volume and cools faster, by the ratio
 * (S/V of the cake) / (S/V of the full chamber). For a box a x b x c, S/V = 2/a + 2/b + 2/c.
 *
 * The factor is kept within [1/4, 4]: a cake of a few layers still sits on the heated piston and inside the
 * hot chamber walls, so it does not cool like a thin free plate.
 */
export const COOLING_SIZE_FACTOR_MIN = 0.25;
export const COOLING_SIZE_FACTOR_MAX = 4;

export function surfaceToVolumePerMm(sizeMm: readonly number[]): number {
  return 2 / sizeMm[0] + 2 / sizeMm[1] + 2 / sizeMm[2];
}

export function coolingSizeFactor(cakeMm: readonly number[], referenceCakeMm: readonly number[]): number {
  if (cakeMm[2] <= 0) return COOLING_SIZE_FACTOR_MAX;
  const factor = surfaceToVolumePerMm(cakeMm) / surfaceToVolumePerMm(referenceCakeMm);
  return Math.min(COOLING_SIZE_FACTOR_MAX, Math.max(COOLING_SIZE_FACTOR_MIN, factor));
}

export interface CoolingInput {
  /** Temperature the cake starts cooling from: the material's bed temperature (C). */
  startTempC: number;
  ambientTempC: number;
  removalTempC: number;
  handlingTempC: number;
  /** Machine constants for the reference (full) cake, 1/hour. */
  inMachinePerHour: number;
  outsidePerHour: number;
  cakeMm: readonly number[];
  referenceCakeMm: readonly number[];
  /** Calibration: multiplies both cooling constants (above 1 the lab's cakes cool faster than modelled). */
  coolingScale?: number;
}

export interface CoolingEstimate {
  sizeFactor: number;
  /** Constants after size scaling and calibration, 1/hour. */
  inMachinePerHour: number;
  outsidePerHour: number;
  /** In the machine, from the bed temperature down to the removal temperature. */
  inMachineSeconds: number;
  /** Outside the machine, from the removal temperature down to the handling temperature. */
  outsideSeconds: number;
  coolingSeconds: number;
}

export function coolingEstimate(input: CoolingInput): CoolingEstimate {
  const scale = input.coolingScale ?? 1;
  const sizeFactor = coolingSizeFactor(input.cakeMm, input.referenceCakeMm);
  const inMachinePerHour = input.inMachinePerHour * sizeFactor * scale;
  const outsidePerHour = input.outsidePerHour * sizeFactor * scale;
  const inMachineHours = newtonHoursTo(input.startTempC, input.ambientTempC, input.removalTempC, inMachinePerHour);
  // The chamber leaves the machine at the removal temperature, or hotter if the bed never got that hot.
  const outsideStartC = Math.min(input.startTempC, input.removalTempC);
  const outsideHours = newtonHoursTo(outsideStartC, input.ambientTempC, input.handlingTempC, outsidePerHour);
  const inMachineSeconds = inMachineHours * 3600;
  const outsideSeconds = outsideHours * 3600;
  return {
    sizeFactor,
    inMachinePerHour,
    outsidePerHour,
    inMachineSeconds,
    outsideSeconds,
    coolingSeconds: inMachineSeconds + outsideSeconds,
  };
}
