import { cakeCoreTempC, type CakeThermal } from '../estimate/conduction';

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
  /** The cake as its estimate saw it, at the machine's cooling factor. */
  cake: CakeThermal;
}

export type ReadingCheckStatus = 'explained' | 'unexplained' | 'confirmed' | 'accepted';

/**
 * The coolest the cake's core can be at `atMs` by the cooling model at its fastest: the conduction model of the
 * cake (series solution for a block, Incropera & DeWitt, transient conduction chapter) with its cooling factor
 * raised by FASTEST_COOLING_FACTOR, from the bed temperature at the print's end. The model's surroundings are the
 * room in and out of the machine alike, so where the reading was taken does not change the bound.
 */
export function coolestCoreC(model: CoolingModel, atMs: number): number {
  const fastest = { ...model.cake, coolingScale: (model.cake.coolingScale ?? 1) * FASTEST_COOLING_FACTOR };
  return cakeCoreTempC(fastest, Math.max(0, (atMs - model.printEndedAtMs) / 1000));
}

/** Whether the model can explain a reading: it is no colder than the coolest the core can be, less the probe's tolerance. */
export function checkReading(model: CoolingModel, reading: { atMs: number; tempC: number }): { explained: boolean; coolestC: number } {
  const coolestC = coolestCoreC(model, reading.atMs);
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
