/**
 * The estimate command line (`npm run --silent estimate -- JOB.json`) on
 * jobs built from the demo profiles: the checks a reader of its contract
 * makes. Sources: mass conservation (the cake is the parts plus the loose
 * powder); Gibson, Rosen & Stucker §5.4.2 (a volumetric energy density keeps
 * the hatch time independent of the layer height); Incropera & DeWitt,
 * transient conduction (time grows with the square of the size).
 */
import { spawnSync } from 'node:child_process';
import { join } from 'node:path';
import { demoMachines, demoMaterials } from '../../../shared/demo/profiles';

const root = join(__dirname, '..', '..', '..');
const run = (job: unknown) => spawnSync('npx', ['tsx', 'scripts/estimate.ts', '-'], { cwd: root, input: JSON.stringify(job), encoding: 'utf8', timeout: 60_000 });

const { name: _m, ...machine } = demoMachines[0];
const { name: _t, ...material } = demoMaterials[0];

/** A hand-made pack-result/1: `n` housings and `n` clips side by side in one layer band. */
function job(scale = 1, layerHeight = 0.1, machineOverrides: Record<string, unknown> = {}) {
  const placements = [];
  for (let i = 0; i < 4; i++) {
    placements.push({ id: 'housing', position: [10 + i * 70 * scale, 10, 5], size: [60 * scale, 40 * scale, 30 * scale], orientation: 'xyz' });
    placements.push({ id: 'clip', position: [10 + i * 70 * scale, 60 * scale, 5], size: [24 * scale, 12 * scale, 8 * scale], orientation: 'xyz' });
  }
  const height = 5 + 30 * scale;
  return {
    format: 'estimate-job/1',
    layout: { format: 'pack-result/1', placements, unplaced: [], height, layers: Math.ceil((height + 5) / 0.1), utilization: 0.2, elapsedMs: 1 },
    instance: { format: 'pack-instance/1', chamber: [300 * scale, 150 * scale, 380], margin: { xy: 8, bottom: 5, top: 5 }, spacing: 3, layerHeight: 0.1, parts: [] },
    parts: [
      { id: 'housing', volumeMm3: 20000 * scale ** 3 },
      { id: 'clip', volumeMm3: 800 * scale ** 3 },
    ],
    machine: { ...machine, layerHeightsMm: [0.1, 0.15], ...machineOverrides },
    material,
    layerHeight,
  };
}

function estimate(j: unknown) {
  const r = run(j);
  if (r.status !== 0) throw new Error(`estimate exited ${r.status}: ${r.stderr}`);
  return JSON.parse(r.stdout);
}

describe('npm run estimate', () => {
  const base = estimate(job());

  test('answers estimate/1 with a mass balance that holds', () => {
    expect(base.format).toBe('estimate/1');
    const p = base.powder;
    expect(p.cakeKg).toBeCloseTo(p.partsKg + p.looseKg, 9);
    // 4 x (20,000 + 800) mm^3 of solid at the material's density (g/cm^3 -> kg).
    expect(p.partsKg).toBeCloseTo((4 * 20800 / 1000) * material.solidDensityGPerCm3 / 1000, 9);
    expect(p.freshKg).toBeGreaterThanOrEqual(p.partsKg + p.lossKg - 1e-12);
    expect(p.freshKg).toBeGreaterThanOrEqual(material.refreshRatio * (p.freshKg + p.reusedKg) - 1e-12);
    expect(base.packingDensity).toBeGreaterThan(0);
    expect(base.packingDensity).toBeLessThan(1);
  });

  test('the scan time hardly depends on the layer height (0.10 vs 0.15 mm within 15 %)', () => {
    const thick = estimate(job(1, 0.15));
    expect(Math.abs(thick.print.scanS - base.print.scanS) / base.print.scanS).toBeLessThan(0.15);
    expect(thick.layers).toBeLessThan(base.layers);
  });

  test('the scan speed never exceeds the scanner\'s top speed', () => {
    const slow = estimate(job(1, 0.1, { scannerMaxSpeedMmPerS: 500 }));
    expect(slow.print.scanSpeedMmPerS).toBeLessThanOrEqual(500);
    expect(slow.print.scanS).toBeGreaterThan(base.print.scanS);
  });

  test('a cake twice as large in every direction takes at least twice as long to cool', () => {
    const big = estimate(job(2));
    expect(big.cooling.inMachineS + big.cooling.outsideS).toBeGreaterThanOrEqual(2 * (base.cooling.inMachineS + base.cooling.outsideS));
  });

  test('per-part costs add up to the build, and the larger part never costs less', () => {
    const byId = Object.fromEntries(base.cost.perPart.map((p: { id: string; each: number }) => [p.id, p.each]));
    expect(4 * byId.housing + 4 * byId.clip).toBeCloseTo(base.cost.totalBuild, 6);
    expect(byId.housing).toBeGreaterThan(byId.clip);
  });

  test("a machine given without its chamber or layer heights is the instance's chamber at the job's layer height: the same estimate", () => {
    const full = job();
    const { chamberMm: _c, layerHeightsMm: _l, ...bare } = full.machine as Record<string, unknown>;
    // The demo machine's chamber is not this instance's; the cake stood on the instance's chamber either way.
    expect(estimate({ ...full, machine: bare })).toEqual(base);
  });

  test('bad input exits 2 with one line naming the field', () => {
    const bad = job();
    (bad.layout.placements[2] as { size: number[] }).size[1] = -1;
    const r = run(bad);
    expect(r.status).toBe(2);
    expect(r.stderr.trim()).toBe('layout.placements[2].size[1] must be a positive number');
    const noFormat = run({ ...job(), format: 'estimate-job/9' });
    expect(noFormat.status).toBe(2);
    expect(noFormat.stderr).toMatch(/^format must be/);
    const badMachine = run(job(1, 0.1, { laserPowerW: -5 }));
    expect(badMachine.status).toBe(2);
    expect(badMachine.stderr).toMatch(/laserPowerW/);
  });

  /** Exits 2 with one line that matches `message`. */
  const refused = (j: unknown, message: RegExp) => {
    const r = run(j);
    expect(r.status).toBe(2);
    expect(r.stderr.trim().split('\n')).toHaveLength(1);
    expect(r.stderr.trim()).toMatch(message);
  };
  // 35 mm of layout at the instance's 0.1 mm layers: 350 numbers a profile.
  const v2 = (extra: Record<string, unknown>) => {
    const j = job();
    return { ...j, layout: { ...j.layout, format: 'pack-result/2', ...extra } };
  };

  test('a layout that no chamber holds is refused naming what is wrong, not estimated into numbers that cannot be', () => {
    // A height of 10^9 mm made the command crash (exit 1) allocating its layers.
    refused({ ...job(), layout: { ...job().layout, height: 1e9 } }, /^layout\.height must be at most the chamber's height \(380 mm\)/);
    refused(
      { ...job(), layout: { ...job().layout, placements: [{ id: 'housing', position: [250, 10, 5], size: [60, 40, 30], orientation: 'xyz' }] } },
      /^layout\.placements\[0\] reaches x = 310 mm, outside the chamber's 300 mm/,
    );
    // 2,000 copies of one housing in one place: a packing density of about 20 came out.
    const piled = job();
    refused({ ...piled, layout: { ...piled.layout, placements: Array(2000).fill(piled.layout.placements[0]) } }, /^layout\.placements hold more than the cake .*: the parts overlap$/);
    // A part heavier than its box: mass from nowhere.
    refused({ ...job(), parts: [{ id: 'housing', volumeMm3: 1e12 }, { id: 'clip', volumeMm3: 800 }] }, /^parts\[0\]\.volumeMm3 \(1000000000000\) is more than the box of its placements in the layout \(72000 mm\^3\)$/);
    // The job's layer height joins the machine's list: out of a machine's range it is named as the job's.
    refused({ ...job(), layerHeight: 1e-9 }, /^layerHeight must be from 0\.01 to 1 mm/);
  });

  test("a layout's section profiles hold one number a layer, each no larger than the chamber's floor could hold", () => {
    // Three numbers for 350 layers left the other 347 unscanned (scan time 0).
    refused(v2({ areaProfile: [1, 2, 3] }), /^layout\.areaProfile must hold one number per layer, 350 \(.*\), not 3$/);
    refused(v2({ contourProfile: Array(10).fill(5) }), /^layout\.contourProfile must hold one number per layer, 350/);
    // 10^300 mm^2 a layer came out as a print time of null.
    refused(v2({ areaProfile: Array(350).fill(1e300) }), /^layout\.areaProfile\[0\] \(1e\+300 mm\^2\) is more than the chamber's floor \(45000 mm\^2\)$/);
    refused(v2({ contourProfile: Array(350).fill(1e12) }), /^layout\.contourProfile\[0\] .* is longer than any section of the chamber's floor could be/);
    // The real numbers of a layer: the same layout's own profile is estimated by it.
    const r = run(v2({ areaProfile: Array(350).fill(2000) }));
    expect(r.status).toBe(0);
    expect(JSON.parse(r.stdout).profileSource).not.toBe('boxes');
  });
});
