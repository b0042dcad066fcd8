import type { PrintScaleFactors as CalibrationFactors } from '../estimate/calibration';
import { InvalidInputError, isFiniteNumber, type Problem } from '../estimate/problems';
import { coolingScaleFromPoints, type CoolingPoint } from './readings';

/** One finished run of a machine: what was estimated and what happened. Hours; null when not recorded. */
export interface RecordedRun {
  /** When the run finished (epoch ms); orders the runs when every one has it. */
  finishedAtMs?: number;
  estimatedPrintHours: number | null;
  actualPrintHours: number | null;
  /** In the machine and outside, together. */
  estimatedCoolingHours: number | null;
  actualCoolingHours: number | null;
  /** Factors the run's estimate was made with (1 when left out), so a fit never compounds an earlier one. */
  printTimeScaleUsed?: number;
  coolingScaleUsed?: number;
  /**
   * The print estimate's parts (hours, before any calibration): the machine's fixed time (preheat and every
   * layer's recoat) and the laser's scan time. Left out by runs recorded before the split was kept.
   */
  estimatedFixedHours?: number | null;
  estimatedScanHours?: number | null;
  /** The run's core readings beside the conduction model (see coolingPoints); left out when none were taken. */
  coolingPoints?: readonly CoolingPoint[];
}

export interface CalibrationOptions {
  /** Fit over at most this many of the latest complete runs. Default 10. */
  lastRuns?: number;
  /** Below this many complete runs the factors stay 1 ("not calibrated"). Default 3. */
  minRuns?: number;
  /** Factors are kept within this band: outside it a recording mistake is likelier than a real machine. Default [0.5, 2]. */
  band?: readonly [number, number];
}

export interface Calibration extends CalibrationFactors {
  /** A factor hit the band and was held at its edge. */
  printTimeClamped: boolean;
  coolingClamped: boolean;
  /**
   * Separate factors on the print's two parts, fitted together: actual print = f x (preheat + recoats) + s x scan.
   * Both equal the print-time scale when the runs cannot tell them apart (too few with the split recorded,
   * or every build with the same share of scan time).
   */
  perLayerScale: number;
  scanScale: number;
  /** True when the two were fitted apart. */
  separate: boolean;
  /**
   * What the cooling factor was fitted from: the core readings against the conduction model when at least minRuns
   * of the runs used recorded some, otherwise each run's whole cooling time (print end to breakout) against its estimate.
   */
  coolingFrom: 'readings' | 'cooling_times';
  /** Readings the cooling factor was fitted from (0 when fitted from cooling times). */
  coolingReadings: number;
}

export const DEFAULT_LAST_RUNS = 10;
export const DEFAULT_MIN_RUNS = 3;
export const DEFAULT_BAND: readonly [number, number] = [0.5, 2];

function validate(runs: readonly RecordedRun[], options: CalibrationOptions): Problem[] {
  const problems: Problem[] = [];
  if (!Array.isArray(runs)) return [{ field: 'runs', message: 'must be an array' }];
  runs.forEach((run, i) => {
    for (const key of ['estimatedPrintHours', 'actualPrintHours', 'estimatedCoolingHours', 'actualCoolingHours'] as const) {
      const v = run?.[key];
      if (v !== null && (!isFiniteNumber(v) || v < 0)) problems.push({ field: `runs[${i}].${key}`, message: 'must be a non-negative number or null' });
    }
    for (const key of ['printTimeScaleUsed', 'coolingScaleUsed'] as const) {
      const v = run?.[key];
      if (v !== undefined && (!isFiniteNumber(v) || v <= 0)) problems.push({ field: `runs[${i}].${key}`, message: 'must be a positive number' });
    }
    run?.coolingPoints?.forEach((p: CoolingPoint, j: number) => {
      for (const key of ['actualSeconds', 'modelSeconds'] as const) {
        if (!isFiniteNumber(p?.[key]) || p[key] <= 0) problems.push({ field: `runs[${i}].coolingPoints[${j}].${key}`, message: 'must be a positive number' });
      }
    });
    if (run?.finishedAtMs !== undefined && !isFiniteNumber(run.finishedAtMs)) {
      problems.push({ field: `runs[${i}].finishedAtMs`, message: 'must be epoch milliseconds' });
    }
  });
  if (options.lastRuns !== undefined && (!Number.isInteger(options.lastRuns) || options.lastRuns < 1)) {
    problems.push({ field: 'options.lastRuns', message: 'must be a positive integer' });
  }
  if (options.minRuns !== undefined && (!Number.isInteger(options.minRuns) || options.minRuns < 1)) {
    problems.push({ field: 'options.minRuns', message: 'must be a positive integer' });
  }
  if (options.band !== undefined) {
    const [lo, hi] = options.band;
    if (!isFiniteNumber(lo) || !isFiniteNumber(hi) || lo <= 0 || hi < lo) {
      problems.push({ field: 'options.band', message: 'must be [low, high] with 0 < low <= high' });
    }
  }
  return problems;
}

/**
 * Least squares with two regressors, y = a x1 + b x2 (no other term; put a column of ones in x1 for an
 * intercept): the normal equations X'X [a b]' = X'y (Draper & Smith, Applied Regression Analysis, 3rd ed.,
 * §5.1, from memory) solved by Cramer's rule. Null when the columns are (nearly) proportional, so the data
 * cannot tell a from b.
 */
export function leastSquares2(x1: ArrayLike<number>, x2: ArrayLike<number>, y: ArrayLike<number>): { a: number; b: number } | null {
  let s11 = 0;
  let s12 = 0;
  let s22 = 0;
  let s1y = 0;
  let s2y = 0;
  for (let i = 0; i < y.length; i++) {
    s11 += x1[i] * x1[i];
    s12 += x1[i] * x2[i];
    s22 += x2[i] * x2[i];
    s1y += x1[i] * y[i];
    s2y += x2[i] * y[i];
  }
  const det = s11 * s22 - s12 * s12;
  // Relative to the product of the diagonal: 1 - (cosine of the angle between the columns)^2.
  if (!(s11 > 0 && s22 > 0) || det <= 1e-6 * s11 * s22) return null;
  return { a: (s1y * s22 - s12 * s2y) / det, b: (s11 * s2y - s12 * s1y) / det };
}

/** Least squares through the origin for actual = s x estimate: s = sum(a e) / sum(e e). */
export function scaleThroughOrigin(estimates: ArrayLike<number>, actuals: ArrayLike<number>): number {
  let ae = 0;
  let ee = 0;
  for (let i = 0; i < estimates.length; i++) {
    ae += actuals[i] * estimates[i];
    ee += estimates[i] * estimates[i];
  }
  return ee > 0 ? ae / ee : 1;
}

function clamp(value: number, band: readonly [number, number]): { value: number; clamped: boolean } {
  const v = Math.min(band[1], Math.max(band[0], value));
  return { value: v, clamped: v !== value };
}

/**
 * A machine's estimate factors from its recorded runs. Only complete runs count (all four hours recorded and
 * positive; an aborted run has no meaningful actual). Over the latest `lastRuns` of them:
 *
 * - print-time scale: the least-squares s in actual print = s x estimated print;
 * - per-layer and scan scales: actual print = f x (preheat + recoats) + s x scan, fitted together where the runs
 *   recorded the split and tell the two apart;
 * - cooling scale: from the recorded core readings where enough runs have them (each reading against the time the
 *   conduction model takes to reach its temperature, see coolingScaleFromPoints), otherwise the fit c of actual
 *   cooling time against its estimate, inverted, because the scale divides every cooling time.
 *
 * Each estimate is first brought back to factors 1 with the factors it was made with. The cake's size needs no
 * separate term: the conduction model already takes it (time goes as the size squared over the diffusivity).
 */
export function calibrateMachine(runs: readonly RecordedRun[], options: CalibrationOptions = {}): Calibration {
  const problems = validate(runs, options);
  if (problems.length > 0) throw new InvalidInputError(problems);
  const lastRuns = options.lastRuns ?? DEFAULT_LAST_RUNS;
  const minRuns = options.minRuns ?? DEFAULT_MIN_RUNS;
  const band = options.band ?? DEFAULT_BAND;

  const complete = runs.filter(
    (r) =>
      (r.estimatedPrintHours ?? 0) > 0 &&
      (r.actualPrintHours ?? 0) > 0 &&
      (r.estimatedCoolingHours ?? 0) > 0 &&
      (r.actualCoolingHours ?? 0) > 0,
  );
  const ordered = complete.every((r) => r.finishedAtMs !== undefined)
    ? [...complete].sort((a, b) => a.finishedAtMs! - b.finishedAtMs!)
    : complete;
  const used = ordered.slice(Math.max(0, ordered.length - lastRuns));

  if (used.length < minRuns) {
    return {
      printTimeScale: 1,
      coolingScale: 1,
      perLayerScale: 1,
      scanScale: 1,
      separate: false,
      runs: used.length,
      calibrated: false,
      printTimeClamped: false,
      coolingClamped: false,
      coolingFrom: 'cooling_times',
      coolingReadings: 0,
    };
  }

  const printEstimates = used.map((r) => r.estimatedPrintHours! / (r.printTimeScaleUsed ?? 1));
  const printActuals = used.map((r) => r.actualPrintHours!);
  // The cooling estimate was the unscaled time divided by the scale used: multiply it back.
  const coolingEstimates = used.map((r) => r.estimatedCoolingHours! * (r.coolingScaleUsed ?? 1));
  const coolingActuals = used.map((r) => r.actualCoolingHours!);

  const print = clamp(scaleThroughOrigin(printEstimates, printActuals), band);
  const withReadings = used.filter((r) => (r.coolingPoints?.length ?? 0) > 0);
  const points = withReadings.length >= minRuns ? withReadings.flatMap((r) => r.coolingPoints!) : [];
  const fromReadings = coolingScaleFromPoints(points);
  const cooling = clamp(fromReadings ?? 1 / scaleThroughOrigin(coolingEstimates, coolingActuals), band);
  // The two parts apart, over the runs that recorded them (at least minRuns).
  const split = used.filter((r) => (r.estimatedFixedHours ?? 0) > 0 && (r.estimatedScanHours ?? -1) >= 0);
  const parts =
    split.length >= minRuns
      ? leastSquares2(
          split.map((r) => r.estimatedFixedHours!),
          split.map((r) => r.estimatedScanHours!),
          split.map((r) => r.actualPrintHours!),
        )
      : null;
  const perLayer = parts ? clamp(parts.a, band) : print;
  const scan = parts ? clamp(parts.b, band) : print;
  return {
    perLayerScale: perLayer.value,
    scanScale: scan.value,
    separate: parts !== null,
    printTimeScale: print.value,
    coolingScale: cooling.value,
    runs: used.length,
    calibrated: true,
    printTimeClamped: print.clamped,
    coolingClamped: cooling.clamped,
    coolingFrom: fromReadings !== null ? 'readings' : 'cooling_times',
    coolingReadings: fromReadings !== null ? points.length : 0,
  };
}
