/**
 * The time limit with meshes too heavy for it. A packing by shape first draws
 * each part's column profiles and builds the trees of its exact check; with
 * meshes of a million triangles that alone takes seconds. When it cannot be
 * done in its share of the limit, the run packs the parts by their boxes in
 * what is left (boxes kept the spacing apart keep the meshes in them as far
 * apart) and says so, instead of running seconds past the limit.
 *
 * The heavy case is made by the engine's clock running 50 times fast: every
 * millisecond of work reads as 50, as on a machine (or with meshes) that much
 * slower. The same instance on the real clock with time to spare nests the
 * rings in the cup, so the fallback is what the clock made, not the parts.
 */
import { housing, torus } from '@/shared/geometry';
import { createShapePacking, validateShapeLayout, type PackInstanceV2 } from '@/shared/packing';
import { shapeInstance } from './instance';

// 80 x 50 x 30 mm outside, walls and floor 2.5 mm: inside 75 x 45 mm, 27.5 mm deep.
const cup = housing({ lengthMm: 80, widthMm: 50, heightMm: 30, wallMm: 2.5, floorMm: 2.5, cornerRadiusMm: 5, cornerSegments: 6 });
// Rings 20 mm across and 4 mm thick, 10,000 triangles each (the cup has 220).
const ring = torus(8, 2, 100, 50);

/** The cup on a plate only 2 mm larger than it, and four rings that can only go inside it (by shape) or above it. */
function instance(timeLimitMs: number): PackInstanceV2 {
  const parts = [
    { id: 'cup', mesh: cup, quantity: 1, orientations: ['upright'] },
    { id: 'ring', mesh: ring, quantity: 4 },
  ];
  return shapeInstance(parts, 3, { chamber: [82, 52, 200], timeLimitMs });
}

test('meshes too heavy for the limit: packed by their boxes, said so, and valid by the exact check', () => {
  expect(ring.indices.length / 3).toBe(10_000);
  const fast = () => 50 * performance.now();
  const inst = instance(1000);
  const result = createShapePacking(inst, { now: fast }).runSync();
  expect(result.warnings).toEqual([expect.objectContaining({ id: 'ring', code: 'packed-by-box' })]);
  expect(result.warnings![0].message).toMatch(/^Packed by the parts' boxes: their meshes \(10,220 triangles; "ring" the largest with 10,000\) take longer .* than the 1 s limit allows; give it 2 s or more to nest them$/);
  expect(validateShapeLayout(inst, result)).toEqual([]);
  expect(result.unplaced).toEqual([]);
  // A box layout: any two placed boxes are the spacing apart along some axis (packing.md, version 1's rule).
  const P = result.placements;
  expect(P).toHaveLength(5);
  for (let i = 0; i < P.length; i++) {
    for (let j = i + 1; j < P.length; j++) {
      const apart = [0, 1, 2].some((a) => P[i].position[a] + P[i].size[a] + 3 <= P[j].position[a] + 1e-6 || P[j].position[a] + P[j].size[a] + 3 <= P[i].position[a] + 1e-6);
      expect(apart).toBe(true);
    }
  }
  // So the rings lie on or over the cup's rim: the plate has no room beside it.
  expect(result.height).toBeGreaterThan(30 + 3);
});

test('the same parts with time to spare are packed by shape: the rings lie in the cup, no warning', () => {
  const inst = instance(3000);
  const result = createShapePacking(inst).runSync();
  expect(result.warnings ?? []).toEqual([]);
  expect(validateShapeLayout(inst, result)).toEqual([]);
  expect(result.height).toBeLessThanOrEqual(30 + 1e-6);
});
