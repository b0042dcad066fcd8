import { calibrateMachine, coolingPoints, coolingScaleFromPoints, type RecordedRun } from '@/shared/calibration';
import { cakeCoreTempC } from '@/shared/estimate';

// A nylon 12 cake 340 x 340 x 300 mm with the powder properties of the demo material (k = 0.1 W/m K: the order a
// loose polymer powder bed has, Yuan, Bourell & Diller, Solid Freeform Fabrication Symposium 2011, from memory).
const cake = {
  sizeMm: [340, 340, 300],
  conductivityWPerMK: 0.1,
  densityGPerCm3: 0.45,
  heatCapacityJPerKgK: 1700,
  surfaceWPerM2K: 8,
  startTempC: 174,
  ambientTempC: 25,
};

/** Core readings of a cake that really cools at `factor` times the model's pace, every `everyHours`. */
function readingsAt(factor: number, hours: number[]) {
  return hours.map((h) => ({ secondsAfterPrintEnd: h * 3600, tempC: cakeCoreTempC({ ...cake, coolingScale: factor }, h * 3600) }));
}

describe('the cooling factor from recorded core readings', () => {
  test('readings of a cake cooling 1.4 times as fast as the model give back 1.4, at every reading alike', () => {
    const points = coolingPoints(cake, readingsAt(1.4, [4, 8, 12, 20]));
    expect(points).toHaveLength(4);
    for (const p of points) expect(p.modelSeconds / p.actualSeconds).toBeCloseTo(1.4, 6);
    expect(coolingScaleFromPoints(points)).toBeCloseTo(1.4, 6);
  });

  test('readings right after the print (still at the bed temperature), near the room, or before the print ended say nothing', () => {
    const points = coolingPoints(cake, [
      { secondsAfterPrintEnd: 60, tempC: 173 },
      { secondsAfterPrintEnd: 400_000, tempC: 27 },
      { secondsAfterPrintEnd: -60, tempC: 120 },
    ]);
    expect(points).toEqual([]);
    expect(coolingScaleFromPoints(points)).toBeNull();
  });

  test('the least-squares factor through the origin is sum(t_model t) / sum(t t)', () => {
    expect(
      coolingScaleFromPoints([
        { actualSeconds: 1, modelSeconds: 1.1 },
        { actualSeconds: 2, modelSeconds: 2.5 },
        { actualSeconds: 3, modelSeconds: 3.3 },
      ]),
    ).toBeCloseTo(16 / 14, 12);
  });

  const run = (i: number, withReadings: boolean): RecordedRun => ({
    finishedAtMs: Date.UTC(2026, 0, 1 + i),
    estimatedPrintHours: 10,
    actualPrintHours: 10,
    estimatedCoolingHours: 30,
    // The whole cooling time says the model is right (breakout was late, as it often is)...
    actualCoolingHours: 30,
    // ...but the core readings say the cake cools 1.3 times as fast.
    coolingPoints: withReadings ? coolingPoints(cake, readingsAt(1.3, [6, 12, 20])) : [],
  });

  test('a machine whose runs recorded core readings is calibrated from them, not from when breakout was pressed', () => {
    const c = calibrateMachine([0, 1, 2, 3].map((i) => run(i, true)));
    expect(c.coolingFrom).toBe('readings');
    expect(c.coolingReadings).toBe(12);
    expect(c.coolingScale).toBeCloseTo(1.3, 6);
  });

  test('with readings on fewer than three runs the cooling factor comes from the whole cooling times', () => {
    const c = calibrateMachine([run(0, true), run(1, true), run(2, false), run(3, false)]);
    expect(c.coolingFrom).toBe('cooling_times');
    expect(c.coolingReadings).toBe(0);
    expect(c.coolingScale).toBeCloseTo(1, 9);
  });

  test('a reading point that is not a positive time is refused, naming it', () => {
    expect(() => calibrateMachine([{ ...run(0, false), coolingPoints: [{ actualSeconds: -1, modelSeconds: 3 }] }])).toThrow(/coolingPoints\[0\]\.actualSeconds/);
  });
});
