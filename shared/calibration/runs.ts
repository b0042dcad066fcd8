import { DEFAULT_BAND } from './calibrate';

/** Why a run is left out of its machine's calibration unless a lead takes it back in; null when it counts. */
export type DefaultExclusion = 'aborted' | 'incomplete' | 'far_outside_model' | null;

export interface RunForCalibration {
  aborted: boolean;
  estimatedPrintHours: number | null;
  actualPrintHours: number | null;
  estimatedCoolingHours: number | null;
  actualCoolingHours: number | null;
  printTimeScaleUsed?: number;
  coolingScaleUsed?: number;
}

/** Actual over estimated (the estimate brought back to factors 1); null when either is missing. */
export function printRatio(r: RunForCalibration): number | null {
  if (!(r.estimatedPrintHours! > 0) || r.actualPrintHours == null) return null;
  return r.actualPrintHours / (r.estimatedPrintHours! / (r.printTimeScaleUsed ?? 1));
}
export function coolingRatio(r: RunForCalibration): number | null {
  if (!(r.estimatedCoolingHours! > 0) || r.actualCoolingHours == null) return null;
  return r.actualCoolingHours / (r.estimatedCoolingHours! * (r.coolingScaleUsed ?? 1));
}

/**
 * A run far outside the model says more about what happened to it (an abort, a pause, a forgotten button) than
 * about the machine: an aborted run, a run missing an hour, or one whose actual print or cooling time is outside
 * the band the factors are held to (half to twice the estimate) is left out by default, and shown as such.
 */
export function defaultExclusion(r: RunForCalibration, band: readonly [number, number] = DEFAULT_BAND): DefaultExclusion {
  if (r.aborted) return 'aborted';
  const p = printRatio(r);
  const c = coolingRatio(r);
  if (p === null || c === null || !(r.actualPrintHours! > 0) || !(r.actualCoolingHours! > 0)) return 'incomplete';
  if (p < band[0] || p > band[1] || 1 / c < band[0] || 1 / c > band[1]) return 'far_outside_model';
  return null;
}

export const EXCLUSION_TEXT: Record<Exclude<DefaultExclusion, null>, string> = {
  aborted: 'Aborted: the print did not run to its end.',
  incomplete: 'Incomplete: an hour was not recorded.',
  far_outside_model: 'Far outside the model: under half or over twice the estimate.',
};
