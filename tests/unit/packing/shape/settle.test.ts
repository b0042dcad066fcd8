/**
 * Settling a box layout by shape, and bringing its top down. Expected heights
 * come from plane geometry (Pythagoras: two edges a horizontal distance d
 * apart keep a distance g when one is sqrt(g^2 - d^2) above the other); every
 * layout is also checked exactly against the meshes by the validator.
 */
import { prismWithHoles } from '@/shared/geometry';
import {
  summariseShapeLayout,
  validateShapeLayout,
  generateShapeMix,
  createBoxFitPacking,
  createShapePacking,
  type PartMesh,
} from '@/shared/packing';
import { shapeParts } from '@/shared/packing/shape/parts';
import { columnProfile } from '@/shared/packing/shape/profile';
import { settleLayout, lowerTheTop, type SettleItem } from '@/shared/packing/shape/settle';
import { box } from '../../geometry/helpers';
import { shapeInstance } from './instance';

const square = (x0: number, y0: number, s: number): Array<[number, number]> => [
  [x0, y0],
  [x0 + s, y0],
  [x0 + s, y0 + s],
  [x0, y0 + s],
];

/** Each part upright as modelled (the box layouts below are given in that turn). */
const instance = (parts: Array<{ id: string; mesh: PartMesh; quantity: number }>, spacing: number) =>
  shapeInstance(parts.map((p) => ({ ...p, orientations: ['xyz'] })), spacing);

// A square ring 40 mm outside, a 20 mm hole, 10 mm high, on the floor; a 10 mm cube above the middle of the hole.
const ring = prismWithHoles(square(0, 0, 40), [square(10, 10, 20).reverse()], 0, 10);
const cube = box(10, 10, 10);

function settledCube(spacing: number, extra: SettleItem[] = []) {
  const inst = instance(
    [
      { id: 'ring', mesh: ring, quantity: 1 },
      { id: 'cube', mesh: cube, quantity: 1 + extra.length },
    ],
    spacing,
  );
  const parts = shapeParts(inst);
  // As a box layout stacks them: the cube's box on the ring's box, the spacing apart.
  const items: SettleItem[] = [{ part: 0, rotation: 0, position: [50, 50, 0] }, ...extra, { part: 1, rotation: 0, position: [65, 65, 10 + spacing] }];
  const settled = settleLayout(inst, parts, items);
  const result = summariseShapeLayout(inst, settled.map((it) => ({ id: parts[it.part].id, rotation: it.rotation, position: it.position })));
  return { z: settled[settled.length - 1].position[2], problems: validateShapeLayout(inst, result) };
}

describe('settling a box layout by shape', () => {
  test('a cube with room in a ring\'s hole (5 mm each side, 2 mm spacing) sinks to the floor', () => {
    const { z, problems } = settledCube(2);
    expect(z).toBeCloseTo(0, 6);
    expect(problems).toEqual([]);
  });

  test('with a spacing wider than the room (6 mm against 5 mm) it stops where its edges are 6 mm from the hole\'s rim', () => {
    // Exact: the cube's bottom edges are 5 mm in from the rim's inner edges, so z - 10 = sqrt(6^2 - 5^2).
    const exact = 10 + Math.sqrt(36 - 25);
    const { z, problems } = settledCube(6);
    expect(problems).toEqual([]);
    expect(z).toBeGreaterThanOrEqual(exact - 1e-6);
    // The plan grid (1.5 mm cells at this spacing, a part's last cell reaching past its edge) can only keep it
    // higher: at most as high as two cells less of horizontal room (5 - 3 mm) give.
    expect(z).toBeLessThanOrEqual(10 + Math.sqrt(36 - 4) + 1e-6);
    // and lower than the box layout had it (on the ring's box, 6 mm above its top)
    expect(z).toBeLessThan(16);
  });

  test('a neighbour beside it at exactly the spacing does not hold it up', () => {
    // A second cube resting on the ring's rim at the same level, its box 2 mm from the first cube's box in x.
    const { z, problems } = settledCube(2, [{ part: 1, rotation: 0, position: [77, 65, 12] }]);
    expect(z).toBeCloseTo(0, 6);
    expect(problems).toEqual([]);
  });
});

describe('bringing the top down', () => {
  test('a stack of three cubes comes down to three cubes on the floor, the top one first', () => {
    const inst = instance([{ id: 'cube', mesh: cube, quantity: 3 }], 2);
    const parts = shapeParts(inst);
    const cell = 1;
    const profile = columnProfile(parts[0], 0, cell, 2);
    const stack = [0, 12, 24].map((z) => ({ kind: 0, profile, position: [20, 20, z] as [number, number, number] }));
    const out = lowerTheTop(inst, stack, [[profile]], cell);
    // The top cube finds the floor beside the stack, then the middle one does: the top is one cube high.
    expect(out.map((it) => it.position[2])).toEqual([0, 0, 0]);
    expect(out[0].position).toEqual([20, 20, 0]);
    const result = summariseShapeLayout(inst, out.map((it) => ({ id: 'cube', rotation: 0, position: it.position })));
    expect(validateShapeLayout(inst, result)).toEqual([]);
  });
});

describe('the packing by shape against the boxes it starts from', () => {
  test('on a concave mix it is never taller than the box layout of the same capped search', () => {
    const mix = (fit: 'box' | 'shape') => generateShapeMix({ parts: 60, seed: 4, chamber: [200, 200, 300], fit, timeLimitMs: 600_000 });
    const byBox = createBoxFitPacking(mix('box'), { maxCompletions: 3 }).runSync();
    const shapeInstance = mix('shape');
    const byShape = createShapePacking(shapeInstance, { maxRuns: 3 }).runSync();
    expect(byShape.unplaced).toEqual([]);
    expect(byShape.height).toBeLessThanOrEqual(byBox.height + 1e-6);
    expect(validateShapeLayout(shapeInstance, byShape)).toEqual([]);
  });
});
