import { checkReading, confirmedBy, coolestCoreC, FASTEST_COOLING_FACTOR, READING_TOLERANCE_C, type CoolingModel } from '../../../shared/floor';
import { cakeCoreTempC } from '../../../shared/estimate';

const HOUR = 3_600_000;
// The cake of a 300 mm build of nylon 12 (powder properties of the demo material; k = 0.1 W/m K: from memory).
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
const model: CoolingModel = { printEndedAtMs: 0, cake };

describe('a reading against the cooling model', () => {
  test("the coolest the core can be is the conduction model's core at twice the machine's cooling factor", () => {
    const at = 20 * HOUR;
    expect(coolestCoreC(model, at)).toBeCloseTo(cakeCoreTempC({ ...cake, coolingScale: FASTEST_COOLING_FACTOR }, 20 * 3600), 9);
    // Twice as fast means the core is where the model puts it at 40 h.
    expect(coolestCoreC(model, at)).toBeCloseTo(cakeCoreTempC(cake, 40 * 3600), 6);
  });

  test('38 °C three minutes after the print cannot be explained: the heat has not left the core, it is still at the bed temperature; 170 °C can', () => {
    // 2 sqrt(alpha t) at 3 min, twice as fast: 2 sqrt(2 x 1.31e-7 x 180) = 14 mm, far short of the core (Incropera & DeWitt §5.7).
    const cold = checkReading(model, { atMs: 3 * 60_000, tempC: 38 });
    expect(cold.explained).toBe(false);
    expect(cold.coolestC).toBeCloseTo(174, 6);
    expect(checkReading(model, { atMs: 3 * 60_000, tempC: 170 }).explained).toBe(true);
  });

  test('a reading within the probe tolerance of the coolest is explained', () => {
    const at = 24 * HOUR;
    const coolest = coolestCoreC(model, at);
    expect(checkReading(model, { atMs: at, tempC: coolest - READING_TOLERANCE_C + 0.01 }).explained).toBe(true);
    expect(checkReading(model, { atMs: at, tempC: coolest - READING_TOLERANCE_C - 0.01 }).explained).toBe(false);
  });

  test("a calibrated machine's faster cooling moves the bound with it", () => {
    const calibrated = { ...model, cake: { ...cake, coolingScale: 1.5 } };
    expect(coolestCoreC(calibrated, 20 * HOUR)).toBeLessThan(coolestCoreC(model, 20 * HOUR));
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
