/**
 * Filling hollows before packing: an open housing on a plate just its size
 * holds six small blocks. Packed by boxes the blocks have to lie above it
 * (30 + 3 + 8 mm: the cup, the spacing, a block); packed by shape they stand
 * on its floor inside its walls, so the build is only as tall as the housing.
 * Each layout is checked exactly against the meshes by the validator
 * (triangle-to-triangle gaps, containment, lift-out order).
 */
import { housing } from '@/shared/geometry';
import { createShapePacking, createBoxFitPacking, parseInstanceV2, validateShapeLayout, type PackInstanceV2 } from '@/shared/packing';
import { columnProfile, shapeParts, defaultCell } from '@/shared/packing/shape';
import { buildNests } from '@/shared/packing/shape/nest';
import { box } from '../../geometry/helpers';

// 80 x 50 x 30 mm outside, walls and floor 2.5 mm: inside 75 x 45 mm, 27.5 mm deep.
const cup = housing({ lengthMm: 80, widthMm: 50, heightMm: 30, wallMm: 2.5, floorMm: 2.5, cornerRadiusMm: 5, cornerSegments: 6 });
const block = box(10, 10, 8);

function plateOfTheCup(fit: 'box' | 'shape'): PackInstanceV2 {
  const parsed = parseInstanceV2({
    format: 'pack-instance/2',
    // The usable plate is the cup's footprint plus 2 mm: nothing fits beside it.
    chamber: [82, 52, 200],
    margin: { xy: 0, bottom: 0, top: 0 },
    spacing: 3,
    layerHeight: 0.1,
    timeLimitMs: 400,
    fit,
    parts: [
      { id: 'cup', mesh: { positions: cup.positions, indices: cup.indices }, quantity: 1, orientations: ['upright'] },
      { id: 'block', mesh: { positions: block.positions, indices: block.indices }, quantity: 6, orientations: ['upright'] },
    ],
  });
  if (!parsed.ok) throw new Error(JSON.stringify(parsed.problems));
  return parsed.instance;
}

test('the cup holds the six blocks: the nest uses every copy and lists the cup before what it holds', () => {
  const inst = plateOfTheCup('shape');
  const parts = shapeParts(inst);
  const cell = defaultCell(inst);
  const kinds = parts.map((p) => ({ quantity: p.quantity, profiles: p.rotations.map((r) => columnProfile(p, r, cell, inst.spacing)).sort((a, b) => a.cost - b.cost) }));
  const { nests, used } = buildNests(kinds, cell, inst.spacing);
  expect(nests).toHaveLength(1);
  expect(used).toEqual([1, 6]);
  const members = nests[0].members;
  expect(members.map((m) => m.kind)).toEqual([0, 1, 1, 1, 1, 1, 1]);
  // Every block stands on the cup's floor (2.5 mm) plus the spacing, under the rim (30 mm).
  for (const m of members.slice(1)) {
    expect(m.dz).toBeGreaterThanOrEqual(2.5 + 3 - 1e-9);
    expect(m.dz + m.profile.extent[2]).toBeLessThanOrEqual(30 + 1e-9);
  }
});

test('packed by shape the build is as tall as the cup; packed by boxes the blocks lie above it', () => {
  const byShape = createShapePacking(plateOfTheCup('shape'), { maxRuns: 2 }).runSync();
  expect(byShape.unplaced).toEqual([]);
  expect(byShape.height).toBeCloseTo(30, 6);
  expect(validateShapeLayout(plateOfTheCup('shape'), byShape)).toEqual([]);

  const byBox = createBoxFitPacking(plateOfTheCup('box')).runSync();
  // 30 mm cup, 3 mm spacing, 8 mm blocks.
  expect(byBox.height).toBeCloseTo(41, 6);
});

test('without nesting first, the same packing by shape still keeps every part apart (the option only changes the order)', () => {
  const inst = plateOfTheCup('shape');
  const result = createShapePacking(inst, { maxRuns: 2, nest: false, boxShare: 0 }).runSync();
  expect(validateShapeLayout(inst, result)).toEqual([]);
});
