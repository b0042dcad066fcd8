import { newtonHoursTo, newtonTemperatureC } from '../estimate/cooling';

const MS_PER_HOUR = 3_600_000;

export interface PrintTimerInput {
  /** When the operator pressed Start (preheat begins), epoch ms. */
  startedAtMs: number;
  nowMs: number;
  /** From the estimate: preheat, and the whole print (preheat + layers). */
  preheatSeconds: number;
  printSeconds: number;
}

export interface PrintTimer {
  phase: 'preheat' | 'layers' | 'overdue';
  elapsedSeconds: number;
  /** 0 once the estimate has run out; the print ends when the operator records it. */
  remainingSeconds: number;
  expectedEndMs: number;
  /** Elapsed over the estimate, 0..1. */
  fraction: number;
}

/** Elapsed and remaining printing time against the estimate. */
export function printTimer(input: PrintTimerInput): PrintTimer {
  const elapsedSeconds = Math.max(0, (input.nowMs - input.startedAtMs) / 1000);
  const remainingSeconds = Math.max(0, input.printSeconds - elapsedSeconds);
  const phase = elapsedSeconds < input.preheatSeconds ? 'preheat' : remainingSeconds > 0 ? 'layers' : 'overdue';
  return {
    phase,
    elapsedSeconds,
    remainingSeconds,
    expectedEndMs: input.startedAtMs + input.printSeconds * 1000,
    fraction: input.printSeconds > 0 ? Math.min(1, elapsedSeconds / input.printSeconds) : 1,
  };
}

export type ReadingPlace = 'machine' | 'outside';
export interface TemperatureReading {
  atMs: number;
  tempC: number;
  place: ReadingPlace;
}

/** A Newton curve T(t) = A + (T_a - A) e^(-k (t - t_a)) through an anchor point. */
export interface NewtonCurve {
  anchorMs: number;
  anchorTempC: number;
  kPerHour: number;
  /** True when k comes from the readings rather than the estimate. */
  fitted: boolean;
  readingsUsed: number;
}

/** Readings closer than this to the surroundings say little about k (ln of a small difference is noise). */
const MIN_EXCESS_C = 0.5;
/** Readings spanning less than this do not fit k (common practice: a thermometer's own settling time). */
const MIN_FIT_SPAN_HOURS = 0.1;

/**
 * Newton's law of cooling (Edwards & Penney, Differential Equations, §1.1) through the readings: the curve
 * passes through the latest reading; with two or more readings far enough apart, k is the least-squares slope
 * of ln(T - A) against time (the law makes it a straight line), otherwise the estimate's k.
 */
export function fitNewton(
  readings: readonly TemperatureReading[],
  ambientTempC: number,
  fallback: { anchorMs: number; anchorTempC: number; kPerHour: number },
): NewtonCurve {
  const sorted = [...readings].sort((a, b) => a.atMs - b.atMs);
  if (sorted.length === 0) return { ...fallback, fitted: false, readingsUsed: 0 };
  const last = sorted[sorted.length - 1];
  let kPerHour = fallback.kPerHour;
  let fitted = false;
  const usable = sorted.filter((r) => r.tempC - ambientTempC > MIN_EXCESS_C);
  if (usable.length >= 2 && (usable[usable.length - 1].atMs - usable[0].atMs) / MS_PER_HOUR >= MIN_FIT_SPAN_HOURS) {
    const t = usable.map((r) => (r.atMs - usable[0].atMs) / MS_PER_HOUR);
    const y = usable.map((r) => Math.log(r.tempC - ambientTempC));
    const n = t.length;
    const tMean = t.reduce((s, v) => s + v, 0) / n;
    const yMean = y.reduce((s, v) => s + v, 0) / n;
    let sty = 0;
    let stt = 0;
    for (let i = 0; i < n; i++) {
      sty += (t[i] - tMean) * (y[i] - yMean);
      stt += (t[i] - tMean) * (t[i] - tMean);
    }
    const slope = stt > 0 ? sty / stt : 0;
    // A warming or flat series is a misread or a reading taken beside a heater: keep the estimate's k.
    if (-slope > 0) {
      kPerHour = -slope;
      fitted = true;
    }
  }
  return { anchorMs: last.atMs, anchorTempC: last.tempC, kPerHour, fitted, readingsUsed: sorted.length };
}

function curveTemp(c: NewtonCurve, ambientTempC: number, atMs: number): number {
  return newtonTemperatureC(c.anchorTempC, ambientTempC, c.kPerHour, (atMs - c.anchorMs) / MS_PER_HOUR);
}

function curveReachesMs(c: NewtonCurve, ambientTempC: number, targetC: number): number {
  return c.anchorMs + newtonHoursTo(c.anchorTempC, ambientTempC, targetC, c.kPerHour) * MS_PER_HOUR;
}

export interface CoolingTimerInput {
  printEndedAtMs: number;
  /** When the chamber left the machine, if recorded; otherwise the first reading outside, or when it reached the removal temperature. */
  leftMachineAtMs: number | null;
  nowMs: number;
  /** From the estimate: the bed temperature the cake starts at, the surroundings and the two thresholds. */
  startTempC: number;
  ambientTempC: number;
  removalTempC: number;
  handlingTempC: number;
  /** The estimate's cooling constants for this cake, 1/hour. */
  inMachinePerHour: number;
  outsidePerHour: number;
  readings: readonly TemperatureReading[];
}

export interface CoolingTimer {
  phase: 'in_machine' | 'outside' | 'cooled';
  /** The curve's temperature now. */
  predictedTempC: number;
  inMachine: NewtonCurve & { removalAtMs: number };
  outside: NewtonCurve & { startMs: number; handlingAtMs: number };
  remainingToRemovalSeconds: number;
  remainingToHandlingSeconds: number;
  /** The removal temperature is reached: by the timer or by a reading at or below it. */
  removalReached: boolean;
  /** Breakout may start: the timer has run, or a reading is at or below the handling temperature. */
  handlingReached: boolean;
  /** The latest reading, if any. */
  lastReading: TemperatureReading | null;
}

/**
 * The two cooling timers of a run: in the machine from the print's end down to the removal temperature, then
 * outside down to the handling temperature, each a Newton curve from the estimate bent through the readings.
 */
export function coolingTimer(input: CoolingTimerInput): CoolingTimer {
  const A = input.ambientTempC;
  const readings = [...input.readings].sort((a, b) => a.atMs - b.atMs);
  const machineReadings = readings.filter((r) => r.place === 'machine');
  const inMachineCurve = fitNewton(machineReadings, A, {
    anchorMs: input.printEndedAtMs,
    anchorTempC: input.startTempC,
    kPerHour: input.inMachinePerHour,
  });
  const removalAtMs = curveReachesMs(inMachineCurve, A, input.removalTempC);
  const firstOutside = readings.find((r) => r.place === 'outside');
  const outsideStartMs = input.leftMachineAtMs ?? firstOutside?.atMs ?? removalAtMs;
  const outsideStartTempC = Math.min(curveTemp(inMachineCurve, A, outsideStartMs), Math.max(input.startTempC, inMachineCurve.anchorTempC));
  const outsideReadings = readings.filter((r) => r.place === 'outside' && r.atMs >= outsideStartMs);
  const outsideCurve = fitNewton(outsideReadings, A, { anchorMs: outsideStartMs, anchorTempC: outsideStartTempC, kPerHour: input.outsidePerHour });
  const handlingAtMs = curveReachesMs(outsideCurve, A, input.handlingTempC);

  const lastReading = readings.length > 0 ? readings[readings.length - 1] : null;
  const coldReading = (limitC: number) => readings.some((r) => r.tempC <= limitC);
  const handlingReached = input.nowMs >= handlingAtMs || coldReading(input.handlingTempC);
  const removalReached = handlingReached || input.nowMs >= removalAtMs || coldReading(input.removalTempC);
  const outsideNow = input.nowMs >= outsideStartMs;
  const predictedTempC = outsideNow ? curveTemp(outsideCurve, A, input.nowMs) : curveTemp(inMachineCurve, A, input.nowMs);
  return {
    phase: handlingReached ? 'cooled' : outsideNow ? 'outside' : 'in_machine',
    predictedTempC,
    inMachine: { ...inMachineCurve, removalAtMs },
    outside: { ...outsideCurve, startMs: outsideStartMs, handlingAtMs },
    remainingToRemovalSeconds: removalReached ? 0 : Math.max(0, (removalAtMs - input.nowMs) / 1000),
    remainingToHandlingSeconds: handlingReached ? 0 : Math.max(0, (handlingAtMs - input.nowMs) / 1000),
    removalReached,
    handlingReached,
    lastReading,
  };
}
