import { coolingPoints, coolingScaleFromPoints } from '../calibration/readings';
import { cakeCoreSecondsTo, cakeCoreTempC, type CakeThermal } from '../estimate/conduction';

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

/**
 * A run's own cooling pace from the readings taken so far: each reading against the time the conduction model of
 * the cake takes to bring its core to that temperature (shared/calibration/readings.ts), fitted by least squares
 * through the origin. Null when no reading says anything about the pace (none yet, or all too near the bed or
 * the room). The fit is held within FIT_BAND of the machine's factor: beyond it a probe in the wrong place is
 * likelier than a cake that cools that differently (the same band the machine's calibration is held to).
 */
export const FIT_BAND: readonly [number, number] = [0.5, 2];

export function runCoolingScale(cake: CakeThermal, printEndedAtMs: number, readings: readonly TemperatureReading[]): { scale: number; points: number } | null {
  const points = coolingPoints(
    cake,
    readings.map((r) => ({ secondsAfterPrintEnd: (r.atMs - printEndedAtMs) / 1000, tempC: r.tempC })),
  );
  const scale = coolingScaleFromPoints(points);
  if (scale === null || !(scale > 0)) return null;
  const machine = cake.coolingScale ?? 1;
  return { scale: Math.min(machine * FIT_BAND[1], Math.max(machine * FIT_BAND[0], scale)), points: points.length };
}

export interface CoolingTimerInput {
  printEndedAtMs: number;
  /** When the chamber left the machine, if recorded; otherwise the first reading outside, or when it reached the removal temperature. */
  leftMachineAtMs: number | null;
  nowMs: number;
  /** The cake as the estimate saw it (size, powder, surface coefficient, bed and room temperatures, the machine's cooling factor). */
  cake: CakeThermal;
  removalTempC: number;
  handlingTempC: number;
  /** Readings that count (the ones the model cannot explain are left out until confirmed or accepted). */
  readings: readonly TemperatureReading[];
}

export interface CoolingTimer {
  phase: 'in_machine' | 'outside' | 'cooled';
  /** The core's temperature now by the curve. */
  predictedTempC: number;
  /** The curve: the conduction model of the cake at `cake.coolingScale` (the readings' fit, or the machine's factor). */
  cake: CakeThermal;
  printEndedAtMs: number;
  /** True when the readings set the pace; how many of them did. */
  fitted: boolean;
  readingsUsed: number;
  removalAtMs: number;
  /** When the chamber left (or is taken to leave) the machine. */
  outsideStartMs: number;
  handlingAtMs: number;
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
 * The cooling timers of a run, on the core temperature of the conduction model of its cake (the same model as the
 * estimate, shared/estimate/conduction.ts): in the machine from the print's end down to the removal temperature,
 * then outside down to the handling temperature. The readings taken so far set the run's own pace.
 */
export function coolingTimer(input: CoolingTimerInput): CoolingTimer {
  const readings = [...input.readings].sort((a, b) => a.atMs - b.atMs);
  const own = runCoolingScale(input.cake, input.printEndedAtMs, readings);
  const cake: CakeThermal = { ...input.cake, coolingScale: own?.scale ?? input.cake.coolingScale ?? 1 };
  const at = (seconds: number) => input.printEndedAtMs + seconds * 1000;
  const removalAtMs = at(cakeCoreSecondsTo(cake, input.removalTempC));
  const handlingAtMs = at(cakeCoreSecondsTo(cake, input.handlingTempC));
  const firstOutside = readings.find((r) => r.place === 'outside');
  const outsideStartMs = input.leftMachineAtMs ?? firstOutside?.atMs ?? removalAtMs;

  const lastReading = readings.length > 0 ? readings[readings.length - 1] : null;
  const coldReading = (limitC: number) => readings.some((r) => r.tempC <= limitC);
  const handlingReached = input.nowMs >= handlingAtMs || coldReading(input.handlingTempC);
  const removalReached = handlingReached || input.nowMs >= removalAtMs || coldReading(input.removalTempC);
  const outsideNow = input.nowMs >= outsideStartMs;
  return {
    phase: handlingReached ? 'cooled' : outsideNow ? 'outside' : 'in_machine',
    predictedTempC: cakeCoreTempC(cake, Math.max(0, (input.nowMs - input.printEndedAtMs) / 1000)),
    cake,
    printEndedAtMs: input.printEndedAtMs,
    fitted: own !== null,
    readingsUsed: own?.points ?? 0,
    removalAtMs,
    outsideStartMs,
    handlingAtMs,
    remainingToRemovalSeconds: removalReached ? 0 : Math.max(0, (removalAtMs - input.nowMs) / 1000),
    remainingToHandlingSeconds: handlingReached ? 0 : Math.max(0, (handlingAtMs - input.nowMs) / 1000),
    removalReached,
    handlingReached,
    lastReading,
  };
}
