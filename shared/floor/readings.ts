import { newtonTemperatureC } from '../estimate/cooling';

const MS_PER_HOUR = 3_600_000;

/**
 * How much faster than the estimate a cake may plausibly cool before a reading is doubted: the same band the
 * calibration holds its factors to (a machine fitted at more than twice its model's rate is likelier a
 * recording mistake than a real machine).
 */
export const FASTEST_COOLING_FACTOR = 2;
/** A hand-held probe's tolerance in a powder cake (common practice: a few °C for a thermocouple probe). */
export const READING_TOLERANCE_C = 5;
/** An unexplained reading is confirmed by a second one taken at least this long after it (common practice: long enough for the probe to be moved and settle). */
export const CONFIRM_AFTER_MINUTES = 10;
/** ...that agrees with it within this many °C. */
export const READINGS_AGREE_C = 5;

export interface CoolingModel {
  printEndedAtMs: number;
  /** When the chamber left the machine, if recorded. */
  leftMachineAtMs: number | null;
  /** The bed temperature the cake starts at, the surroundings, and the estimate's cooling constants (1/hour). */
  startTempC: number;
  ambientTempC: number;
  inMachinePerHour: number;
  outsidePerHour: number;
}

export type ReadingCheckStatus = 'explained' | 'unexplained' | 'confirmed' | 'accepted';

/**
 * The coolest the cake's core can be at `atMs` by the cooling model, at its fastest: Newton's law
 * (Edwards & Penney, Differential Equations, §1.1) with both constants raised by FASTEST_COOLING_FACTOR,
 * in the machine until the chamber left it and outside after. A reading taken outside with no recorded
 * leaving time is given the benefit of the doubt: the chamber is taken to have left at the print's end.
 */
export function coolestCoreC(model: CoolingModel, atMs: number, place: 'machine' | 'outside'): number {
  const A = model.ambientTempC;
  const hours = Math.max(0, (atMs - model.printEndedAtMs) / MS_PER_HOUR);
  const kIn = model.inMachinePerHour * FASTEST_COOLING_FACTOR;
  const kOut = model.outsidePerHour * FASTEST_COOLING_FACTOR;
  const leftMs = place === 'outside' ? Math.min(model.leftMachineAtMs ?? model.printEndedAtMs, atMs) : (model.leftMachineAtMs ?? Infinity);
  const inHours = Math.min(hours, Math.max(0, (leftMs - model.printEndedAtMs) / MS_PER_HOUR));
  const atLeave = newtonTemperatureC(model.startTempC, A, kIn, inHours);
  return newtonTemperatureC(atLeave, A, kOut, hours - inHours);
}

/** Whether the model can explain a reading: it is no colder than the coolest the core can be, less the probe's tolerance. */
export function checkReading(model: CoolingModel, reading: { atMs: number; tempC: number; place: 'machine' | 'outside' }): { explained: boolean; coolestC: number } {
  const coolestC = coolestCoreC(model, reading.atMs, reading.place);
  return { explained: reading.tempC >= coolestC - READING_TOLERANCE_C, coolestC };
}

/**
 * The earlier unexplained reading a new reading confirms, if any: taken at least CONFIRM_AFTER_MINUTES before it
 * and within READINGS_AGREE_C of it. The latest such reading is taken.
 */
export function confirmedBy<R extends { id: string; atMs: number; tempC: number; status: ReadingCheckStatus }>(
  earlier: readonly R[],
  reading: { atMs: number; tempC: number },
): R | null {
  const candidates = earlier.filter(
    (r) => r.status === 'unexplained' && reading.atMs - r.atMs >= CONFIRM_AFTER_MINUTES * 60_000 && Math.abs(reading.tempC - r.tempC) <= READINGS_AGREE_C,
  );
  return candidates.length ? candidates.reduce((a, b) => (b.atMs > a.atMs ? b : a)) : null;
}

/** A reading counts toward the cooling timers and breakout unless the model cannot explain it and nobody confirmed or accepted it. */
export const readingCounts = (status: ReadingCheckStatus) => status !== 'unexplained';
