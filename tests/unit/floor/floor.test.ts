import {
  CAUTION_DEFERRAL,
  coolingTimer,
  enoughPowder,
  floorOrder,
  kgUpText,
  printTimer,
  roundUpKg,
  stageCard,
  stageCautions,
  stageChecklist,
  type TemperatureReading,
} from '../../../shared/floor';
import type { PlanStatus } from '../../../shared/plans/status';
import { cakeCoreTempC, cakeDecayPerHour, coolingEstimate } from '../../../shared/estimate';

const MIN = 60_000;
const HOUR = 3_600_000;

describe('print timer', () => {
  const base = { startedAtMs: 0, preheatSeconds: 1800, printSeconds: 7200 };
  test('counts elapsed and remaining time against the estimate, preheat first', () => {
    expect(printTimer({ ...base, nowMs: 10 * MIN })).toMatchObject({ phase: 'preheat', elapsedSeconds: 600, remainingSeconds: 6600, expectedEndMs: 2 * HOUR });
    const mid = printTimer({ ...base, nowMs: HOUR });
    expect(mid).toMatchObject({ phase: 'layers', elapsedSeconds: 3600, remainingSeconds: 3600 });
    expect(mid.fraction).toBeCloseTo(0.5, 12);
  });
  test('past the estimate the print is overdue with nothing remaining, not negative', () => {
    expect(printTimer({ ...base, nowMs: 3 * HOUR })).toMatchObject({ phase: 'overdue', remainingSeconds: 0, fraction: 1 });
  });
});

describe('cooling timers on the conduction model of the cake', () => {
  // A nylon 12 cake as the demo material and machine describe it (powder k = 0.1 W/m K, bulk 0.45 g/cm^3,
  // c = 1700 J/kg K: the order a loose polymer powder bed has, from memory), 340 x 340 x 300 mm.
  const cake = {
    sizeMm: [340, 340, 300],
    conductivityWPerMK: 0.1,
    densityGPerCm3: 0.45,
    heatCapacityJPerKgK: 1700,
    surfaceWPerM2K: 8,
    startTempC: 174,
    ambientTempC: 25,
    coolingScale: 1,
  };
  const base = { printEndedAtMs: 0, leftMachineAtMs: null, cake, removalTempC: 100, handlingTempC: 40, readings: [] as TemperatureReading[] };
  const estimate = coolingEstimate({ ...cake, removalTempC: 100, handlingTempC: 40 });

  test("without readings the card's timers are the estimate's: in the machine to the removal temperature, then outside to the handling temperature", () => {
    const early = coolingTimer({ ...base, nowMs: HOUR });
    expect(early).toMatchObject({ phase: 'in_machine', fitted: false, readingsUsed: 0 });
    expect(early.removalAtMs / 1000).toBeCloseTo(estimate.inMachineSeconds, 3);
    expect(early.handlingAtMs / 1000).toBeCloseTo(estimate.inMachineSeconds + estimate.outsideSeconds, 3);
    expect(early.predictedTempC).toBeCloseTo(cakeCoreTempC(cake, 3600), 9);
    const outside = coolingTimer({ ...base, nowMs: early.removalAtMs + HOUR });
    expect(outside).toMatchObject({ phase: 'outside', removalReached: true, handlingReached: false, remainingToRemovalSeconds: 0 });
    expect(coolingTimer({ ...base, nowMs: early.handlingAtMs + 1 })).toMatchObject({ phase: 'cooled', handlingReached: true });
  });

  test('the core lags: an hour after the print it is still within a degree of the bed, where a lumped (Newton) body would have cooled visibly', () => {
    // Heat has not reached the core yet: in a semi-infinite solid the disturbance travels about 2 sqrt(alpha t)
    // (Incropera & DeWitt §5.7), 2 sqrt(1.31e-7 x 3600) = 43 mm, far short of the 150-170 mm to the core.
    expect(coolingTimer({ ...base, nowMs: HOUR }).predictedTempC).toBeGreaterThan(173);
  });

  test('late in cooling the core falls as the first term of the series, exp(-sum zeta1^2 alpha t / L^2) (Incropera & DeWitt §5.5.2, §5.8)', () => {
    const rate = cakeDecayPerHour(cake);
    const t1 = 30;
    const t2 = 40;
    const excess = (h: number) => coolingTimer({ ...base, nowMs: h * HOUR }).predictedTempC - cake.ambientTempC;
    // The first term alone is within about 2 % once Fo > 0.2 (here Fo > 0.4 in every direction).
    expect(excess(t2) / excess(t1) / Math.exp(-rate * (t2 - t1))).toBeCloseTo(1, 1);
  });

  test('readings of a cake cooling 1.5 times as fast as the model set the pace: the timers come in by that factor', () => {
    const fast = { ...cake, coolingScale: 1.5 };
    const readings: TemperatureReading[] = [8, 12].map((h) => ({ atMs: h * HOUR, tempC: cakeCoreTempC(fast, h * 3600), place: 'machine' }));
    const timer = coolingTimer({ ...base, nowMs: 12 * HOUR, readings });
    expect(timer).toMatchObject({ fitted: true, readingsUsed: 2 });
    expect(timer.cake.coolingScale).toBeCloseTo(1.5, 6);
    expect(timer.handlingAtMs / 1000).toBeCloseTo((estimate.inMachineSeconds + estimate.outsideSeconds) / 1.5, 0);
  });

  test('a single hotter-than-expected reading moves the removal time later', () => {
    const plain = coolingTimer({ ...base, nowMs: 10 * HOUR });
    const hot = coolingTimer({ ...base, nowMs: 10 * HOUR, readings: [{ atMs: 10 * HOUR, tempC: plain.predictedTempC + 15, place: 'machine' }] });
    expect(hot.fitted).toBe(true);
    expect(hot.removalAtMs).toBeGreaterThan(plain.removalAtMs);
  });

  test("the readings' pace is held within half to twice the machine's factor", () => {
    // 173 °C after 30 hours: a probe left in the bed's heater, not a cake.
    const timer = coolingTimer({ ...base, nowMs: 30 * HOUR, readings: [{ atMs: 30 * HOUR, tempC: 160, place: 'machine' }] });
    expect(timer.cake.coolingScale).toBe(0.5);
  });

  test('a reading at or below the handling temperature unlocks breakout before the timer has run; a reading outside says the chamber left', () => {
    const timer = coolingTimer({ ...base, nowMs: 20 * HOUR, readings: [{ atMs: 19 * HOUR, tempC: 40, place: 'outside' }] });
    expect(timer.handlingReached).toBe(true);
    expect(timer.remainingToHandlingSeconds).toBe(0);
    expect(timer.outsideStartMs).toBe(19 * HOUR);
  });
});

describe("the floor's card order", () => {
  const plan = (id: string, status: PlanStatus, queuePosition: number | null = null) => ({ id, status, queuePosition });
  const started: Record<string, number> = { a: 1000, b: 2000, c: 3000 };

  test('builds under way in the order they started, then the first queued build; later queued builds wait off the floor', () => {
    const order = floorOrder([plan('q2', 'queued', 2), plan('c', 'printing'), plan('a', 'finishing'), plan('q1', 'queued', 1), plan('b', 'cooling')], (id) => started[id]);
    expect(order.map((p) => p.id)).toEqual(['a', 'b', 'c', 'q1']);
  });

  test('a build moving to its next stage keeps its card where it was, whatever order the server lists the plans in', () => {
    const before = floorOrder([plan('b', 'printing'), plan('a', 'cooling')], (id) => started[id]).map((p) => p.id);
    // "b" ends its print: two builds cooling now, listed the other way round.
    const after = floorOrder([plan('a', 'cooling'), plan('b', 'cooling')].reverse(), (id) => started[id]).map((p) => p.id);
    expect(before).toEqual(['a', 'b']);
    expect(after).toEqual(before);
  });
});

describe('stage cards', () => {
  test('every run stage shows its cautions and defers to local codes and the machine maker\'s instructions', () => {
    for (const status of ['queued', 'printing', 'cooling', 'breakout', 'finishing'] as const) {
      const card = stageCard(status);
      expect(card.cautions.length).toBeGreaterThan(0);
      expect(card.deferral).toBe(CAUTION_DEFERRAL);
    }
    expect(CAUTION_DEFERRAL).toMatch(/local codes/);
    expect(CAUTION_DEFERRAL).toMatch(/machine maker's instructions/);
    expect(stageCautions('done')).toEqual([]);
  });

  test('the cautions belong to their stage and name their sources', () => {
    const ids = (s: Parameters<typeof stageCautions>[0]) => stageCautions(s).map((c) => c.id);
    expect(ids('cooling')).toContain('hot_chamber');
    expect(ids('breakout')).toEqual(expect.arrayContaining(['hot_chamber', 'combustible_powder']));
    expect(ids('finishing')).toEqual(expect.arrayContaining(['combustible_powder', 'media_blasting']));
    expect(ids('printing')).toContain('laser');
    const all = Object.fromEntries(['queued', 'printing', 'cooling', 'breakout', 'finishing'].flatMap((s) => stageCautions(s as any)).map((c) => [c.id, c]));
    // NFPA 652 / 654 (combustible dust); OSHA 29 CFR 1910.134 (below 19.5 % oxygen is deficient); IEC 60825-1; OSHA 29 CFR 1910.94.
    expect(all.combustible_powder.reference).toMatch(/NFPA 652 and NFPA 654/);
    expect(all.combustible_powder.points.join(' ')).toMatch(/N95 \/ FFP2 or better/);
    expect(all.inert_gas.points.join(' ')).toMatch(/19\.5 %/);
    expect(all.laser.reference).toMatch(/IEC 60825-1/);
    expect(all.media_blasting.reference).toMatch(/1910\.94/);
    expect(all.hot_chamber.points.join(' ')).toMatch(/heat-resistant gloves/);
  });

  test('the pre-print checklist asks for the chamber, the window and the powder the estimate needs, with the fields the start takes', () => {
    const items = stageChecklist('queued', { freshPowderKg: 3.21, reusedPowderKg: 7.49 });
    expect(items.map((i) => i.field)).toEqual(['checklist.chamberInPlace', 'checklist.opticalWindowClean', 'freshPowderKg', 'reusedPowderKg']);
    expect(items[2]).toMatchObject({ kind: 'kg', minimumKg: 3.21 });
    expect(items[2].label).toContain('3.3 kg');
    expect(enoughPowder(3.2, 3.21)).toBe(true);
    expect(enoughPowder(3.1, 3.21)).toBe(false);
  });

  test('a powder need is shown rounded up to the tenth, so that loading what is shown covers it; a need already in tenths is shown as it is', () => {
    expect(kgUpText(0.4434)).toBe('0.5 kg');
    expect(kgUpText(1.0348)).toBe('1.1 kg');
    // 0.3 * 10 is 3.0000000000000004 in floating point: a plain ceil would show 0.4 kg.
    expect(kgUpText(0.3)).toBe('0.3 kg');
    expect(roundUpKg(0.7)).toBe(0.7);
    expect(roundUpKg(2.3)).toBe(2.3);
    for (let need = 0.01; need < 20; need += 0.137) {
      const shown = roundUpKg(need);
      expect(shown).toBeGreaterThanOrEqual(need - 1e-9);
      expect(shown - need).toBeLessThan(0.1 + 1e-9);
      expect(enoughPowder(shown, need)).toBe(true);
    }
  });

  test('breakout asks for good and failed counts of each line; finishing for powder removed, blasted, inspected', () => {
    const lines = [
      { requestLineId: 'a', partName: 'Gear', requestTitle: 'Arm', plannedCount: 12 },
      { requestLineId: 'b', partName: 'Clip', requestTitle: 'Arm', plannedCount: 4 },
    ];
    expect(stageChecklist('breakout', { lines }).map((i) => i.field)).toEqual(['counts[0].good', 'counts[0].failed', 'counts[1].good', 'counts[1].failed']);
    expect(stageChecklist('finishing').map((i) => i.id)).toEqual(['powderRemoved', 'blasted', 'inspected']);
    expect(stageChecklist('printing')).toEqual([]);
    expect(stageCard('queued').next).toEqual(['printing']);
    expect(stageCard('printing').next).toEqual(['cooling', 'aborted']);
  });
});
