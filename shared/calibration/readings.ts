import { cakeCoreSecondsTo, type CakeThermal } from '../estimate/conduction';

/**
 * One recorded core reading set beside the cooling model: how long after the print's end it was taken, and how
 * long the model (at factor 1) takes to bring the cake's core down to that temperature.
 */
export interface CoolingPoint {
  actualSeconds: number;
  modelSeconds: number;
}

/**
 * Readings this close to the bed or to the room say nothing about the pace of cooling: a few degrees is within a
 * probe's tolerance (common practice: a few °C for a thermocouple probe in powder), and near the room the time to a
 * temperature grows without bound.
 */
export const POINT_MARGIN_C = 5;

/**
 * The points a run's core readings give for fitting its machine's cooling factor. Each reading (T at t after the
 * print ended) is matched to the time t_model the conduction model of the cake takes to bring its core to T; since
 * the factor divides every time of the model (it acts as a larger diffusivity), a machine cooling at factor c has
 * t = t_model / c, and c follows by least squares through the origin over every point: c = sum(t_model t) / sum(t t).
 * Readings taken before the print ended, or within POINT_MARGIN_C of the bed or the room, are left out.
 */
export function coolingPoints(
  cake: Omit<CakeThermal, 'coolingScale'>,
  readings: ReadonlyArray<{ secondsAfterPrintEnd: number; tempC: number }>,
): CoolingPoint[] {
  const points: CoolingPoint[] = [];
  for (const r of readings) {
    if (!(r.secondsAfterPrintEnd > 0)) continue;
    if (r.tempC > cake.startTempC - POINT_MARGIN_C || r.tempC < cake.ambientTempC + POINT_MARGIN_C) continue;
    const modelSeconds = cakeCoreSecondsTo({ ...cake, coolingScale: 1 }, r.tempC);
    if (Number.isFinite(modelSeconds) && modelSeconds > 0) points.push({ actualSeconds: r.secondsAfterPrintEnd, modelSeconds });
  }
  return points;
}

/** c = sum(t_model t) / sum(t t): the least-squares factor through the origin for t_model = c t; null without points. */
export function coolingScaleFromPoints(points: readonly CoolingPoint[]): number | null {
  let mt = 0;
  let tt = 0;
  for (const p of points) {
    mt += p.modelSeconds * p.actualSeconds;
    tt += p.actualSeconds * p.actualSeconds;
  }
  return tt > 0 ? mt / tt : null;
}
