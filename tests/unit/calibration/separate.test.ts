import { calibrateMachine, defaultExclusion, leastSquares2, type RecordedRun } from '../../../shared/calibration';

describe('least squares with two regressors', () => {
  test("Anscombe's quartet, set I: the fit with an intercept is y = 3.00 + 0.500 x (Anscombe 1973, The American Statistician 27(1):17-21)", () => {
    const x = [10, 8, 13, 9, 11, 14, 6, 4, 12, 7, 5];
    const y = [8.04, 6.95, 7.58, 8.81, 8.33, 9.96, 7.24, 4.26, 10.84, 4.82, 5.68];
    const fit = leastSquares2(
      x.map(() => 1),
      x,
      y,
    )!;
    expect(fit.a).toBeCloseTo(3.0, 2);
    expect(fit.b).toBeCloseTo(0.5, 3);
  });

  test('the residuals are orthogonal to both columns (the normal equations, Draper & Smith, Applied Regression Analysis, §5.1, from memory)', () => {
    const x1 = [2.1, 3.4, 1.2, 5.0, 4.4, 2.8];
    const x2 = [0.4, 1.9, 0.3, 0.8, 2.5, 1.1];
    const y = [2.9, 6.1, 1.6, 6.4, 8.3, 4.2];
    const { a, b } = leastSquares2(x1, x2, y)!;
    const r = y.map((v, i) => v - a * x1[i] - b * x2[i]);
    expect(r.reduce((s, v, i) => s + v * x1[i], 0)).toBeCloseTo(0, 9);
    expect(r.reduce((s, v, i) => s + v * x2[i], 0)).toBeCloseTo(0, 9);
  });

  test('proportional columns cannot tell the two factors apart: no fit', () => {
    expect(leastSquares2([1, 2, 3], [2, 4, 6], [3, 6, 9])).toBeNull();
  });
});

describe('a machine fitted with separate per-layer and scan factors', () => {
  const run = (fixed: number, scan: number, f: number, s: number): RecordedRun => ({
    estimatedPrintHours: fixed + scan,
    actualPrintHours: f * fixed + s * scan,
    estimatedCoolingHours: 10,
    actualCoolingHours: 12,
    estimatedFixedHours: fixed,
    estimatedScanHours: scan,
  });

  test('builds with different shares of scan time recover a slower recoat (1.3) and a faster scan (0.9)', () => {
    const c = calibrateMachine([run(6, 2, 1.3, 0.9), run(4, 6, 1.3, 0.9), run(8, 8, 1.3, 0.9), run(3, 1, 1.3, 0.9)]);
    expect(c.separate).toBe(true);
    expect(c.perLayerScale).toBeCloseTo(1.3, 9);
    expect(c.scanScale).toBeCloseTo(0.9, 9);
    // The single print factor is the through-origin fit of the totals, between the two.
    expect(c.printTimeScale).toBeGreaterThan(0.9);
    expect(c.printTimeScale).toBeLessThan(1.3);
  });

  test('builds all with the same share of scan time fall back to one factor for both', () => {
    const c = calibrateMachine([run(6, 2, 1.2, 1.2), run(3, 1, 1.2, 1.2), run(12, 4, 1.2, 1.2)]);
    expect(c.separate).toBe(false);
    expect(c.perLayerScale).toBeCloseTo(1.2, 9);
    expect(c.scanScale).toBeCloseTo(1.2, 9);
  });
});

describe('which runs count by default', () => {
  const base = { aborted: false, estimatedPrintHours: 10, actualPrintHours: 11, estimatedCoolingHours: 20, actualCoolingHours: 22 };
  test('a run near its estimate counts; an aborted 3-minute run, a run missing an hour, and one at a quarter of its estimate do not', () => {
    expect(defaultExclusion(base)).toBeNull();
    expect(defaultExclusion({ ...base, aborted: true, actualPrintHours: 0.05, actualCoolingHours: null })).toBe('aborted');
    expect(defaultExclusion({ ...base, actualCoolingHours: null })).toBe('incomplete');
    expect(defaultExclusion({ ...base, actualPrintHours: 2.5 })).toBe('far_outside_model');
    expect(defaultExclusion({ ...base, actualCoolingHours: 45 })).toBe('far_outside_model');
  });
});
