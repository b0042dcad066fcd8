/**
 * Packing by shape with no spacing asked (the contract's default). Surfaces that meet exactly are where rounding
 * decides: settled that way, every layout of a housing and the cubes that fit in it failed the exact check (a cube
 * sunk 1e-7 mm into another, so blocked on its way out), and the boxes' layout stood, said to be for want of time.
 * The search keeps NO_SPACING_CLEARANCE between parts instead; the layout is checked against the spacing asked.
 */
import { housing } from '@/shared/geometry';
import { createShapePacking, validateShapeLayout } from '@/shared/packing';
import { defaultCell, NO_SPACING_CLEARANCE } from '@/shared/packing/shape/engine';
import { box } from '../../geometry/helpers';
import { shapeInstance } from './instance';

// 60 x 40 x 25 mm outside, walls and floor 2 mm: inside 56 x 36 mm, 23 mm deep; on a plate just as large.
const holder = housing({ lengthMm: 60, widthMm: 40, heightMm: 25, wallMm: 2, floorMm: 2, cornerRadiusMm: 4, cornerSegments: 6 });

test('no spacing: four 10 mm cubes go inside the housing (the plate has no room beside it), valid, packed by shape', () => {
  const inst = shapeInstance(
    [
      { id: 'housing', mesh: holder, quantity: 1, orientations: ['upright'] },
      { id: 'cube', mesh: box(10, 10, 10), quantity: 4 },
    ],
    0,
    { chamber: [60, 40, 100], timeLimitMs: 5000 },
  );
  const result = createShapePacking(inst, { maxRuns: 1 }).runSync();
  expect(result.warnings ?? []).toEqual([]);
  expect(result.placements).toHaveLength(5);
  expect(validateShapeLayout(inst, result)).toEqual([]);
  // Inside: the layout is as tall as the housing (above it, 35 mm at least).
  expect(result.height).toBeCloseTo(25, 6);
  // The cubes keep at least the clearance from the housing's floor (2 mm over the plate).
  for (const p of result.placements.filter((q) => q.id === 'cube')) {
    expect(p.position[2]).toBeGreaterThanOrEqual(2 + NO_SPACING_CLEARANCE - 1e-6);
  }
});

test("a spacing under one plan cell leaves the chamber's cell as it is; a larger one gets a whole number of cells", () => {
  const at = (spacing: number) => defaultCell(shapeInstance([{ id: 'cube', mesh: box(10, 10, 10), quantity: 1 }], spacing, { chamber: [300, 300, 380], margin: { xy: 8, bottom: 5, top: 5 } }));
  // 284 mm of usable plate over 220 cells.
  expect(at(0)).toBeCloseTo(284 / 220, 9);
  for (const spacing of [0.01, 0.1, 0.3, 1]) expect(at(spacing)).toBe(at(0));
  expect(at(3)).toBe(1.5);
  expect(at(2)).toBe(2);
});
