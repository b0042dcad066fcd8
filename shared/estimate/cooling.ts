import { cakeCoreSecondsTo, cakeDecayPerHour, cakeHalfThicknessesM, type CakeThermal } from './conduction';

/**
 * Newton's law of cooling, T(t) = A + (T0 - A) e^(-k t) (Edwards & Penney, Differential Equations, §1.1):
 * A the surrounding temperature, k the cooling constant. Kept for timers fitted to readings; the estimates use
 * the conduction model of the cake (./conduction.ts).
 */
export function newtonTemperatureC(startTempC: number, ambientTempC: number, kPerHour: number, hours: number): number {
  return ambientTempC + (startTempC - ambientTempC) * Math.exp(-kPerHour * hours);
}

/**
 * Hours to cool from T0 to T*: t = ln((T0 - A) / (T* - A)) / k.
 * 0 when the body is already at or below the target; Infinity when the target is at or below the surroundings.
 */
export function newtonHoursTo(startTempC: number, ambientTempC: number, targetTempC: number, kPerHour: number): number {
  if (startTempC <= targetTempC) return 0;
  if (targetTempC <= ambientTempC) return Infinity;
  return Math.log((startTempC - ambientTempC) / (targetTempC - ambientTempC)) / kPerHour;
}

export const COOLING_MODEL = 'conduction: series solution for a rectangular block on an insulated platform (product of three plane walls), core temperature';

export interface CoolingInput extends CakeThermal {
  removalTempC: number;
  handlingTempC: number;
}

export interface CoolingEstimate {
  model: string;
  /** In the machine, from the bed temperature until the cake's core reaches the removal temperature. */
  inMachineSeconds: number;
  /** Outside the machine, from then until the core reaches the handling temperature. */
  outsideSeconds: number;
  coolingSeconds: number;
  /**
   * The slowest mode's decay rate (1/hour), in and out of the machine alike: for screens and timers that want one
   * Newton-like constant. The core follows it once the first terms dominate.
   */
  inMachinePerHour: number;
  outsidePerHour: number;
  /** Thermal diffusivity of the powder (m^2/s) and the Biot numbers of the three directions. */
  diffusivityM2PerS: number;
  biot: [number, number, number];
}

/**
 * The cake's core, from the bed temperature: in the machine until the removal temperature, then outside until the
 * handling temperature. The surroundings are the room in both (the heaters are off once the last layer is done);
 * the calibration factor takes up what the lab's machines do differently.
 */
export function coolingEstimate(input: CoolingInput): CoolingEstimate {
  const toRemoval = cakeCoreSecondsTo(input, input.removalTempC);
  const toHandling = cakeCoreSecondsTo(input, input.handlingTempC);
  const inMachineSeconds = toRemoval;
  const outsideSeconds = Math.max(0, toHandling - toRemoval);
  const rate = cakeDecayPerHour(input);
  const alpha = input.conductivityWPerMK / (input.densityGPerCm3 * 1000 * input.heatCapacityJPerKgK);
  const biot = cakeHalfThicknessesM(input.sizeMm).map((L) => (input.surfaceWPerM2K * L) / input.conductivityWPerMK) as [number, number, number];
  return {
    model: COOLING_MODEL,
    inMachineSeconds,
    outsideSeconds,
    coolingSeconds: inMachineSeconds + outsideSeconds,
    inMachinePerHour: rate,
    outsidePerHour: rate,
    diffusivityM2PerS: alpha,
    biot,
  };
}
