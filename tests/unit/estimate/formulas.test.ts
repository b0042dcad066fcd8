import fc from 'fast-check';
import {
  arealEnergyDensityJPerMm2,
  boxAreaProfile,
  boxArraysFromPlacements,
  coolingSizeFactor,
  findAreaJumps,
  hatchSeconds,
  layerCount,
  newtonHoursTo,
  newtonTemperatureC,
  powderEstimate,
  printTimeEstimate,
  scanSpeedMmPerS,
} from '@/shared/estimate';

describe('laser scanning', () => {
  test('the worked example gives 0.04 J/mm^2 at 20 W, 5000 mm/s and 0.1 mm hatch (Gibson, Rosen & Stucker 2015, §5.4.2 eq. 5.1)', () => {
    expect(arealEnergyDensityJPerMm2(20, 5000, 0.1)).toBeCloseTo(0.04, 12);
  });

  test('the scan speed that follows from power and energy density inverts the same equation (Gibson, Rosen & Stucker 2015, eq. 5.1)', () => {
    expect(scanSpeedMmPerS(20, 0.04, 0.1)).toBeCloseTo(5000, 9);
  });

  test('hatching 100 cm^3 at h = t = 0.1 mm and 5000 mm/s takes 2000 s (derived from Gibson, Rosen & Stucker 2015, eq. 5.1)', () => {
    // 100 cm^3 as a 100 x 100 x 10 mm block: 100 layers of 10 000 mm^2.
    const boxes = boxArraysFromPlacements([{ position: [0, 0, 0], size: [100, 100, 10] }]);
    const profile = boxAreaProfile(boxes, 0.1, 100);
    const estimate = printTimeEstimate(
      profile,
      { laserPowerW: 20, recoatSeconds: 0, preheatSeconds: 0 },
      { energyDensityJPerMm2: 0.04, hatchSpacingMm: 0.1 },
    );
    expect(estimate.scanSpeedMmPerS).toBeCloseTo(5000, 9);
    expect(estimate.scanSeconds).toBeCloseTo(2000, 6);
    expect(hatchSeconds(10000, 5000, 0.1)).toBeCloseTo(20, 12);
  });

  test('at the same energy density and hatch, twice the power halves the scan time (derived from Gibson, Rosen & Stucker 2015, eq. 5.1)', () => {
    const profile = new Float32Array(200).fill(20000);
    const material = { energyDensityJPerMm2: 0.024, hatchSpacingMm: 0.25 };
    const slow = printTimeEstimate(profile, { laserPowerW: 30, recoatSeconds: 9, preheatSeconds: 0 }, material);
    const fast = printTimeEstimate(profile, { laserPowerW: 60, recoatSeconds: 9, preheatSeconds: 0 }, material);
    expect(slow.scanSeconds / fast.scanSeconds).toBeCloseTo(2, 9);
  });

  test('print time is preheat plus every layer\'s recoat and scan, empty layers included', () => {
    const profile = new Float32Array([0, 0, 1200, 1200, 0]);
    const estimate = printTimeEstimate(
      profile,
      { laserPowerW: 30, recoatSeconds: 8, preheatSeconds: 3600 },
      { energyDensityJPerMm2: 0.025, hatchSpacingMm: 0.2 },
    );
    // v = 30 / (0.025 * 0.2) = 6000 mm/s; each full layer scans 1200 / (6000 * 0.2) = 1 s.
    expect(estimate.recoatSeconds).toBeCloseTo(40, 9);
    expect(estimate.scanSeconds).toBeCloseTo(2, 9);
    expect(estimate.printSeconds).toBeCloseTo(3642, 9);
  });
});

describe('layer count', () => {
  test('95 mm of parts with a 5 mm top margin at 0.11 mm makes ceil(100 / 0.11) = 910 layers (0.11 mm: common practice; Gibson et al. p. 124 for the range)', () => {
    expect(layerCount(95, 5, 0.11)).toBe(910);
  });

  test('a stack that is an exact multiple of the layer height gets no extra layer from rounding', () => {
    // 11 / 0.11 is 100.00000000000001 in floating point.
    expect(layerCount(6, 5, 0.11)).toBe(100);
    expect(layerCount(0.33, 0, 0.11)).toBe(3);
  });

  test('the thinnest and thickest typical layers, 0.02 and 0.15 mm, give 5000 and 667 layers for 100 mm (Gibson et al. p. 124)', () => {
    expect(layerCount(100, 0, 0.02)).toBe(5000);
    expect(layerCount(100, 0, 0.15)).toBe(667);
  });
});

describe("Newton's law of cooling", () => {
  test('from 170 C in 25 C air down to 50 C takes 1.7579 / k (Edwards & Penney, Differential Equations, §1.1)', () => {
    for (const k of [0.25, 1, 3]) {
      expect(newtonHoursTo(170, 25, 50, k) * k).toBeCloseTo(1.7579, 4);
    }
  });

  test('the temperature after that time is the target (Edwards & Penney §1.1)', () => {
    const k = 0.6;
    expect(newtonTemperatureC(170, 25, k, newtonHoursTo(170, 25, 50, k))).toBeCloseTo(50, 9);
  });

  test('a cake already below the target needs no time, and a target at the surroundings is never reached', () => {
    expect(newtonHoursTo(90, 25, 100, 0.7)).toBe(0);
    expect(newtonHoursTo(170, 25, 25, 0.7)).toBe(Infinity);
  });

  test('a half-height cake cools faster by its surface-to-volume ratio over the full cake\'s', () => {
    const full = [300, 300, 380];
    const half = [300, 300, 190];
    const expected = (2 / 300 + 2 / 300 + 2 / 190) / (2 / 300 + 2 / 300 + 2 / 380);
    expect(coolingSizeFactor(half, full)).toBeCloseTo(expected, 12);
    expect(coolingSizeFactor(full, full)).toBeCloseTo(1, 12);
    expect(coolingSizeFactor([300, 300, 0.5], full)).toBe(4);
  });
});

describe('powder and parts', () => {
  test('a 100 cm^3 nylon 12 part weighs 101 g at 1.01 g/cm^3 (nylon 12 density: memory)', () => {
    const p = powderEstimate({ cakeVolumeMm3: 1e6, partsVolumeMm3: 100_000, solidDensityGPerCm3: 1.01, bulkDensityGPerCm3: 0.45, refreshRatio: 0.3 });
    expect(p.partsMassKg * 1000).toBeCloseTo(101, 9);
  });

  test('the cake weighs its volume at the bulk density, split 30 % fresh and 70 % reused (mix: Polymers 2025, 17(5):577; bulk density 0.45: memory)', () => {
    const p = powderEstimate({ cakeVolumeMm3: 300 * 300 * 100, partsVolumeMm3: 0, solidDensityGPerCm3: 1.01, bulkDensityGPerCm3: 0.45, refreshRatio: 0.3 });
    expect(p.cakeMassKg).toBeCloseTo(4.05, 9);
    expect(p.freshPowderKg).toBeCloseTo(1.215, 9);
    expect(p.reusedPowderKg).toBeCloseTo(2.835, 9);
  });

  test('packing density is the parts\' volume over the cake volume', () => {
    const p = powderEstimate({ cakeVolumeMm3: 2_000_000, partsVolumeMm3: 250_000, solidDensityGPerCm3: 1, bulkDensityGPerCm3: 0.5, refreshRatio: 0.5 });
    expect(p.packingDensity).toBeCloseTo(0.125, 12);
  });
});

describe('area per layer', () => {
  test('a box adds its footprint to exactly the layers it spans, so the profile integrates to its volume', () => {
    const boxes = boxArraysFromPlacements([
      { position: [0, 0, 5], size: [10, 20, 10] },
      { position: [50, 0, 10], size: [5, 5, 2] },
    ]);
    const profile = boxAreaProfile(boxes, 0.1, 200);
    expect(profile[49]).toBe(0);
    expect(profile[50]).toBeCloseTo(200, 4);
    expect(profile[100]).toBeCloseTo(225, 4);
    expect(profile[119]).toBeCloseTo(225, 4);
    expect(profile[120]).toBeCloseTo(200, 4);
    expect(profile[149]).toBeCloseTo(200, 4);
    expect(profile[150]).toBe(0);
    const volume = profile.reduce((s, a) => s + a * 0.1, 0);
    expect(volume).toBeCloseTo(2000 + 50, 2);
  });

  test('for boxes on layer boundaries, the profile summed over layers times the layer height is their volume', () => {
    const layerHeightMm = 0.1;
    const box = fc.record({
      x: fc.integer({ min: 1, max: 200 }),
      y: fc.integer({ min: 1, max: 200 }),
      zLayer: fc.integer({ min: 0, max: 300 }),
      layers: fc.integer({ min: 1, max: 300 }),
    });
    fc.assert(
      fc.property(fc.array(box, { minLength: 1, maxLength: 40 }), (list) => {
        const placements = list.map((b) => ({ position: [0, 0, b.zLayer * layerHeightMm], size: [b.x, b.y, b.layers * layerHeightMm] }));
        const profile = boxAreaProfile(boxArraysFromPlacements(placements), layerHeightMm, 600);
        const integral = profile.reduce((sum, a) => sum + a * layerHeightMm, 0);
        const volume = list.reduce((sum, b) => sum + b.x * b.y * b.layers * layerHeightMm, 0);
        // The profile is single precision: compare relatively.
        expect(Math.abs(integral - volume)).toBeLessThanOrEqual(1e-6 * volume);
      }),
    );
  });

  test('a part thinner than one layer is still drawn on one layer', () => {
    const boxes = boxArraysFromPlacements([{ position: [0, 0, 1.02], size: [10, 10, 0.03] }]);
    const profile = boxAreaProfile(boxes, 0.1, 20);
    expect(Array.from(profile).filter((a) => a > 0)).toHaveLength(1);
    expect(profile[10]).toBeCloseTo(100, 4);
  });

  test('a sharp rise and a sharp drop in scanned area are flagged, the first layer on bare powder is not', () => {
    const profile = new Float32Array([0, 0, 100, 110, 1000, 1000, 100, 100]);
    const jumps = findAreaJumps(profile, { minRatio: 2, minDeltaMm2: 50 });
    expect(jumps.map((j) => j.layerIndex)).toEqual([4, 6]);
    expect(jumps[0].deltaMm2).toBeCloseTo(890, 3);
    expect(jumps[1].deltaMm2).toBeCloseTo(-900, 3);
  });

  test('a change smaller than the minimum area is not flagged however large the ratio', () => {
    const profile = new Float32Array([500, 1, 20, 20]);
    expect(findAreaJumps(profile, { minRatio: 2, minDeltaMm2: 100 }).map((j) => j.layerIndex)).toEqual([1]);
  });
});
