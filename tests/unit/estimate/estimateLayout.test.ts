import { demoMachines, demoMaterials } from '@/shared/demo/profiles';
import { estimateLayout, InvalidInputError, type PlacedBox } from '@/shared/estimate';
import type { MachineProfile, MaterialProfile } from '@/shared/types/profiles';

const [wren, heron] = demoMachines;
const [nylon12] = demoMaterials;

/** Boxes in a regular grid inside the usable region, `spacing` apart, as a planner's dense packing would set them. */
function gridLayout(machine: MachineProfile, material: MaterialProfile, size: [number, number, number], maxTopMm: number): PlacedBox[] {
  const boxes: PlacedBox[] = [];
  const g = material.spacingMm;
  const xy = material.marginXyMm;
  for (let z = material.marginBottomMm; z + size[2] <= maxTopMm + 1e-9; z += size[2] + g) {
    for (let y = xy; y + size[1] <= machine.chamberMm[1] - xy + 1e-9; y += size[1] + g) {
      for (let x = xy; x + size[0] <= machine.chamberMm[0] - xy + 1e-9; x += size[0] + g) {
        boxes.push({ position: [x, y, z], size: [...size] });
      }
    }
  }
  return boxes;
}

function fullHeightTop(machine: MachineProfile, material: MaterialProfile): number {
  return machine.chamberMm[2] - material.marginTopMm;
}

describe('a layout estimate', () => {
  test('counts layers as ceil((height + top margin) / layer height) at 0.11 mm (0.11 mm: common practice)', () => {
    const e = estimateLayout({
      layout: { placements: [{ position: [10, 10, 5], size: [50, 40, 90] }], heightMm: 95 },
      machine: wren,
      material: nylon12,
    });
    expect(e.layerHeightMm).toBe(0.11);
    expect(e.layerCount).toBe(910);
    expect(e.areaPerLayerMm2).toHaveLength(910);
    expect(e.cakeMm[2]).toBeCloseTo(910 * 0.11, 9);
  });

  test('takes flat typed arrays and plain placements alike', () => {
    const placements = gridLayout(wren, nylon12, [24, 12, 8], 60);
    const positionsMm = new Float32Array(placements.flatMap((p) => [...p.position]));
    const sizesMm = new Float32Array(placements.flatMap((p) => [...p.size]));
    const a = estimateLayout({ layout: { placements }, machine: wren, material: nylon12 });
    const b = estimateLayout({ layout: { positionsMm, sizesMm }, machine: wren, material: nylon12 });
    expect(b.layerCount).toBe(a.layerCount);
    expect(b.print.printSeconds).toBeCloseTo(a.print.printSeconds, 3);
    expect(b.partCount).toBe(placements.length);
  });

  test('when scanning dominates, a machine with twice the laser power prints almost twice as fast (common practice)', () => {
    // Large solid cross-sections: the scan, not the recoat, sets the pace.
    const placements = gridLayout(wren, nylon12, [60, 60, 40], 300);
    // A scanner fast enough for the doubled power (with the Wren's own 8000 mm/s, the cap would hold it back).
    const twicePower = { ...wren, laserPowerW: wren.laserPowerW * 2, scannerMaxSpeedMmPerS: 20000 };
    const capped = estimateLayout({ layout: { placements }, machine: { ...twicePower, scannerMaxSpeedMmPerS: wren.scannerMaxSpeedMmPerS }, material: nylon12 });
    expect(capped.print.scanSpeedCapped).toBe(true);
    expect(capped.print.scanSpeedMmPerS).toBe(wren.scannerMaxSpeedMmPerS);
    const slow = estimateLayout({ layout: { placements }, machine: wren, material: nylon12 });
    const fast = estimateLayout({ layout: { placements }, machine: twicePower, material: nylon12 });
    expect(slow.print.scanSeconds).toBeGreaterThan(2 * slow.print.recoatSeconds);
    const speedUp = slow.print.layersSeconds / fast.print.layersSeconds;
    expect(speedUp).toBeGreaterThan(1.6);
    expect(speedUp).toBeLessThan(2);
    expect(capped.print.layersSeconds).toBeGreaterThan(fast.print.layersSeconds);
  });

  test.each([
    ['Wren', wren],
    ['Heron', heron],
  ])('a full build in the %s prints in roughly a day and cools for about as long (common practice; Appl. Sci. 2024, 14(3):976)', (_name, machine) => {
    // Clips at 3 mm spacing; the meshes fill about a third of their bounding boxes' cross-section (assumption for the check).
    const placements = gridLayout(machine, nylon12, [24, 12, 8], fullHeightTop(machine, nylon12));
    const boxes = estimateLayout({ layout: { placements }, machine, material: nylon12 });
    const meshLike = boxes.areaPerLayerMm2.map((a) => a / 3);
    const e = estimateLayout({ layout: { placements }, machine, material: nylon12, areaPerLayerMm2: meshLike });
    const printHours = e.print.printSeconds / 3600;
    expect(printHours).toBeGreaterThan(12);
    expect(printHours).toBeLessThan(36);
    const ratio = e.cooling.coolingSeconds / e.print.printSeconds;
    expect(ratio).toBeGreaterThan(0.5);
    expect(ratio).toBeLessThan(2);
  });

  test('a dense build of small parts has a packing density within the 5-20 % usually sintered (Mwania et al., Polymers 2022, 14(5):1011)', () => {
    const placements = gridLayout(wren, nylon12, [24, 12, 8], fullHeightTop(wren, nylon12));
    const boxVolume = placements.length * 24 * 12 * 8;
    const e = estimateLayout({ layout: { placements }, machine: wren, material: nylon12, partsVolumeMm3: boxVolume / 3 });
    expect(e.powder.packingDensity).toBeCloseTo(e.partsVolumeMm3 / e.cakeVolumeMm3, 12);
    expect(e.powder.packingDensity).toBeGreaterThan(0.05);
    expect(e.powder.packingDensity).toBeLessThan(0.2);
    expect(e.partsVolumeSource).toBe('given');
  });

  test('a 100 cm^3 nylon 12 part weighs 101 g (nylon 12 density: memory)', () => {
    const e = estimateLayout({
      layout: { placements: [{ position: [10, 10, 5], size: [50, 50, 40] }] },
      machine: wren,
      material: nylon12,
    });
    expect(e.partsVolumeMm3).toBeCloseTo(100_000, 6);
    expect(e.powder.partsMassKg * 1000).toBeCloseTo(101, 6);
  });

  test('the cake is the parts at the solid density plus the loose powder at the bulk density; the fill is fresh plus reused (mass balance)', () => {
    const e = estimateLayout({ layout: { placements: [{ position: [10, 10, 5], size: [50, 50, 40] }] }, machine: wren, material: nylon12 });
    const cakeCm3 = (300 * 300 * e.layerCount * 0.11) / 1000;
    expect(e.powder.partsMassKg).toBeCloseTo(0.101, 9);
    expect(e.powder.looseMassKg).toBeCloseTo(((cakeCm3 - 100) * 0.45) / 1000, 9);
    expect(e.powder.cakeMassKg).toBeCloseTo(e.powder.partsMassKg + e.powder.looseMassKg, 12);
    expect(e.powder.freshPowderKg + e.powder.reusedPowderKg).toBeCloseTo(e.powder.fillKg, 12);
    // 30/70 mix (Polymers 2025, 17(5):577): the refresh ratio sets the fresh share when it covers the parts and losses.
    expect(e.powder.freshPowderKg).toBeCloseTo(0.3 * e.powder.fillKg, 9);
  });

  test("the per-part costs add up to the build's total, and a part with more volume and height never costs less (cost models: Ruffo, Tuck & Hague 2006)", () => {
    const placements = [
      ...gridLayout(wren, nylon12, [24, 12, 8], 40).map((p) => ({ ...p, id: 'clip' })),
      { id: 'housing', position: [10, 10, 50], size: [80, 60, 45] },
      { id: 'plate', position: [120, 10, 50], size: [150, 150, 3] },
    ];
    const volumeById = { clip: 900, housing: 60_000, plate: 40_000 };
    const e = estimateLayout({ layout: { placements }, machine: wren, material: nylon12, volumeById, failureRate: 0.05 });
    const sum = e.cost.perPart.reduce((s, p) => s + p.each * p.count, 0);
    expect(sum).toBeCloseTo(e.cost.totalCost, 6);
    const each = Object.fromEntries(e.cost.perPart.map((p) => [p.id, p.each]));
    expect(each.housing).toBeGreaterThan(each.plate);
    expect(each.housing).toBeGreaterThan(each.clip);
    expect(each.plate).toBeGreaterThan(each.clip);
    expect(e.cost.scrapCost).toBeCloseTo((e.cost.totalCost - e.cost.scrapCost) * (0.05 / 0.95), 6);
    expect(e.cost.totalCost).toBeCloseTo(
      e.cost.machineCost + e.cost.energyCost + e.cost.inertGasCost + e.cost.powderCost + e.cost.labourCost + e.cost.scrapCost,
      6,
    );
  });

  test('a single-chamber machine is charged through the outside cooling it is held by; a two-chamber one is not', () => {
    const placements = gridLayout(wren, nylon12, [24, 12, 8], 60);
    const one = estimateLayout({ layout: { placements }, machine: wren, material: nylon12 });
    const two = estimateLayout({ layout: { placements }, machine: { ...wren, chamberCount: 2 }, material: nylon12 });
    expect(one.cost.heldThroughOutsideCooling).toBe(true);
    expect(one.cost.machineHours).toBeCloseTo((one.print.printSeconds + one.cooling.inMachineSeconds + one.cooling.outsideSeconds) / 3600, 9);
    expect(two.cost.machineHours).toBeCloseTo((one.print.printSeconds + one.cooling.inMachineSeconds) / 3600, 9);
    expect(one.cost.machineCost - two.cost.machineCost).toBeCloseTo((one.cooling.outsideSeconds / 3600) * wren.hourlyRate, 6);
  });

  test('inert gas is charged only where the machine uses it, for preheat, print and cooling in the machine', () => {
    const placements = gridLayout(heron, nylon12, [24, 12, 8], 60);
    const gas = estimateLayout({ layout: { placements }, machine: heron, material: nylon12 });
    const air = estimateLayout({ layout: { placements }, machine: { ...heron, inertGasM3PerHour: 0 }, material: nylon12 });
    const hours = (gas.print.printSeconds + gas.cooling.inMachineSeconds) / 3600;
    expect(gas.cost.inertGasCost).toBeCloseTo(hours * heron.inertGasM3PerHour * heron.inertGasPricePerM3, 6);
    expect(air.cost.inertGasCost).toBe(0);
  });

  test('a layout without parts has no cost per part', () => {
    const e = estimateLayout({ layout: { placements: [] }, machine: wren, material: nylon12 });
    expect(e.partCount).toBe(0);
    expect(e.cost.costPerPart).toBeNull();
  });

  test('calibration factors scale the layer time, the scan time and the cooling, and are reported', () => {
    const layout = { placements: gridLayout(wren, nylon12, [24, 12, 8], 100) };
    const base = estimateLayout({ layout, machine: wren, material: nylon12 });
    const calibrated = estimateLayout({
      layout,
      machine: wren,
      material: nylon12,
      calibration: { layerTimeScale: 1.2, scanTimeScale: 0.9, coolingScale: 2, runs: 7, calibrated: true },
    });
    expect(base.calibration).toMatchObject({ layerTimeScale: 1, scanTimeScale: 1, coolingScale: 1, runs: 0, calibrated: false, printTimeScale: 1 });
    expect(calibrated.calibration).toMatchObject({ layerTimeScale: 1.2, scanTimeScale: 0.9, coolingScale: 2, runs: 7, calibrated: true });
    expect(calibrated.print.recoatSeconds).toBeCloseTo(base.print.recoatSeconds * 1.2, 6);
    expect(calibrated.print.scanSeconds).toBeCloseTo(base.print.scanSeconds * 0.9, 6);
    expect(calibrated.calibration.printTimeScale).toBeCloseTo(calibrated.print.printSeconds / base.print.printSeconds, 9);
    expect(calibrated.cooling.inMachineSeconds).toBeCloseTo(base.cooling.inMachineSeconds / 2, 0);
    expect(calibrated.cooling.outsideSeconds).toBeCloseTo(base.cooling.outsideSeconds / 2, 0);
    // The older single print factor still works: both time factors take it.
    const single = estimateLayout({ layout, machine: wren, material: nylon12, calibration: { printTimeScale: 1.1, coolingScale: 1, runs: 3, calibrated: true } });
    expect(single.print.printSeconds).toBeCloseTo(base.print.printSeconds * 1.1, 6);
  });

  test('a shorter cake cools faster than a full one in the same machine', () => {
    const low = estimateLayout({ layout: { placements: gridLayout(wren, nylon12, [30, 30, 20], 60) }, machine: wren, material: nylon12 });
    const full = estimateLayout({
      layout: { placements: gridLayout(wren, nylon12, [30, 30, 20], fullHeightTop(wren, nylon12)) },
      machine: wren,
      material: nylon12,
    });
    expect(low.cooling.coolingSeconds).toBeLessThan(full.cooling.coolingSeconds);
  });

  test('the same layout at 0.10 and 0.15 mm differs in scan time by far less than 15 %, since the material keeps E_V (Gibson, Rosen & Stucker 2015, §5.4.2)', () => {
    const layout = { placements: gridLayout(wren, nylon12, [30, 30, 20], 120) };
    const thin = estimateLayout({ layout, machine: wren, material: nylon12, layerHeightMm: 0.1 });
    const thick = estimateLayout({ layout, machine: wren, material: nylon12, layerHeightMm: 0.15 });
    expect(Math.abs(thin.print.scanSeconds - thick.print.scanSeconds) / thin.print.scanSeconds).toBeLessThan(0.05);
    expect(thick.print.recoatSeconds).toBeLessThan(thin.print.recoatSeconds);
  });

  test('an area profile sliced from real meshes replaces the boxes\' one', () => {
    const layout = { placements: [{ position: [10, 10, 5], size: [50, 50, 40] }], heightMm: 45 };
    const layers = Math.ceil(50 / 0.11);
    const meshProfile = new Float32Array(layers).fill(1000);
    const e = estimateLayout({ layout, machine: wren, material: nylon12, areaPerLayerMm2: meshProfile });
    expect(e.areaSource).toBe('given');
    expect(e.profileSource).toBe('mesh');
    expect(e.areaPerLayerMm2[0]).toBe(1000);
    const speed = wren.laserPowerW / (nylon12.volumetricEnergyDensityJPerMm3 * nylon12.hatchSpacingMm * 0.11);
    expect(e.print.scanSeconds).toBeCloseTo((layers * 1000) / (speed * nylon12.hatchSpacingMm), 6);
    // A sliced profile stops at the parts' top: the powder layers over them have nothing to scan.
    const short = estimateLayout({ layout, machine: wren, material: nylon12, areaPerLayerMm2: new Float32Array(Math.ceil(45 / 0.11)).fill(1000) });
    expect(short.layerCount).toBe(layers);
    expect(short.areaPerLayerMm2[layers - 1]).toBe(0);
    expect(() => estimateLayout({ layout, machine: wren, material: nylon12, areaPerLayerMm2: new Float32Array(layers + 3) })).toThrow(InvalidInputError);
  });

  test("beside an estimate from the meshes, the boxes' figures: a cylinder scans pi/4 of its box (circle in its square)", () => {
    // A 40 mm cylinder standing in its 40 x 40 x 40 mm box: each slice is pi 20^2 against the box's 40^2.
    const layout = { placements: [{ position: [10, 10, 5], size: [40, 40, 40] }], heightMm: 45 };
    const boxes = estimateLayout({ layout, machine: wren, material: nylon12 });
    expect(boxes.byBoxes).toBeUndefined();
    const cylinder = boxes.areaPerLayerMm2.map((a) => (a * Math.PI) / 4);
    const e = estimateLayout({ layout, machine: wren, material: nylon12, areaPerLayerMm2: cylinder });
    expect(e.byBoxes).toBeDefined();
    // The same box figures as the estimate that only knows the boxes.
    expect(e.byBoxes!.printSeconds).toBeCloseTo(boxes.print.printSeconds, 6);
    expect(e.byBoxes!.areaJumps).toBe(boxes.areaJumps.length);
    // Both count the box's contour (no contour sliced here): the hatching alone differs, by 4 / pi.
    expect((e.byBoxes!.scanSeconds - e.print.contourSeconds) / e.print.scanSeconds).toBeCloseTo(4 / Math.PI, 5);
  });

  test('a block standing over a wide plate flags the layers where the scanned area changes sharply', () => {
    const e = estimateLayout({
      layout: {
        placements: [
          { position: [10, 10, 5], size: [200, 200, 5] },
          { position: [10, 10, 13], size: [60, 60, 30] },
        ],
      },
      machine: wren,
      material: nylon12,
    });
    // The plate ends at 10 mm: layer 91 is the first without it (91 * 0.11 = 10.01); the block spans layers 118-390.
    // The block's end at layer 391 is the build's taper: nothing is fused above it, so it is not flagged.
    expect(e.areaJumps.map((j) => j.layerIndex)).toEqual([91, 118]);
    expect(e.areaJumps.map((j) => Math.sign(j.deltaMm2))).toEqual([-1, 1]);
  });

  test('bad input is refused with every problem named by its field', () => {
    let error: unknown;
    try {
      estimateLayout({
        layout: { placements: [{ position: [0, 0, 0], size: [10, -1, 5] }], margin: { xy: 8, bottom: 5, top: -1 } },
        machine: { ...wren, laserPowerW: 0 },
        material: nylon12,
        layerHeightMm: 0.13,
      });
    } catch (e) {
      error = e;
    }
    expect(error).toBeInstanceOf(InvalidInputError);
    const fields = (error as InvalidInputError).problems.map((p) => p.field);
    expect(fields).toEqual(
      expect.arrayContaining(['machine.laserPowerW', 'layerHeightMm', 'layout.placements[0].size[1]', 'layout.margin.top']),
    );
  });

  test('profiles that make no physical sense are refused, naming the field', () => {
    const layout = { placements: [{ position: [10, 10, 5], size: [10, 10, 10] }] };
    const fieldsOf = (f: () => unknown) => {
      try {
        f();
      } catch (e) {
        return (e as InvalidInputError).problems.map((p) => p.field);
      }
      return [];
    };
    expect(fieldsOf(() => estimateLayout({ layout, machine: { ...wren, handlingTempC: 20 }, material: nylon12 }))).toContain('machine.handlingTempC');
    expect(fieldsOf(() => estimateLayout({ layout, machine: { ...wren, removalTempC: 40 }, material: nylon12 }))).toContain('machine.removalTempC');
    expect(fieldsOf(() => estimateLayout({ layout, machine: wren, material: { ...nylon12, bedTempC: 95 } }))).toContain('material.bedTempC');
    expect(fieldsOf(() => estimateLayout({ layout, machine: wren, material: { ...nylon12, bulkDensityGPerCm3: 1.2 } }))).toContain('material.bulkDensityGPerCm3');
    expect(fieldsOf(() => estimateLayout({ layout, machine: wren, material: { ...nylon12, powderConductivityWPerMK: 0 } }))).toContain('material.powderConductivityWPerMK');
    expect(fieldsOf(() => estimateLayout({ layout, machine: wren, material: nylon12, failureRate: 1 }))).toContain('failureRate');
  });

  test('a height below the top of the highest box is refused', () => {
    expect(() =>
      estimateLayout({ layout: { placements: [{ position: [10, 10, 5], size: [10, 10, 10] }], heightMm: 12 }, machine: wren, material: nylon12 }),
    ).toThrow(/layout\.heightMm/);
  });
});
