/**
 * Powder stock as a ledger: every movement is a signed amount on a fresh lot
 * or on the reused pool (lot null), and the stock is their sum.
 */

export const MOVEMENT_KINDS = ['received', 'loaded', 'recovered', 'discarded', 'adjusted'] as const;
export type MovementKind = (typeof MOVEMENT_KINDS)[number];

export interface LedgerEntry {
  kind: MovementKind;
  /** Signed: received and recovered add, loaded and discarded take, an adjustment either. */
  deltaKg: number;
  /** The fresh lot; null for the reused pool. */
  lotId: string | null;
  atMs: number;
}

/** Tolerance for comparing sums of kilograms (a milligram). */
export const KG_EPS = 1e-6;

export interface StockTotals {
  freshKg: number;
  reusedKg: number;
  byLot: Map<string, number>;
}

export function stockTotals(entries: readonly LedgerEntry[]): StockTotals {
  let freshKg = 0;
  let reusedKg = 0;
  const byLot = new Map<string, number>();
  for (const e of entries) {
    if (e.lotId === null) reusedKg += e.deltaKg;
    else {
      freshKg += e.deltaKg;
      byLot.set(e.lotId, (byLot.get(e.lotId) ?? 0) + e.deltaKg);
    }
  }
  return { freshKg: clean(freshKg), reusedKg: clean(reusedKg), byLot };
}

export interface StockPoint {
  atMs: number;
  freshKg: number;
  reusedKg: number;
}

/** The stock after each movement, in time order (movements at one moment make one point). */
export function stockSeries(entries: readonly LedgerEntry[]): StockPoint[] {
  const sorted = [...entries].sort((a, b) => a.atMs - b.atMs);
  const out: StockPoint[] = [];
  let freshKg = 0;
  let reusedKg = 0;
  for (const e of sorted) {
    if (e.lotId === null) reusedKg += e.deltaKg;
    else freshKg += e.deltaKg;
    const point = { atMs: e.atMs, freshKg: clean(freshKg), reusedKg: clean(reusedKg) };
    if (out.length > 0 && out[out.length - 1].atMs === e.atMs) out[out.length - 1] = point;
    else out.push(point);
  }
  return out;
}

/** Sums of kilograms rounded to the gram, so 0.1 + 0.2 - 0.3 reads 0. */
export function clean(kg: number): number {
  const g = Math.round(kg * 1000) / 1000;
  return Object.is(g, -0) ? 0 : g;
}
