import { clean } from './stock';

const DAY_MS = 86_400_000;

export interface Demand {
  /** When the build is predicted to start (its fresh powder leaves the stock then). */
  atMs: number;
  freshKg: number;
  planId: string;
  planName: string;
}

export interface ForecastInput {
  stockKg: number;
  nowMs: number;
  demands: readonly Demand[];
  reorderLevelKg: number;
  leadTimeDays: number;
}

export interface ForecastPoint {
  atMs: number;
  stockKg: number;
  planId: string | null;
}

export interface Forecast {
  points: ForecastPoint[];
  /** Fresh powder the queued builds need in all. */
  neededKg: number;
  /** First moment the stock would be below the reorder level (null: never, with this queue). */
  belowReorderAtMs: number | null;
  /** First build the stock cannot cover (null: it covers them all). */
  runsOutAtMs: number | null;
  runsOutPlanId: string | null;
  /** Below the reorder level within the lead time: an order placed now arrives only just in time. */
  shortage: boolean;
}

/**
 * Fresh stock ahead: the stock now, less each queued build's fresh powder at
 * its predicted start. Deliveries not yet received are not counted.
 */
export function forecastStock(input: ForecastInput): Forecast {
  const demands = [...input.demands].sort((a, b) => a.atMs - b.atMs);
  const points: ForecastPoint[] = [{ atMs: input.nowMs, stockKg: clean(input.stockKg), planId: null }];
  let stock = input.stockKg;
  let neededKg = 0;
  let belowReorderAtMs: number | null = stock < input.reorderLevelKg ? input.nowMs : null;
  let runsOutAtMs: number | null = null;
  let runsOutPlanId: string | null = null;
  for (const d of demands) {
    const at = Math.max(d.atMs, input.nowMs);
    if (runsOutAtMs === null && d.freshKg > stock + 1e-6) {
      runsOutAtMs = at;
      runsOutPlanId = d.planId;
    }
    stock -= d.freshKg;
    neededKg += d.freshKg;
    points.push({ atMs: at, stockKg: clean(stock), planId: d.planId });
    if (belowReorderAtMs === null && stock < input.reorderLevelKg - 1e-6) belowReorderAtMs = at;
  }
  const horizon = input.nowMs + input.leadTimeDays * DAY_MS;
  return {
    points,
    neededKg: clean(neededKg),
    belowReorderAtMs,
    runsOutAtMs,
    runsOutPlanId,
    shortage: belowReorderAtMs !== null && belowReorderAtMs <= horizon,
  };
}
