import fc from 'fast-check';
import {
  arealEnergyDensityJPerMm2,
  boxAreaProfile,
  boxArraysFromPlacements,
  cakeCoreSecondsTo,
  cakeCoreTempC,
  findAreaJumps,
  hatchSeconds,
  layerCount,
  newtonHoursTo,
  newtonTemperatureC,
  powderEstimate,
  printTimeEstimate,
  scanSpeedMmPerS,
  slabCenterFirstTerm,
  slabCoefficient,
  slabEigenvalue,
  slabTemperatureRatio,
  volumetricEnergyDensityJPerMm3,
} from '@/shared/estimate';

const NO_LIMITS = { scannerMaxSpeedMmPerS: Infinity, minLayerSeconds: 0 };

describe('laser scanning', () => {
  test('the worked example gives 0.04 J/mm^2 at 20 W, 5000 mm/s and 0.1 mm hatch (Gibson, Rosen & Stucker 2015, §5.4.2 eq. 5.1)', () => {
    expect(arealEnergyDensityJPerMm2(20, 5000, 0.1)).toBeCloseTo(0.04, 12);
    // E_V = E_A / t: at t = 0.1 mm the same settings give 0.4 J/mm^3 (Gibson, Rosen & Stucker 2015, §5.4.2).
    expect(volumetricEnergyDensityJPerMm3(20, 5000, 0.1, 0.1)).toBeCloseTo(0.4, 12);
  });

  test('the scan speed that follows from power and E_V inverts the same equation (Gibson, Rosen & Stucker 2015, §5.4.2)', () => {
    expect(scanSpeedMmPerS(20, 0.4, 0.1, 0.1)).toEqual({ speedMmPerS: expect.closeTo(5000, 9), capped: false });
    // A thicker layer at the same E_V asks for a slower scan: v = P / (E_V h t).
    expect(scanSpeedMmPerS(20, 0.4, 0.1, 0.2).speedMmPerS).toBeCloseTo(2500, 9);
  });

  test('the scan speed never exceeds the scanner top speed; the layer then gets more energy, not less', () => {
    const s = scanSpeedMmPerS(60, 0.2, 0.25, 0.08, 12000);
    expect(s).toEqual({ speedMmPerS: 12000, capped: true });
    expect(volumetricEnergyDensityJPerMm3(60, s.speedMmPerS, 0.25, 0.08)).toBeGreaterThan(0.2);
  });

  test('hatching 100 cm^3 at h = t = 0.1 mm and 5000 mm/s takes 2000 s (derived from Gibson, Rosen & Stucker 2015, eq. 5.1)', () => {
    // 100 cm^3 as a 100 x 100 x 10 mm block: 100 layers of 10 000 mm^2.
    const boxes = boxArraysFromPlacements([{ position: [0, 0, 0], size: [100, 100, 10] }]);
    const profile = boxAreaProfile(boxes, 0.1, 100);
    const estimate = printTimeEstimate(
      profile,
      new Float32Array(100),
      0.1,
      { laserPowerW: 20, recoatSeconds: 0, preheatSeconds: 0, ...NO_LIMITS },
      { volumetricEnergyDensityJPerMm3: 0.4, hatchSpacingMm: 0.1, contourPasses: 1 },
    );
    expect(estimate.scanSpeedMmPerS).toBeCloseTo(5000, 9);
    expect(estimate.scanSeconds).toBeCloseTo(2000, 6);
    expect(hatchSeconds(10000, 5000, 0.1)).toBeCloseTo(20, 12);
  });

  test('at a fixed E_V the hatch time of a volume does not depend on the layer height (V E_V / P, from Gibson, Rosen & Stucker 2015, §5.4.2)', () => {
    const material = { volumetricEnergyDensityJPerMm3: 0.22, hatchSpacingMm: 0.25, contourPasses: 0 };
    const machine = { laserPowerW: 30, recoatSeconds: 0, preheatSeconds: 0, ...NO_LIMITS };
    const times = [0.08, 0.1, 0.12, 0.15].map((t) => {
      const layers = Math.round(30 / t);
      return printTimeEstimate(new Float32Array(layers).fill(10000), new Float32Array(layers), t, machine, material).scanSeconds;
    });
    // 300 cm^3 x 0.22 J/mm^3 / 30 W = 2200 s at every layer height.
    for (const s of times) expect(s).toBeCloseTo(2200, 3);
  });

  test('at the same E_V and hatch, twice the power halves the scan time (derived from Gibson, Rosen & Stucker 2015, §5.4.2)', () => {
    const profile = new Float32Array(200).fill(20000);
    const material = { volumetricEnergyDensityJPerMm3: 0.22, hatchSpacingMm: 0.25, contourPasses: 1 };
    const slow = printTimeEstimate(profile, new Float32Array(200), 0.11, { laserPowerW: 30, recoatSeconds: 9, preheatSeconds: 0, ...NO_LIMITS }, material);
    const fast = printTimeEstimate(profile, new Float32Array(200), 0.11, { laserPowerW: 60, recoatSeconds: 9, preheatSeconds: 0, ...NO_LIMITS }, material);
    expect(slow.scanSeconds / fast.scanSeconds).toBeCloseTo(2, 9);
  });

  test("print time is preheat plus every layer's recoat, hatch and contour, empty layers included, and short layers wait for the minimum layer time", () => {
    const area = new Float32Array([0, 0, 1200, 1200, 0]);
    const contour = new Float32Array([0, 0, 600, 600, 0]);
    const material = { volumetricEnergyDensityJPerMm3: 0.25, hatchSpacingMm: 0.2, contourPasses: 2 };
    const machine = { laserPowerW: 30, recoatSeconds: 8, preheatSeconds: 3600, scannerMaxSpeedMmPerS: 10000, minLayerSeconds: 0 };
    // v = 30 / (0.25 * 0.2 * 0.1) = 6000 mm/s; each full layer hatches 1200 / (6000 * 0.2) = 1 s and draws 2 x 600 / 6000 = 0.2 s of contour.
    const e = printTimeEstimate(area, contour, 0.1, machine, material);
    expect(e.recoatSeconds).toBeCloseTo(40, 9);
    expect(e.scanSeconds).toBeCloseTo(2, 9);
    expect(e.contourSeconds).toBeCloseTo(0.4, 9);
    expect(e.otherSeconds).toBe(0);
    expect(e.printSeconds).toBeCloseTo(3642.4, 9);
    // A 10 s minimum layer: the empty layers wait 2 s each, the full ones 10 - 9.2 = 0.8 s.
    const waited = printTimeEstimate(area, contour, 0.1, { ...machine, minLayerSeconds: 10 }, material);
    expect(waited.otherSeconds).toBeCloseTo(3 * 2 + 2 * 0.8, 9);
    expect(waited.layersSeconds).toBeCloseTo(5 * 10, 9);
  });

  test('the layer factor scales preheat, recoat and the minimum layer time, the scan factor hatch and contour; equal factors scale the whole print', () => {
    const area = new Float32Array(10).fill(5000);
    const contour = new Float32Array(10).fill(300);
    const material = { volumetricEnergyDensityJPerMm3: 0.22, hatchSpacingMm: 0.25, contourPasses: 1 };
    const machine = { laserPowerW: 30, recoatSeconds: 9, preheatSeconds: 1000, scannerMaxSpeedMmPerS: 10000, minLayerSeconds: 0 };
    const base = printTimeEstimate(area, contour, 0.11, machine, material);
    const scaled = printTimeEstimate(area, contour, 0.11, machine, material, { layerTimeScale: 1.5, scanTimeScale: 0.8 });
    expect(scaled.preheatSeconds).toBeCloseTo(base.preheatSeconds * 1.5, 9);
    expect(scaled.recoatSeconds).toBeCloseTo(base.recoatSeconds * 1.5, 9);
    expect(scaled.scanSeconds).toBeCloseTo(base.scanSeconds * 0.8, 9);
    expect(scaled.contourSeconds).toBeCloseTo(base.contourSeconds * 0.8, 9);
    const waiting = { ...machine, minLayerSeconds: 30 };
    const same = printTimeEstimate(area, contour, 0.11, waiting, material, { layerTimeScale: 1.3, scanTimeScale: 1.3 });
    expect(same.printSeconds).toBeCloseTo(printTimeEstimate(area, contour, 0.11, waiting, material).printSeconds * 1.3, 6);
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
});

describe('transient conduction (Incropera & DeWitt, Fundamentals of Heat and Mass Transfer, transient conduction chapter)', () => {
  test.each([
    // Bi, zeta1, C1 of the plane wall: Table 5.1 (values from memory; they are the roots of zeta tan zeta = Bi).
    [0.1, 0.3111, 1.0161],
    [1, 0.8603, 1.1191],
    [10, 1.4289, 1.262],
    [Infinity, 1.5708, 1.2732],
  ])('the first eigenvalue and coefficient for Bi = %p are %p and %p (Table 5.1)', (bi, zeta1, c1) => {
    const z = slabEigenvalue(bi, 1);
    expect(z).toBeCloseTo(zeta1, 4);
    expect(slabCoefficient(z)).toBeCloseTo(c1, 3);
    expect(z * Math.tan(z)).toBeCloseTo(bi === Infinity ? z * Math.tan(z) : bi, 6);
  });

  test('worked example 5.4 (6th ed.): a 40 mm pipe wall at -20 C, oil at 60 C, h = 500, k = 63.9, alpha = 18.8e-6: after 8 min the insulated face is near 42.9 C (example from memory)', () => {
    // The insulated outer face is the mid-plane of a wall of half-thickness L = 40 mm.
    const bi = (500 * 0.04) / 63.9;
    const fo = (18.8e-6 * 8 * 60) / 0.04 ** 2;
    expect(bi).toBeCloseTo(0.313, 3);
    expect(fo).toBeCloseTo(5.64, 2);
    // The book reads zeta1 = 0.5309 and C1 = 1.047 from its table for Bi = 0.313 and gets theta0* = 0.214;
    // the exact roots give 0.532 and 1.047, so theta0* agrees to the table's resolution.
    expect(slabCenterFirstTerm(bi, fo)).toBeCloseTo(0.214, 2);
    const tempC = 60 + slabTemperatureRatio(bi, fo) * (-20 - 60);
    expect(Math.abs(tempC - 42.9)).toBeLessThan(0.5);
  });

  test('for Fo > 0.2 the first term is within 2 % of the full series (Incropera & DeWitt §5.5.2)', () => {
    for (const bi of [0.1, 1, 10, 100]) {
      for (const fo of [0.2, 0.5, 2]) {
        const full = slabTemperatureRatio(bi, fo);
        expect(Math.abs(slabCenterFirstTerm(bi, fo) - full) / full).toBeLessThan(0.02);
      }
    }
  });

  test('early on, the face of a wall with a fixed surface temperature follows the semi-infinite solid, erfc(x / (2 sqrt(alpha t))) (Incropera & DeWitt §5.7)', () => {
    // At x* = 0.9 of a wall with Bi = infinity and Fo = 0.001 the heat has not reached the mid-plane: theta = erf(0.1 / (2 sqrt(0.001))).
    const erf = (x: number) => {
      // Abramowitz & Stegun 7.1.26, |error| < 1.5e-7.
      const t = 1 / (1 + 0.3275911 * x);
      const y = 1 - ((((1.061405429 * t - 1.453152027) * t + 1.421413741) * t - 0.284496736) * t + 0.254829592) * t * Math.exp(-x * x);
      return y;
    };
    const expected = erf(0.1 / (2 * Math.sqrt(0.001)));
    expect(slabTemperatureRatio(Infinity, 0.001, 0.9)).toBeCloseTo(expected, 4);
    expect(slabTemperatureRatio(Infinity, 0.001, 0)).toBeCloseTo(1, 9);
  });

  const cake = {
    sizeMm: [340, 340, 200],
    conductivityWPerMK: 0.1,
    densityGPerCm3: 0.45,
    heatCapacityJPerKgK: 1700,
    surfaceWPerM2K: 8,
    startTempC: 174,
    ambientTempC: 25,
  };

  test('a cake twice as large in every direction takes about four times as long to cool, since time goes as L^2 / alpha (Fourier number)', () => {
    const big = { ...cake, sizeMm: cake.sizeMm.map((s) => 2 * s) };
    for (const target of [100, 40]) {
      const ratio = cakeCoreSecondsTo(big, target) / cakeCoreSecondsTo(cake, target);
      // Not exactly 4: the Biot number doubles too, and a finite surface coefficient slows the small cake a little more.
      expect(ratio).toBeGreaterThan(3.3);
      expect(ratio).toBeLessThan(4.1);
    }
  });

  test('there is no ceiling: cooling time keeps growing with the cake, and a quarter-size cake cools faster still', () => {
    let last = 0;
    for (const k of [0.25, 0.5, 1, 2, 4, 8]) {
      const t = cakeCoreSecondsTo({ ...cake, sizeMm: cake.sizeMm.map((s) => s * k) }, 40);
      expect(t).toBeGreaterThan(last * 2.5);
      last = t;
    }
  });

  test('the core temperature falls from the bed temperature, passes the targets at the times given, and approaches the room', () => {
    expect(cakeCoreTempC(cake, 0)).toBeCloseTo(174, 9);
    const t100 = cakeCoreSecondsTo(cake, 100);
    expect(cakeCoreTempC(cake, t100)).toBeCloseTo(100, 2);
    expect(cakeCoreTempC(cake, 20 * t100)).toBeLessThan(30);
    expect(cakeCoreSecondsTo(cake, 25)).toBe(Infinity);
    expect(cakeCoreSecondsTo({ ...cake, startTempC: 90 }, 100)).toBe(0);
  });

  test('the cooling factor divides every time, as a larger diffusivity would', () => {
    const t = cakeCoreSecondsTo(cake, 60);
    expect(cakeCoreSecondsTo({ ...cake, coolingScale: 2 }, 60)).toBeCloseTo(t / 2, 0);
  });
});

describe('powder and parts', () => {
  const nylon12 = { solidDensityGPerCm3: 1.01, bulkDensityGPerCm3: 0.45, refreshRatio: 0.3, sievingLossShare: 0, crustLossShare: 0, feedSurplusShare: 0 };

  test('a 100 cm^3 nylon 12 part weighs 101 g at 1.01 g/cm^3 (nylon 12 density: memory)', () => {
    const p = powderEstimate({ cakeVolumeMm3: 1e6, partsVolumeMm3: 100_000, ...nylon12 });
    expect(p.partsMassKg * 1000).toBeCloseTo(101, 9);
  });

  test('the cake is the parts at the solid density plus the rest at the bulk density (mass balance)', () => {
    // 1000 cm^3 of cake holding 100 cm^3 of parts: 101 g + 900 x 0.45 = 405 g.
    const p = powderEstimate({ cakeVolumeMm3: 1e6, partsVolumeMm3: 100_000, ...nylon12 });
    expect(p.looseMassKg).toBeCloseTo(0.405, 9);
    expect(p.cakeMassKg).toBeCloseTo(0.506, 9);
    expect(p.freshPowderKg + p.reusedPowderKg).toBeCloseTo(p.fillKg, 12);
  });

  test('an empty cake splits 30 % fresh and 70 % reused (mix: Polymers 2025, 17(5):577; bulk density 0.45: memory)', () => {
    const p = powderEstimate({ cakeVolumeMm3: 300 * 300 * 100, partsVolumeMm3: 0, ...nylon12 });
    expect(p.cakeMassKg).toBeCloseTo(4.05, 9);
    expect(p.freshPowderKg).toBeCloseTo(1.215, 9);
    expect(p.reusedPowderKg).toBeCloseTo(2.835, 9);
  });

  test("a dense build asks for at least the parts' mass and the losses in fresh powder, so the used stock never grows from nothing", () => {
    // 40 % packing: parts 404 g, loose 270 g; 30 % of the 674 g fill is 202 g, less than the parts alone.
    const lossy = { ...nylon12, sievingLossShare: 0.02, crustLossShare: 0.1, feedSurplusShare: 0.05 };
    const p = powderEstimate({ cakeVolumeMm3: 1e6, partsVolumeMm3: 400_000, ...lossy });
    expect(p.freshRaisedToCoverUse).toBe(true);
    expect(p.freshPowderKg).toBeCloseTo(p.partsMassKg + p.lossKg, 12);
    expect(p.lossKg).toBeCloseTo(p.feedSurplusKg + p.crustLossKg + p.sievingLossKg, 12);
    expect(p.crustLossKg).toBeCloseTo(0.1 * p.partsMassKg, 12);
    expect(p.feedSurplusKg).toBeCloseTo(0.05 * p.cakeMassKg, 12);
    // The used stock: what returns (fill - parts - losses) minus what was taken (reused) is fresh - parts - losses >= 0.
    const returned = p.fillKg - p.partsMassKg - p.lossKg;
    expect(returned - p.reusedPowderKg).toBeGreaterThanOrEqual(-1e-12);
  });

  test('any build: fresh >= max(refresh x fill, parts + losses), and fresh + reused = fill', () => {
    fc.assert(
      fc.property(
        fc.double({ min: 0, max: 0.7, noNaN: true }),
        fc.double({ min: 0, max: 1, noNaN: true }),
        fc.double({ min: 0, max: 0.2, noNaN: true }),
        (packing, refresh, loss) => {
          const p = powderEstimate({
            cakeVolumeMm3: 1e6,
            partsVolumeMm3: packing * 1e6,
            ...nylon12,
            refreshRatio: refresh,
            sievingLossShare: loss,
            crustLossShare: loss,
            feedSurplusShare: loss,
          });
          expect(p.freshPowderKg).toBeGreaterThanOrEqual(refresh * p.fillKg - 1e-12);
          expect(p.freshPowderKg).toBeGreaterThanOrEqual(p.partsMassKg + p.lossKg - 1e-12);
          expect(p.freshPowderKg + p.reusedPowderKg).toBeCloseTo(p.fillKg, 12);
          expect(p.reusedPowderKg).toBeGreaterThanOrEqual(-1e-12);
        },
      ),
    );
  });

  test("packing density is the parts' volume over the cake volume", () => {
    const p = powderEstimate({ cakeVolumeMm3: 2_000_000, partsVolumeMm3: 250_000, ...nylon12 });
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

  test("the build's taper is not flagged: drops after which nothing above holds more than the minimum area", () => {
    // Every build's area falls to nothing where its tallest parts end (a cone's tip, a block's top face).
    expect(findAreaJumps(new Float32Array([0, 400, 400, 400, 0, 0]), { minRatio: 2, minDeltaMm2: 0 })).toEqual([]);
    // A cone's last layers shrink below the minimum before they end: the whole tip is the taper.
    expect(findAreaJumps(new Float32Array([900, 700, 500, 300, 40, 10, 0]), { minRatio: 2, minDeltaMm2: 50 })).toEqual([]);
    // Parts ending at two heights: the first end has a part fused over it and is flagged, the last is the taper.
    expect(findAreaJumps(new Float32Array([1000, 1000, 200, 200, 200, 0]), { minRatio: 2, minDeltaMm2: 50 }).map((j) => j.layerIndex)).toEqual([2]);
    // A gap in the middle of the build is not a taper: its drop and the rise after it are both flagged.
    expect(findAreaJumps(new Float32Array([500, 0, 0, 500, 500, 0]), { minRatio: 2, minDeltaMm2: 50 }).map((j) => j.layerIndex)).toEqual([1, 3]);
  });

  test('a change smaller than the minimum area is not flagged however large the ratio', () => {
    // 1 -> 20 and 20 -> 110 are large ratios but small changes; 500 -> 1 is large in both, with parts fused above it.
    const profile = new Float32Array([500, 1, 20, 20, 110, 110, 0]);
    expect(findAreaJumps(profile, { minRatio: 2, minDeltaMm2: 100 }).map((j) => j.layerIndex)).toEqual([1]);
  });
});
