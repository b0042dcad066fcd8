import {
  CAUTION_DEFERRAL,
  coolingTimer,
  enoughPowder,
  fitNewton,
  printTimer,
  stageCard,
  stageCautions,
  stageChecklist,
  type TemperatureReading,
} from '../../../shared/floor';
import { newtonHoursTo } from '../../../shared/estimate';

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

describe('cooling by Newton\'s law through the readings', () => {
  // T(t) = A + (T0 - A) e^(-k t) (Edwards & Penney, Differential Equations, §1.1).
  const curve = (t0: number, a: number, k: number, hours: number) => a + (t0 - a) * Math.exp(-k * hours);

  test('without readings the cake reaches a target on the estimate\'s curve: 170 to 50 in a 25-degree room takes 1.7579 / k hours', () => {
    // Edwards & Penney, Differential Equations, §1.1: t = ln((T0 - A) / (T* - A)) / k = ln(145 / 25) / k.
    const k = 0.8;
    const timer = coolingTimer({
      printEndedAtMs: 0,
      leftMachineAtMs: 0,
      nowMs: 0,
      startTempC: 170,
      ambientTempC: 25,
      removalTempC: 170,
      handlingTempC: 50,
      inMachinePerHour: 1,
      outsidePerHour: k,
      readings: [],
    });
    expect(timer.outside.handlingAtMs / HOUR * k).toBeCloseTo(1.7579, 4);
  });

  test('readings on an exact Newton curve give back its cooling constant', () => {
    const readings: TemperatureReading[] = [0.5, 1, 1.5, 2].map((h) => ({ atMs: h * HOUR, tempC: curve(174, 25, 0.6, h), place: 'machine' }));
    const fit = fitNewton(readings, 25, { anchorMs: 0, anchorTempC: 174, kPerHour: 0.1 });
    expect(fit.fitted).toBe(true);
    expect(fit.kPerHour).toBeCloseTo(0.6, 9);
    expect(fit.anchorMs).toBe(2 * HOUR);
  });

  test('the cake example: from 350 to 210 in 30 minutes in a 70-degree room, it reaches 100 about 96.7 minutes after it came out', () => {
    // Edwards & Penney, Differential Equations, §1.1 (from memory): k = ln 2 / 30 per minute, t = 30 ln(280/30) / ln 2 = 96.7 min.
    const readings: TemperatureReading[] = [
      { atMs: 0, tempC: 350, place: 'outside' },
      { atMs: 30 * MIN, tempC: 210, place: 'outside' },
    ];
    const timer = coolingTimer({
      printEndedAtMs: 0,
      leftMachineAtMs: 0,
      nowMs: 30 * MIN,
      startTempC: 350,
      ambientTempC: 70,
      removalTempC: 350,
      handlingTempC: 100,
      inMachinePerHour: 0.5,
      outsidePerHour: 0.2,
      readings,
    });
    expect(timer.outside.fitted).toBe(true);
    expect(timer.outside.kPerHour).toBeCloseTo((Math.log(2) / 30) * 60, 9);
    expect(timer.outside.handlingAtMs / MIN).toBeCloseTo((30 * Math.log(280 / 30)) / Math.log(2), 6);
    expect(timer.outside.handlingAtMs / MIN).toBeCloseTo(96.7, 1);
    expect(timer.remainingToHandlingSeconds / 60).toBeCloseTo(96.667 - 30, 2);
    expect(timer.phase).toBe('outside');
  });

  const machine = {
    printEndedAtMs: 0,
    leftMachineAtMs: null,
    startTempC: 174,
    ambientTempC: 25,
    removalTempC: 100,
    handlingTempC: 40,
    inMachinePerHour: 0.7,
    outsidePerHour: 0.1,
    readings: [] as TemperatureReading[],
  };

  test('without readings the timers are the estimate\'s: in the machine to the removal temperature, then outside to the handling temperature', () => {
    const removalH = newtonHoursTo(174, 25, 100, 0.7);
    const outsideH = newtonHoursTo(100, 25, 40, 0.1);
    const early = coolingTimer({ ...machine, nowMs: 0.5 * HOUR });
    expect(early.phase).toBe('in_machine');
    expect(early.inMachine.removalAtMs).toBeCloseTo(removalH * HOUR, 3);
    expect(early.remainingToRemovalSeconds).toBeCloseTo((removalH - 0.5) * 3600, 3);
    expect(early.predictedTempC).toBeCloseTo(curve(174, 25, 0.7, 0.5), 9);
    expect(early.outside.handlingAtMs).toBeCloseTo((removalH + outsideH) * HOUR, 3);
    const outside = coolingTimer({ ...machine, nowMs: (removalH + 1) * HOUR });
    expect(outside).toMatchObject({ phase: 'outside', removalReached: true, handlingReached: false, remainingToRemovalSeconds: 0 });
    expect(outside.predictedTempC).toBeCloseTo(curve(100, 25, 0.1, 1), 6);
    expect(coolingTimer({ ...machine, nowMs: (removalH + outsideH) * HOUR + 1 })).toMatchObject({ phase: 'cooled', handlingReached: true });
  });

  test('a reading at or below the handling temperature unlocks breakout before the timer has run', () => {
    const timer = coolingTimer({ ...machine, nowMs: 2 * HOUR, readings: [{ atMs: 1.9 * HOUR, tempC: 40, place: 'outside' }] });
    expect(timer.handlingReached).toBe(true);
    expect(timer.remainingToHandlingSeconds).toBe(0);
    expect(timer.outside.startMs).toBe(1.9 * HOUR);
  });

  test('a single hotter-than-expected reading moves the removal time later along the estimate\'s curve', () => {
    const plain = coolingTimer({ ...machine, nowMs: HOUR });
    const hot = coolingTimer({ ...machine, nowMs: HOUR, readings: [{ atMs: HOUR, tempC: 150, place: 'machine' }] });
    expect(hot.inMachine.fitted).toBe(false);
    expect(hot.inMachine.kPerHour).toBe(0.7);
    expect(hot.inMachine.removalAtMs).toBeCloseTo(HOUR + newtonHoursTo(150, 25, 100, 0.7) * HOUR, 3);
    expect(hot.inMachine.removalAtMs).toBeGreaterThan(plain.inMachine.removalAtMs);
  });

  test('readings that warm up are not fitted: the estimate\'s constant stays', () => {
    const readings: TemperatureReading[] = [
      { atMs: HOUR, tempC: 120, place: 'machine' },
      { atMs: 2 * HOUR, tempC: 125, place: 'machine' },
    ];
    const fit = fitNewton(readings, 25, { anchorMs: 0, anchorTempC: 174, kPerHour: 0.7 });
    expect(fit).toMatchObject({ fitted: false, kPerHour: 0.7, anchorTempC: 125 });
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
