/** Pure layout of the stock chart: scales, ticks and the readout at a time (tested without a renderer). */
import { niceStep } from '../charts/scale';

export { niceStep };

export interface StockSeriesInput {
  history: ReadonlyArray<{ atMs: number; freshKg: number; reusedKg: number }>;
  forecast: ReadonlyArray<{ atMs: number; stockKg: number; label: string | null }>;
  nowMs: number;
  reorderLevelKg: number;
}

export interface Scale {
  t0: number;
  t1: number;
  maxKg: number;
  x(atMs: number, widthPx: number): number;
  y(kg: number, heightPx: number): number;
  yTicks: number[];
  xTicks: number[];
}

const DAY_MS = 86_400_000;

export function chartScale(s: StockSeriesInput): Scale {
  const times = [...s.history.map((p) => p.atMs), ...s.forecast.map((p) => p.atMs), s.nowMs];
  const t0 = Math.min(...times, s.nowMs - 14 * DAY_MS);
  const t1 = Math.max(...times, s.nowMs + 3 * DAY_MS);
  const peak = Math.max(s.reorderLevelKg, ...s.history.map((p) => Math.max(p.freshKg, p.reusedKg)), ...s.forecast.map((p) => p.stockKg), 1);
  const step = niceStep(peak);
  const maxKg = Math.ceil(peak / step) * step;
  const yTicks: number[] = [];
  for (let v = 0; v <= maxKg + 1e-9; v += step) yTicks.push(Math.round(v * 1000) / 1000);
  const span = t1 - t0;
  const dayStep = Math.max(1, Math.ceil(span / DAY_MS / 5));
  const xTicks: number[] = [];
  const firstDay = Math.ceil(t0 / DAY_MS) * DAY_MS;
  for (let t = firstDay; t <= t1; t += dayStep * DAY_MS) xTicks.push(t);
  return {
    t0,
    t1,
    maxKg,
    x: (atMs, w) => ((atMs - t0) / (span || 1)) * w,
    y: (kg, h) => h - (Math.max(0, kg) / maxKg) * h,
    yTicks,
    xTicks,
  };
}

/** Stock as a step line: each value holds until the next movement. */
export function stepPath(points: ReadonlyArray<{ atMs: number; kg: number }>, scale: Scale, w: number, h: number, untilMs?: number): string {
  if (points.length === 0) return '';
  let d = `M${scale.x(points[0].atMs, w).toFixed(1)} ${scale.y(points[0].kg, h).toFixed(1)}`;
  for (let i = 1; i < points.length; i++) {
    const x = scale.x(points[i].atMs, w).toFixed(1);
    d += ` H${x} V${scale.y(points[i].kg, h).toFixed(1)}`;
  }
  if (untilMs !== undefined) d += ` H${scale.x(untilMs, w).toFixed(1)}`;
  return d;
}

export interface Readout {
  atMs: number;
  freshKg: number | null;
  reusedKg: number | null;
  forecastKg: number | null;
  label: string | null;
}

/** Values in force at `atMs`: the last history point at or before it, or the forecast after now. */
export function readoutAt(s: StockSeriesInput, atMs: number): Readout {
  if (atMs <= s.nowMs) {
    let h: StockSeriesInput['history'][number] | null = null;
    for (const p of s.history) if (p.atMs <= atMs) h = p;
    return { atMs, freshKg: h?.freshKg ?? null, reusedKg: h?.reusedKg ?? null, forecastKg: null, label: null };
  }
  let f: StockSeriesInput['forecast'][number] | null = null;
  for (const p of s.forecast) if (p.atMs <= atMs) f = p;
  return { atMs, freshKg: null, reusedKg: null, forecastKg: f?.stockKg ?? null, label: f?.label ?? null };
}
