import { buildWarnings, DEFAULT_POLICY, forecastStock, proposeDraws, stockSeries, stockTotals, type LedgerEntry } from '@/shared/powder';

const DAY = 86_400_000;

describe('stock as the sum of movements', () => {
  const entries: LedgerEntry[] = [
    { kind: 'received', deltaKg: 50, lotId: 'a', atMs: 1 },
    { kind: 'received', deltaKg: 25, lotId: 'b', atMs: 2 },
    { kind: 'loaded', deltaKg: -12.3, lotId: 'a', atMs: 3 },
    { kind: 'loaded', deltaKg: -20.1, lotId: null, atMs: 3 },
    { kind: 'recovered', deltaKg: 28.4, lotId: null, atMs: 4 },
    { kind: 'adjusted', deltaKg: 0.1, lotId: null, atMs: 5 },
    { kind: 'discarded', deltaKg: -0.2, lotId: 'b', atMs: 6 },
  ];

  it('adds each lot and the reused pool separately, to the gram', () => {
    const t = stockTotals(entries);
    // 50 - 12.3 + 25 - 0.2 = 62.5; -20.1 + 28.4 + 0.1 = 8.4 (by hand)
    expect(t.freshKg).toBe(62.5);
    expect(t.reusedKg).toBe(8.4);
    expect(t.byLot.get('a')).toBeCloseTo(37.7, 9);
    expect(t.byLot.get('b')).toBeCloseTo(24.8, 9);
  });

  it('draws the stock over time, one point per moment', () => {
    const s = stockSeries(entries);
    expect(s.map((p) => p.atMs)).toEqual([1, 2, 3, 4, 5, 6]);
    expect(s[2]).toEqual({ atMs: 3, freshKg: 62.7, reusedKg: -20.1 });
    expect(s[5]).toEqual({ atMs: 6, freshKg: 62.5, reusedKg: 8.4 });
  });
});

describe('which lots to draw', () => {
  const lots = [
    { id: 'new', code: 'L-3', receivedOn: '2026-11-20', expiresOn: null, onHandKg: 40 },
    { id: 'old', code: 'L-1', receivedOn: '2026-09-01', expiresOn: null, onHandKg: 3.5 },
    { id: 'mid', code: 'L-2', receivedOn: '2026-10-15', expiresOn: '2026-11-01', onHandKg: 20 },
  ];

  it('takes the oldest lot first, to its end, and passes over an expired one (first in, first out: common practice)', () => {
    const p = proposeDraws(lots, 10, '2026-12-01');
    expect(p.draws).toEqual([
      { lotId: 'old', code: 'L-1', kg: 3.5 },
      { lotId: 'new', code: 'L-3', kg: 6.5 },
    ]);
    expect(p.shortfallKg).toBe(0);
    expect(p.skippedExpired).toEqual(['L-2']);
  });

  it('says how much is missing when the lots cannot cover the build', () => {
    const p = proposeDraws(lots, 50, '2026-10-20');
    expect(p.draws.map((d) => d.kg)).toEqual([3.5, 20, 26.5]);
    expect(proposeDraws(lots, 70, '2026-12-01').shortfallKg).toBe(26.5);
  });
});

describe('forecast of fresh stock', () => {
  const now = Date.UTC(2026, 11, 1);
  const demands = [
    { atMs: now + 1 * DAY, freshKg: 8, planId: 'p1', planName: 'one' },
    { atMs: now + 3 * DAY, freshKg: 8, planId: 'p2', planName: 'two' },
    { atMs: now + 9 * DAY, freshKg: 8, planId: 'p3', planName: 'three' },
  ];

  it('falls by each queued build at its start and flags a shortage within the lead time', () => {
    // 30 kg, reorder at 12 kg: 22 after the first, 14 after the second, 6 after the third (day 9)
    const f = forecastStock({ stockKg: 30, nowMs: now, demands, reorderLevelKg: 12, leadTimeDays: 10 });
    expect(f.points.map((p) => p.stockKg)).toEqual([30, 22, 14, 6]);
    expect(f.neededKg).toBe(24);
    expect(f.belowReorderAtMs).toBe(now + 9 * DAY);
    expect(f.shortage).toBe(true);
    expect(f.runsOutAtMs).toBeNull();
  });

  it('is no shortage when the dip comes after the lead time', () => {
    const f = forecastStock({ stockKg: 30, nowMs: now, demands, reorderLevelKg: 12, leadTimeDays: 5 });
    expect(f.shortage).toBe(false);
  });

  it('names the first build the stock cannot cover', () => {
    const f = forecastStock({ stockKg: 15, nowMs: now, demands, reorderLevelKg: 0, leadTimeDays: 5 });
    // 15 - 8 = 7 after the first; the second needs 8: 1 kg short on day 3, inside the 5-day lead time
    expect(f.runsOutPlanId).toBe('p2');
    expect(f.runsOutAtMs).toBe(now + 3 * DAY);
    expect(f.shortage).toBe(true);
  });
});

describe('warnings for a build', () => {
  it('warns of an old fill, a thin refresh and a failed melt-flow check', () => {
    // 2 fresh + 8 reused at age 4.5: fill age 8 * 4.5 / 10 = 3.6 > 3; refresh 20 % < 30 %
    const w = buildWarnings({ freshKg: 2, reusedKg: 8 }, 4.5, DEFAULT_POLICY, { mvrCm3Per10Min: 12, passed: false, released: false });
    expect(w.map((x) => x.code)).toEqual(['age', 'refresh', 'melt_flow']);
    expect(buildWarnings({ freshKg: 3, reusedKg: 7 }, 2, DEFAULT_POLICY, { mvrCm3Per10Min: 12, passed: false, released: true })).toEqual([]);
  });
});
