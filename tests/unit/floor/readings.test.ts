import { checkReading, confirmedBy, coolestCoreC, FASTEST_COOLING_FACTOR, READING_TOLERANCE_C, type CoolingModel } from '../../../shared/floor';

const HOUR = 3_600_000;
const model: CoolingModel = { printEndedAtMs: 0, leftMachineAtMs: null, startTempC: 174, ambientTempC: 25, inMachinePerHour: 0.2, outsidePerHour: 0.4 };

describe('a reading against the cooling model', () => {
  test("the coolest core follows Newton's law at twice the estimate's rate: T = A + (T0 - A) e^(-2 k t) (Edwards & Penney §1.1)", () => {
    // In the machine for 3 h: 25 + 149 e^(-0.4 x 3) = 25 + 149 x 0.30119 = 69.88 °C (e^-1.2 = 0.301194, standard tables).
    expect(coolestCoreC(model, 3 * HOUR, 'machine')).toBeCloseTo(25 + 149 * 0.301194, 3);
    expect(FASTEST_COOLING_FACTOR).toBe(2);
  });

  test('38 °C three minutes after the print cannot be explained; 170 °C can', () => {
    const cold = checkReading(model, { atMs: 3 * 60_000, tempC: 38, place: 'outside' });
    expect(cold.explained).toBe(false);
    expect(cold.coolestC).toBeGreaterThan(160);
    expect(checkReading(model, { atMs: 3 * 60_000, tempC: 170, place: 'machine' }).explained).toBe(true);
  });

  test('a reading within the probe tolerance of the coolest is explained', () => {
    const at = 2 * HOUR;
    const coolest = coolestCoreC(model, at, 'machine');
    expect(checkReading(model, { atMs: at, tempC: coolest - READING_TOLERANCE_C + 0.01, place: 'machine' }).explained).toBe(true);
    expect(checkReading(model, { atMs: at, tempC: coolest - READING_TOLERANCE_C - 0.01, place: 'machine' }).explained).toBe(false);
  });

  test('outside, after the recorded leaving, the cake cools at the faster outside rate', () => {
    const left = { ...model, leftMachineAtMs: HOUR };
    const atLeave = 25 + 149 * Math.exp(-0.4);
    expect(coolestCoreC(left, 2 * HOUR, 'outside')).toBeCloseTo(25 + (atLeave - 25) * Math.exp(-0.8), 9);
  });
});

describe('a second reading confirming an unexplained one', () => {
  const first = { id: 'a', atMs: 0, tempC: 38, status: 'unexplained' as const };
  test('agrees when at least ten minutes later and within 5 °C; not sooner, not further apart', () => {
    expect(confirmedBy([first], { atMs: 10 * 60_000, tempC: 36 })).toBe(first);
    expect(confirmedBy([first], { atMs: 9 * 60_000, tempC: 38 })).toBeNull();
    expect(confirmedBy([first], { atMs: 20 * 60_000, tempC: 44 })).toBeNull();
    expect(confirmedBy([{ ...first, status: 'explained' }], { atMs: 20 * 60_000, tempC: 38 })).toBeNull();
  });
});
