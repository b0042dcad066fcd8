/**
 * The editor's numbers from an estimate: beside an estimate from the meshes,
 * what the same layout counted as boxes would read. The box figures come from
 * the shared estimate itself; a cylinder standing in its box scans pi/4 of it
 * (circle in its square).
 */
import { demoMachines, demoMaterials } from '@/shared/demo/profiles';
import { estimateLayout } from '@/shared/estimate';
import { byBoxesText, numbersFromEstimate } from '@/components/plans/estimate';
import { hours } from '@/components/plans/format';

const [wren] = demoMachines;
const [nylon12] = demoMaterials;
const layout = { placements: [{ position: [10, 10, 5], size: [40, 40, 40] }], heightMm: 45 };
const boxes = estimateLayout({ layout, machine: wren, material: nylon12 });
const meshes = estimateLayout({ layout, machine: wren, material: nylon12, areaPerLayerMm2: boxes.areaPerLayerMm2.map((a) => (a * Math.PI) / 4) });
/** As the server stores it: plain JSON. */
const stored = (e: object) => JSON.parse(JSON.stringify(e)) as Record<string, unknown>;

describe('the box figures beside an estimate from the meshes', () => {
  test('read back from a stored estimate, and said in one line with the difference', () => {
    const n = numbersFromEstimate(stored(meshes), { placedCount: 1, unplacedCount: 0 });
    expect(n.byBoxes?.printSeconds).toBeCloseTo(boxes.print.printSeconds, 6);
    expect(n.printSeconds).toBeLessThan(n.byBoxes!.printSeconds);
    const more = boxes.print.printSeconds - meshes.print.printSeconds;
    expect(byBoxesText(n)).toBe(
      `Counted as boxes, the same layout would read ${hours(boxes.print.printSeconds)} to print (${hours(more)} more) and ${boxes.areaJumps.length} heat-load warning${boxes.areaJumps.length === 1 ? '' : 's'} (here ${meshes.areaJumps.length}).`,
    );
  });

  test('when the shapes and the boxes give the same print time to the figure shown, it says so instead of "0.0 h more"', () => {
    // Box-shaped parts: the slices of a block are its box's (the same area profile), so the two estimates agree.
    const block = estimateLayout({ layout, machine: wren, material: nylon12, areaPerLayerMm2: boxes.areaPerLayerMm2 });
    const n = numbersFromEstimate(stored(block), { placedCount: 1, unplacedCount: 0 });
    expect(byBoxesText(n)).toBe(`Counted as boxes, the same layout would also read ${hours(boxes.print.printSeconds)} to print and ${boxes.areaJumps.length} heat-load warning${boxes.areaJumps.length === 1 ? '' : 's'} (here ${block.areaJumps.length}).`);
  });

  test('a box estimate, an older stored estimate without them, or figures that are not numbers say nothing', () => {
    expect(byBoxesText(numbersFromEstimate(stored(boxes), { placedCount: 1, unplacedCount: 0 }))).toBeNull();
    const older = stored(meshes);
    delete older.byBoxes;
    expect(numbersFromEstimate(older, { placedCount: 1, unplacedCount: 0 }).byBoxes).toBeNull();
    expect(numbersFromEstimate({ ...stored(meshes), byBoxes: { printSeconds: 'x', scanSeconds: 1, areaJumps: 0 } }, { placedCount: 1, unplacedCount: 0 }).byBoxes).toBeNull();
  });
});
