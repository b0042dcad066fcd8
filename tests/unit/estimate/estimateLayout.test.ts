import { demoMachines, demoMaterials } from '@/shared/demo/profiles';
import { estimateLayout, InvalidInputError, type PlacedBox } from '@/shared/estimate';
import type { MachineProfile, MaterialProfile } from '@/shared/types/profiles';

const [wren, heron] = demoMachines;
const [nylon12, nylon11, glassNylon12] = demoMaterials;

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
    const twicePower = { ...wren, laserPowerW: wren.laserPowerW * 2 };
    const slow = estimateLayout({ layout: { placements }, machine: wren, material: nylon12 });
    const fast = estimateLayout({ layout: { placements }, machine: twicePower, material: nylon12 });
    expect(slow.print.scanSeconds).toBeGreaterThan(2 * slow.print.recoatSeconds);
    const speedUp = slow.print.layersSeconds / fast.print.layersSeconds;
    expect(speedUp).toBeGreaterThan(1.6);
    expect(speedUp).toBeLessThan(2);
  });

  test.each([
    ['Wren', wren],
    ['Heron', heron],
  ])('the defaults cool a full nylon build in the %s to 100 C in about an hour, within 0.5-1.5 h (common practice, band from memory)', (_name, machine) => {
    for (const material of [nylon12, nylon11, glassNylon12]) {
      const placements = gridLayout(machine, material, [30, 30, 20], fullHeightTop(machine, material));
      const e = estimateLayout({ layout: { placements }, machine, material });
      expect(machine.removalTempC).toBe(100);
      const hours = e.cooling.inMachineSeconds / 3600;
      expect(hours).toBeGreaterThan(0.5);
      expect(hours).toBeLessThan(1.5);
    }
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

  test('the demo powders carry their solid densities: nylon 11 1.04 g/cm^3 (CAMEO materials database, citing Brady\'s Materials Handbook), nylon 12 1.01 (memory)', () => {
    expect(nylon11.solidDensityGPerCm3).toBe(1.04);
    expect(nylon12.solidDensityGPerCm3).toBe(1.01);
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

  test('powder is the whole cake at the bulk density, the fresh share from the refresh ratio (30/70 mix: Polymers 2025, 17(5):577)', () => {
    const e = estimateLayout({ layout: { placements: [{ position: [10, 10, 5], size: [50, 50, 40] }] }, machine: wren, material: nylon12 });
    const cakeCm3 = (300 * 300 * e.layerCount * 0.11) / 1000;
    expect(e.powder.cakeMassKg).toBeCloseTo((cakeCm3 * 0.45) / 1000, 9);
    expect(e.powder.freshPowderKg).toBeCloseTo(0.3 * e.powder.cakeMassKg, 9);
    expect(e.powder.reusedPowderKg).toBeCloseTo(0.7 * e.powder.cakeMassKg, 9);
  });

  test('cost per part adds machine hours (print and in-machine cooling), fresh powder and labour, shared by the parts', () => {
    const placements = gridLayout(wren, nylon12, [24, 12, 8], 80);
    const e = estimateLayout({ layout: { placements }, machine: wren, material: nylon12 });
    const machineHours = (e.print.printSeconds + e.cooling.inMachineSeconds) / 3600;
    const total = machineHours * wren.hourlyRate + e.powder.freshPowderKg * nylon12.pricePerKg + wren.labourHoursPerBuild * wren.labourRate;
    expect(e.cost.machineHours).toBeCloseTo(machineHours, 9);
    expect(e.cost.totalCost).toBeCloseTo(total, 6);
    expect(e.cost.costPerPart).toBeCloseTo(total / placements.length, 9);
  });

  test('a layout without parts has no cost per part', () => {
    const e = estimateLayout({ layout: { placements: [] }, machine: wren, material: nylon12 });
    expect(e.partCount).toBe(0);
    expect(e.cost.costPerPart).toBeNull();
  });

  test('calibration factors scale the print time and the cooling constants, and are reported', () => {
    const layout = { placements: gridLayout(wren, nylon12, [24, 12, 8], 100) };
    const base = estimateLayout({ layout, machine: wren, material: nylon12 });
    const calibrated = estimateLayout({
      layout,
      machine: wren,
      material: nylon12,
      calibration: { printTimeScale: 1.2, coolingScale: 2, runs: 7, calibrated: true },
    });
    expect(base.calibration).toEqual({ printTimeScale: 1, coolingScale: 1, runs: 0, calibrated: false });
    expect(calibrated.calibration).toEqual({ printTimeScale: 1.2, coolingScale: 2, runs: 7, calibrated: true });
    expect(calibrated.print.printSeconds).toBeCloseTo(base.print.printSeconds * 1.2, 6);
    expect(calibrated.cooling.inMachineSeconds).toBeCloseTo(base.cooling.inMachineSeconds / 2, 6);
    expect(calibrated.cooling.outsideSeconds).toBeCloseTo(base.cooling.outsideSeconds / 2, 6);
  });

  test('a shorter cake cools faster than a full one in the same machine', () => {
    const low = estimateLayout({ layout: { placements: gridLayout(wren, nylon12, [30, 30, 20], 60) }, machine: wren, material: nylon12 });
    const full = estimateLayout({
      layout: { placements: gridLayout(wren, nylon12, [30, 30, 20], fullHeightTop(wren, nylon12)) },
      machine: wren,
      material: nylon12,
    });
    expect(low.cooling.sizeFactor).toBeGreaterThan(full.cooling.sizeFactor);
    expect(low.cooling.coolingSeconds).toBeLessThan(full.cooling.coolingSeconds);
  });

  test('an area profile sliced from real meshes replaces the boxes\' one', () => {
    const layout = { placements: [{ position: [10, 10, 5], size: [50, 50, 40] }], heightMm: 45 };
    const layers = Math.ceil(50 / 0.11);
    const meshProfile = new Float32Array(layers).fill(1000);
    const e = estimateLayout({ layout, machine: wren, material: nylon12, areaPerLayerMm2: meshProfile });
    expect(e.areaSource).toBe('given');
    expect(e.areaPerLayerMm2[0]).toBe(1000);
    const speed = (wren.laserPowerW / (nylon12.energyDensityJPerMm2 * nylon12.hatchSpacingMm));
    expect(e.print.scanSeconds).toBeCloseTo((layers * 1000) / (speed * nylon12.hatchSpacingMm), 6);
    expect(() => estimateLayout({ layout, machine: wren, material: nylon12, areaPerLayerMm2: new Float32Array(3) })).toThrow(InvalidInputError);
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
    expect(e.areaJumps.map((j) => j.layerIndex)).toEqual([91, 118, 391]);
    expect(e.areaJumps.map((j) => Math.sign(j.deltaMm2))).toEqual([-1, 1, -1]);
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

  test('a height below the top of the highest box is refused', () => {
    expect(() =>
      estimateLayout({ layout: { placements: [{ position: [10, 10, 5], size: [10, 10, 10] }], heightMm: 12 }, machine: wren, material: nylon12 }),
    ).toThrow(/layout\.heightMm/);
  });
});
