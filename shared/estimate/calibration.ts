/**
 * Estimate factors fitted from a machine's recorded runs; all 1 when not calibrated.
 *
 * - `layerTimeScale` multiplies the machine's fixed time: preheat, each layer's recoat and its minimum layer time.
 * - `scanTimeScale` multiplies the laser's time: hatching and contours.
 * - `coolingScale` speeds the cooling model up: every cooling time is divided by it (above 1, the lab's cakes
 *   cool faster than modelled). It acts like a larger thermal diffusivity, so it keeps the model's shape.
 *
 * With the layer and scan factors equal, the whole print time scales by them.
 */
export interface CalibrationFactors {
  layerTimeScale: number;
  scanTimeScale: number;
  coolingScale: number;
  /** Recorded runs the factors were fitted from. */
  runs: number;
  /** False when there were too few runs and the factors are left at 1. */
  calibrated: boolean;
}

/** The older single print-time factor (one scale for the whole print), still accepted: both time factors take it. */
export interface PrintScaleFactors {
  printTimeScale: number;
  coolingScale: number;
  runs: number;
  calibrated: boolean;
}

export type CalibrationInput = CalibrationFactors | PrintScaleFactors;

export const NO_CALIBRATION: CalibrationFactors = { layerTimeScale: 1, scanTimeScale: 1, coolingScale: 1, runs: 0, calibrated: false };

/** A machine's fitted calibration (its separate factors) as new layouts' estimates take it: the server and the editor alike. */
export function layoutCalibration(c: { perLayerScale: number; scanScale: number; coolingScale: number; runs: number; calibrated: boolean }): CalibrationFactors {
  return { layerTimeScale: c.perLayerScale, scanTimeScale: c.scanScale, coolingScale: c.coolingScale, runs: c.runs, calibrated: c.calibrated };
}

export function calibrationFactors(input: CalibrationInput | undefined): CalibrationFactors {
  if (input === undefined) return NO_CALIBRATION;
  if ('layerTimeScale' in input) {
    return { layerTimeScale: input.layerTimeScale, scanTimeScale: input.scanTimeScale, coolingScale: input.coolingScale, runs: input.runs, calibrated: input.calibrated };
  }
  return { layerTimeScale: input.printTimeScale, scanTimeScale: input.printTimeScale, coolingScale: input.coolingScale, runs: input.runs, calibrated: input.calibrated };
}
