/**
 * The packing by shape checked by a second, outside implementation: manifold-3d (npm) measures the engine's
 * layouts with its own geometry (scripts/lib/manifold-check.ts: Manifold.minGap, intersect().volume(),
 * boundingBox(), and a straight lift sampled every 0.5 mm), so the spec's shape rules are checked twice,
 * independently of the project's validator: every placed mesh inside the usable region; every two the spacing
 * apart and neither inside the other; the lift-out order. The hand-made wrong layouts at the end show that the
 * reference finds each fault, and that the project's validator names the same.
 */
import { housing } from '@/shared/geometry';
import {
  createShapePacking,
  generateShapeMix,
  summariseShapeLayout,
  validateShapeLayout,
  type PackInstanceV2,
} from '@/shared/packing';
import { reference, referenceFaults, type Reference } from '../../../../scripts/lib/manifold-check';
import { box } from '../../geometry/helpers';
import { shapeInstance } from './instance';

function expectValidByReference(instance: PackInstanceV2, ref: Reference): void {
  expect(referenceFaults(instance, ref)).toEqual([]);
  // Something was measured: parts stand within the spacing's reach of others.
  expect(ref.pairs.length).toBeGreaterThan(0);
}

describe('layouts by shape, measured by manifold-3d', () => {
  // Generated concave mixes in a chamber small enough that parts go into each other's hollows; the runs are capped,
  // so the layouts are the same on any machine.
  test.each([
    [100, 1],
    [80, 3],
  ])('%i parts (mix %i): in the region, every two surfaces the spacing apart, none inside another, lifted out in order', (parts, seed) => {
    const instance = generateShapeMix({ parts, seed, chamber: [200, 200, 300], fit: 'shape', timeLimitMs: 60_000 });
    const result = createShapePacking(instance, { maxRuns: 3 }).runSync();
    expect(result.unplaced).toEqual([]);
    expect(result.placements).toHaveLength(parts);
    const ref = reference(instance, result);
    // The layout is nested: the check has parts in others' hollows to follow, not only boxes side by side.
    const inside = result.placements.filter((p, j) =>
      result.placements.some((q, i) => i !== j && [0, 1].every((k) => p.position[k] >= q.position[k] && p.position[k] + p.size[k] <= q.position[k] + q.size[k]) && p.position[2] >= q.position[2] && p.position[2] < q.position[2] + q.size[2]),
    );
    expect(inside.length).toBeGreaterThanOrEqual(10);
    expect(ref.liftPairs).toBeGreaterThanOrEqual(inside.length);
    // Some pair stands at the spacing itself (the packing closes the gaps it may), within 32-bit rounding.
    expect(Math.min(...ref.pairs.map((p) => p.gap))).toBeLessThan(instance.spacing + 0.01);
    expectValidByReference(instance, ref);
    expect(validateShapeLayout(instance, result)).toEqual([]);
  }, 120_000);
});

describe('wrong layouts: the reference finds each fault, and the validator names the same', () => {
  // An open housing, 60 x 40 x 25 mm outside, walls and floor 2 mm, and a 10 mm cube; 3 mm spacing.
  const holder = housing({ lengthMm: 60, widthMm: 40, heightMm: 25, wallMm: 2, floorMm: 2, cornerRadiusMm: 4, cornerSegments: 6 });
  const inst = shapeInstance(
    [
      { id: 'housing', mesh: holder, quantity: 1, orientations: ['upright'] },
      { id: 'cube', mesh: box(10, 10, 10), quantity: 1 },
    ],
    3,
  );
  const place = (items: Array<[string, [number, number, number]]>) => summariseShapeLayout(inst, items.map(([id, position]) => ({ id, rotation: 0, position })));
  const H: [number, number, number] = [20, 20, 0];

  test('the cube on the housing floor, 3 mm from the wall and the floor: valid by both', () => {
    const r = place([['housing', H], ['cube', [20 + 2 + 3, 20 + 15, 2 + 3]]]);
    const ref = reference(inst, r);
    expectValidByReference(inst, ref);
    expect(ref.liftPairs).toBe(1);
    expect(ref.pairs[0].gap).toBeCloseTo(3, 4);
    expect(validateShapeLayout(inst, r)).toEqual([]);
  });

  test('the cube 2 mm from the inner wall: the reference measures 2 mm, the validator says too close', () => {
    const r = place([['housing', H], ['cube', [20 + 2 + 2, 20 + 15, 2 + 3]]]);
    const ref = reference(inst, r);
    expect(ref.pairs[0].gap).toBeCloseTo(2, 4);
    expect(ref.pairs[0].shared).toBe(0);
    expect(validateShapeLayout(inst, r).map((p) => p.message).join()).toMatch(/only 2\.000000 mm from/);
  });

  test('the cube through the wall: they share the 2 x 10 x 10 mm of wall in the cube, and the validator refuses it', () => {
    const r = place([['housing', H], ['cube', [20 - 5, 20 + 15, 5]]]);
    const ref = reference(inst, r);
    // The cube reaches 5 mm past the housing's outer face at x = 20, through the 2 mm wall and 3 mm into the hollow:
    // it shares 2 x 10 x 10 mm of the wall.
    expect(ref.pairs[0].shared).toBeCloseTo(200, 3);
    expect(ref.pairs[0].gap).toBe(0);
    expect(validateShapeLayout(inst, r).length).toBeGreaterThan(0);
  });

  test('the cube inside the housing listed first: the housing, lifted first, takes the cube with it; both say so', () => {
    const r = place([['cube', [20 + 2 + 3, 20 + 15, 2 + 3]], ['housing', H]]);
    const ref = reference(inst, r);
    expect(ref.pairs[0].gap).toBeCloseTo(3, 4);
    // The housing's floor meets the cube's underside after a rise of 3 mm (the spacing under it).
    expect(ref.touches).toHaveLength(1);
    expect(ref.touches[0].rise).toBeGreaterThan(2.5);
    expect(ref.touches[0].rise).toBeLessThanOrEqual(3.5);
    expect(validateShapeLayout(inst, r).map((p) => `${p.field} ${p.message}`).join()).toMatch(/lift|order/i);
  });
});
