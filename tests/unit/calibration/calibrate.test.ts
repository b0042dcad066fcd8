import { demoMachines, demoMaterials } from '@/shared/demo/profiles';
import { calibrateMachine, scaleThroughOrigin, type RecordedRun } from '@/shared/calibration';
import { estimateLayout, InvalidInputError } from '@/shared/estimate';

/** Small seeded generator (mulberry32) so the noisy runs are the same on every test run. */
function seeded(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

function syntheticRuns(count: number, printFactor: number, coolingFactor: number, noise: number, seed = 7): RecordedRun[] {
  const random = seeded(seed);
  const runs: RecordedRun[] = [];
  for (let i = 0; i < count; i++) {
    const estimatedPrintHours = 6 + 30 * random();
    const estimatedCoolingHours = 8 + 20 * random();
    runs.push({
      finishedAtMs: Date.UTC(2026, 0, 1) + i * 86_400_000,
      estimatedPrintHours,
      actualPrintHours: printFactor * estimatedPrintHours * (1 + noise * (2 * random() - 1)),
      estimatedCoolingHours,
      actualCoolingHours: coolingFactor * estimatedCoolingHours * (1 + noise * (2 * random() - 1)),
    });
  }
  return runs;
}

describe('machine calibration', () => {
  test('the least-squares scale through the origin is sum(a e) / sum(e e)', () => {
    expect(scaleThroughOrigin([1, 2, 3], [1.1, 2.5, 3.3])).toBeCloseTo(16 / 14, 12);
  });

  test('runs that print 20 % longer than estimated, with 5 % noise, give a print-time scale near 1.2', () => {
    const c = calibrateMachine(syntheticRuns(10, 1.2, 1, 0.05));
    expect(c.calibrated).toBe(true);
    expect(c.runs).toBe(10);
    expect(c.printTimeScale).toBeGreaterThan(1.17);
    expect(c.printTimeScale).toBeLessThan(1.23);
  });

  test('cakes that cool in 80 % of the estimated time give a cooling-constant scale near 1.25', () => {
    const c = calibrateMachine(syntheticRuns(8, 1, 0.8, 0));
    expect(c.coolingScale).toBeCloseTo(1.25, 9);
    expect(c.printTimeScale).toBeCloseTo(1, 9);
  });

  test('with fewer than three complete runs the factors stay 1 and the machine is not calibrated', () => {
    const c = calibrateMachine(syntheticRuns(2, 1.5, 1.5, 0));
    expect(c).toMatchObject({ printTimeScale: 1, coolingScale: 1, runs: 2, calibrated: false });
  });

  test('only the latest runs count, so a changed machine is followed', () => {
    const old = syntheticRuns(10, 1.8, 1, 0, 1);
    const recent = syntheticRuns(10, 1.1, 1, 0, 2).map((r, i) => ({ ...r, finishedAtMs: Date.UTC(2026, 5, 1) + i * 86_400_000 }));
    // Given out of order: the finish times decide which are latest.
    const c = calibrateMachine([...recent, ...old], { lastRuns: 10 });
    expect(c.printTimeScale).toBeCloseTo(1.1, 9);
    expect(c.runs).toBe(10);
  });

  test('a factor outside the plausible band is held at its edge and reported', () => {
    const c = calibrateMachine(syntheticRuns(5, 5, 0.1, 0));
    expect(c.printTimeScale).toBe(2);
    expect(c.printTimeClamped).toBe(true);
    expect(c.coolingScale).toBe(2);
    expect(c.coolingClamped).toBe(true);
  });

  test('runs estimated with earlier factors are brought back first, so refitting does not compound', () => {
    const runs = syntheticRuns(6, 1.2, 0.8, 0).map((r) => ({
      ...r,
      estimatedPrintHours: r.estimatedPrintHours! * 1.2,
      printTimeScaleUsed: 1.2,
      estimatedCoolingHours: r.estimatedCoolingHours! / 1.25,
      coolingScaleUsed: 1.25,
    }));
    const c = calibrateMachine(runs);
    expect(c.printTimeScale).toBeCloseTo(1.2, 9);
    expect(c.coolingScale).toBeCloseTo(1.25, 9);
  });

  test('runs missing a recorded time are left out of the fit', () => {
    const runs = syntheticRuns(4, 1.3, 1, 0);
    runs.push({ estimatedPrintHours: 10, actualPrintHours: null, estimatedCoolingHours: 10, actualCoolingHours: 50 });
    runs.push({ estimatedPrintHours: 10, actualPrintHours: 0, estimatedCoolingHours: 10, actualCoolingHours: 10 });
    const c = calibrateMachine(runs);
    expect(c.runs).toBe(4);
    expect(c.printTimeScale).toBeCloseTo(1.3, 9);
    expect(c.coolingScale).toBeCloseTo(1, 9);
  });

  test('the fitted factors, given back to the estimate, bring its print time onto the recorded ones', () => {
    const [machine] = demoMachines;
    const layout = { placements: [{ position: [10, 10, 5], size: [100, 100, 60] }] };
    const raw = estimateLayout({ layout, machine, material: demoMaterials[0] });
    const hours = raw.print.printSeconds / 3600;
    const runs: RecordedRun[] = [1, 2, 3, 4].map(() => ({
      estimatedPrintHours: hours,
      actualPrintHours: hours * 1.15,
      estimatedCoolingHours: raw.cooling.coolingSeconds / 3600,
      actualCoolingHours: raw.cooling.coolingSeconds / 3600,
    }));
    const calibration = calibrateMachine(runs);
    const tuned = estimateLayout({ layout, machine, material: demoMaterials[0], calibration });
    expect(tuned.print.printSeconds / 3600).toBeCloseTo(hours * 1.15, 6);
    expect(tuned.calibration.runs).toBe(4);
  });

  test('bad records are refused with every problem named by its field', () => {
    let error: unknown;
    try {
      calibrateMachine(
        [
          { estimatedPrintHours: -1, actualPrintHours: 2, estimatedCoolingHours: 3, actualCoolingHours: Number.NaN },
          { estimatedPrintHours: 1, actualPrintHours: 2, estimatedCoolingHours: 3, actualCoolingHours: 4, printTimeScaleUsed: 0 },
        ],
        { minRuns: 0 },
      );
    } catch (e) {
      error = e;
    }
    expect(error).toBeInstanceOf(InvalidInputError);
    expect((error as InvalidInputError).problems.map((p) => p.field)).toEqual([
      'runs[0].estimatedPrintHours',
      'runs[0].actualCoolingHours',
      'runs[1].printTimeScaleUsed',
      'options.minRuns',
    ]);
  });
});
