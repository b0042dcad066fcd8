/**
 * Hand edits of a layout packed by shape, checked against the meshes: a part
 * moved into another's hollow is not at fault when its surfaces keep the
 * spacing, and a part dropped by hand sinks into a hollow as far as its shape
 * allows. Expected heights and gaps are elementary geometry (a square ring 40
 * mm outside with a 20 mm hole, a 10 mm cube, 2 mm spacing: 5 mm of room on
 * each side of the cube in the hole; a 40 x 40 x 12 mm cup with a 2 mm floor:
 * a cube in it rests 2 + 2 mm over the cup's bottom).
 */
import { prism, prismWithHoles } from '@/shared/geometry';
import { housing } from '@/shared/geometry/generate';
import { placementTransform } from '@/shared/geometry/rotations';
import { droppedPlacements, shapeEditFaults, summariseShapeLayout, type PackResult, type Placement } from '@/shared/packing';
import { shapeParts } from '@/shared/packing/shape/parts';
import { droppedByShape, shapeLayoutFaults } from '@/shared/packing/shape/handEdit';
import { validateShapeLayout } from '@/shared/packing/shape/validate';
import { box } from '../../geometry/helpers';
import { shapeInstance } from './instance';

const square = (x0: number, y0: number, s: number): Array<[number, number]> => [
  [x0, y0],
  [x0 + s, y0],
  [x0 + s, y0 + s],
  [x0, y0 + s],
];
const ring = prismWithHoles(square(0, 0, 40), [square(10, 10, 20).reverse()], 0, 10);
const cube = box(10, 10, 10);
const cup = housing({ lengthMm: 40, widthMm: 40, heightMm: 12, wallMm: 2, floorMm: 2, cornerRadiusMm: 3, cornerSegments: 4 });
const inst = shapeInstance(
  [
    { id: 'ring', mesh: ring, quantity: 1, orientations: ['xyz'] },
    { id: 'cube', mesh: cube, quantity: 3, orientations: ['xyz'] },
    { id: 'cup', mesh: cup, quantity: 1, orientations: ['xyz'] },
  ],
  2,
);
const parts = shapeParts(inst);

/** A layout of the given placements (upright as modelled), in the order given, as the editor holds it. */
function layout(items: Array<{ id: 'ring' | 'cube' | 'cup'; at: [number, number, number] }>): PackResult {
  const result = summariseShapeLayout(inst, items.map((it) => ({ id: it.id, rotation: 0, position: it.at })), parts);
  return result as unknown as PackResult;
}
const moved = (p: Placement, at: [number, number, number]): Placement => {
  const part = parts.find((q) => q.id === p.id)!;
  return { ...p, position: at, transform: [...placementTransform(0, part.min, part.max, at)] as Placement['transform'] };
};

describe('the check of a hand edit against the meshes', () => {
  test("a cube moved into a ring's hole with 5 mm all round is not at fault, though its box is inside the ring's", () => {
    const result = layout([
      { id: 'ring', at: [50, 50, 0] },
      { id: 'cube', at: [65, 65, 0] },
    ]);
    // By boxes (the quick check while dragging) the cube is at fault.
    expect([...shapeEditFaults(inst, result.placements, [1])]).toEqual([1]);
    expect(shapeLayoutFaults(inst, result, parts)).toEqual({ faults: new Set(), problems: [] });
  });

  test('moved 4 mm towards a wall (1 mm from it, spacing 2 mm) both are at fault, and the problem says how close', () => {
    const base = layout([
      { id: 'ring', at: [50, 50, 0] },
      { id: 'cube', at: [65, 65, 0] },
    ]);
    const result = { ...base, placements: [base.placements[0], moved(base.placements[1], [61, 65, 0])] };
    const { faults, problems } = shapeLayoutFaults(inst, result, parts);
    expect([...faults].sort()).toEqual([0, 1]);
    expect(problems).toHaveLength(1);
    expect(problems[0].message).toMatch(/is only 1\.0000\d* mm from/);
  });

  test('a cube listed before the cube it stands on is at fault: the lower one would go out first, under it', () => {
    const result = layout([
      { id: 'cube', at: [120, 120, 12] },
      { id: 'cube', at: [120, 120, 0] },
    ]);
    const { faults, problems } = shapeLayoutFaults(inst, result, parts);
    expect(faults).toEqual(new Set([0, 1]));
    expect(problems[0].message).toMatch(/cannot be lifted straight up/);
  });

  test('checked for the moved parts only (as while dragging), the pairs without one of them are left out, theirs are not', () => {
    // Two cubes 1 mm apart (a clash the moved part has nothing to do with), the ring, and a cube moved 1 mm from
    // the ring's hole wall; then a cube under another, listed first (a lift fault), as the moved part.
    const result = layout([
      { id: 'cube', at: [150, 150, 0] },
      { id: 'cube', at: [161, 150, 0] },
      { id: 'ring', at: [50, 50, 0] },
    ]);
    const withCube = (at: [number, number, number]) => ({ ...result, placements: [...result.placements.slice(0, 2), result.placements[2], moved(result.placements[0], at)] }) as PackResult;
    const near = withCube([61, 65, 0]);
    expect(shapeLayoutFaults(inst, near, parts).faults).toEqual(new Set([0, 1, 2, 3]));
    const focused = shapeLayoutFaults(inst, near, parts, [3]);
    expect(focused.faults).toEqual(new Set([2, 3]));
    expect(focused.problems[0].message).toMatch(/is only 1\.0000\d* mm from placements\[2\]/);
    // Clear in the hole: nothing found for it, while the full check still names the other pair.
    expect(shapeLayoutFaults(inst, withCube([65, 65, 0]), parts, [3]).faults).toEqual(new Set());
    // A cube put over the first cube but listed before it (the lower one would go out first, under it): found with
    // either of the two in focus, from either side of the pair.
    const over = { ...result, placements: [moved(result.placements[0], [150, 150, 12]), result.placements[0]] } as PackResult;
    expect(shapeLayoutFaults(inst, over, parts, [0]).faults).toEqual(new Set([0, 1]));
    expect(shapeLayoutFaults(inst, over, parts, [1]).faults).toEqual(new Set([0, 1]));
    expect(shapeLayoutFaults(inst, over, parts, [1]).problems[0].message).toMatch(/cannot be lifted straight up: placements\[0\]/);
  });
});

describe('many faults at once', () => {
  test('every part at fault is named for the editor, while the plain check lists 20 of a kind and counts the rest', () => {
    // 24 pairs of cubes, each pair 1 mm apart (spacing 2 mm): 48 parts at fault, 24 pairs.
    const many = shapeInstance([{ id: 'cube', mesh: cube, quantity: 48, orientations: ['xyz'] }], 2);
    const manyParts = shapeParts(many);
    const items = Array.from({ length: 24 }, (_, k) => [
      { id: 'cube', rotation: 0, position: [(k % 6) * 30, Math.floor(k / 6) * 30, 0] as [number, number, number] },
      { id: 'cube', rotation: 0, position: [(k % 6) * 30 + 11, Math.floor(k / 6) * 30, 0] as [number, number, number] },
    ]).flat();
    const result = summariseShapeLayout(many, items, manyParts);
    expect(shapeLayoutFaults(many, result as unknown as PackResult, manyParts).faults.size).toBe(48);
    const listed = validateShapeLayout(many, result, manyParts);
    expect(listed.filter((p) => /is only 1\.0000\d* mm from/.test(p.message))).toHaveLength(20);
    expect(listed.map((p) => p.message)).toContain('4 more pairs are closer than the spacing');
  });
});

describe('a drop by hand, by shape', () => {
  test("a cube held over the ring's hole sinks through it to the floor", () => {
    // As a box layout stacks it: on the ring's box, 2 mm over it.
    const result = layout([
      { id: 'cube', at: [65, 65, 12] },
      { id: 'ring', at: [50, 50, 0] },
    ]);
    // By boxes it cannot come lower: the ring's box is under it.
    expect(droppedPlacements(inst, result.placements, new Set([0]))[0].position[2]).toBeCloseTo(12, 9);
    const dropped = droppedByShape(inst, result.placements, [0], parts);
    expect(dropped.placements[0].position[2]).toBeCloseTo(0, 5);
    // Through the hole nothing is under it: it may stay first.
    expect(dropped.indexOf).toEqual([0, 1]);
    expect(shapeLayoutFaults(inst, { ...result, placements: dropped.placements }, parts).faults.size).toBe(0);
  });

  test("a cube held over a cup comes to rest 2 mm over its floor, and is listed after the cup so the cup does not go out first", () => {
    const result = layout([
      { id: 'cube', at: [65, 65, 14] },
      { id: 'cup', at: [50, 50, 0] },
    ]);
    const dropped = droppedByShape(inst, result.placements, [0], parts);
    expect(dropped.indexOf).toEqual([1, 0]);
    expect(dropped.placements[1].position[2]).toBeCloseTo(4, 5);
    expect(shapeLayoutFaults(inst, { ...result, placements: dropped.placements }, parts).faults.size).toBe(0);
    // Left in its old order, the same place is at fault (the cup cannot be lifted out with the cube in it).
    const unordered = [moved(result.placements[0], [65, 65, dropped.placements[1].position[2]]), result.placements[1]];
    expect(shapeLayoutFaults(inst, { ...result, placements: unordered }, parts).faults).toEqual(new Set([0, 1]));
  });

  test("over the ring's wall it stays on it (10 mm high + 2 mm spacing), and over the bare floor it lands on the floor", () => {
    const result = layout([
      { id: 'ring', at: [50, 50, 0] },
      { id: 'cube', at: [50, 50, 20] },
      { id: 'cube', at: [120, 120, 30] },
    ]);
    const dropped = droppedByShape(inst, result.placements, [1, 2], parts);
    expect(dropped.placements[1].position[2]).toBeCloseTo(12, 5);
    expect(dropped.placements[2].position[2]).toBeCloseTo(0, 5);
    expect(shapeLayoutFaults(inst, { ...result, placements: dropped.placements }, parts).faults.size).toBe(0);
  });

  test('a cube under another comes down from under it; both dropped, the upper one lands on the lower, 2 mm over it', () => {
    const result = layout([
      { id: 'cube', at: [120, 120, 20] },
      { id: 'cube', at: [120, 120, 32] },
    ]);
    expect(droppedByShape(inst, result.placements, [0], parts).placements.map((p) => p.position[2])).toEqual([expect.closeTo(0, 5), 32]);
    const both = droppedByShape(inst, result.placements, [1, 0], parts).placements.map((p) => p.position[2]);
    expect(both[0]).toBeCloseTo(0, 5);
    expect(both[1]).toBeCloseTo(12, 5);
  });

  test("a cube held in a bridge's tunnel, under its deck, comes down from under the deck to the floor", () => {
    // A 40 x 40 x 20 mm bridge: two 5 mm legs and a 5 mm deck over a 30 mm wide, 15 mm high tunnel (drawn in x and
    // height, extruded 40 mm, then stood up by a quarter turn about x: (x, y, z) -> (x, -z, y)).
    const side = prism([[0, 0], [5, 0], [5, 15], [35, 15], [35, 0], [40, 0], [40, 20], [0, 20]], 0, 40);
    const pos = side.positions.slice();
    for (let v = 0; v < pos.length; v += 3) [pos[v + 1], pos[v + 2]] = [-side.positions[v + 2], side.positions[v + 1]];
    const bridgeInst = shapeInstance(
      [
        { id: 'bridge', mesh: { positions: pos, indices: side.indices }, quantity: 1, orientations: ['xyz'] },
        { id: 'cube', mesh: cube, quantity: 1, orientations: ['xyz'] },
      ],
      2,
    );
    const bridgeParts = shapeParts(bridgeInst);
    // The cube in the middle of the tunnel, 10 mm from each leg, held 2 mm up (its top 3 mm under the deck), listed
    // first: the bridge goes out before it.
    const held = summariseShapeLayout(
      bridgeInst,
      [
        { id: 'cube', rotation: 0, position: [65, 65, 2] },
        { id: 'bridge', rotation: 0, position: [50, 50, 0] },
      ],
      bridgeParts,
    ) as unknown as PackResult;
    expect(shapeLayoutFaults(bridgeInst, held, bridgeParts).faults.size).toBe(0);
    const dropped = droppedByShape(bridgeInst, held.placements, [0], bridgeParts);
    expect(dropped.placements.find((p) => p.id === 'cube')!.position[2]).toBeCloseTo(0, 5);
    // Still under the deck: listed before the bridge, which goes out first.
    expect(dropped.placements.map((p) => p.id)).toEqual(['cube', 'bridge']);
    expect(shapeLayoutFaults(bridgeInst, { ...held, placements: dropped.placements }, bridgeParts).faults.size).toBe(0);
  });

  test('a cube moved into another (5 mm overlap) is lifted over it and comes to rest on it, 2 mm clear, as a drop by boxes would leave it', () => {
    const result = layout([
      { id: 'cube', at: [120, 120, 0] },
      { id: 'cube', at: [125, 120, 0] },
    ]);
    const dropped = droppedByShape(inst, result.placements, [1], parts);
    expect(dropped.placements[1].position[2]).toBeCloseTo(12, 5);
    expect(droppedPlacements(inst, result.placements, new Set([1]))[1].position[2]).toBeCloseTo(12, 9);
    expect(shapeLayoutFaults(inst, { ...result, placements: dropped.placements }, parts).faults.size).toBe(0);
  });
});
