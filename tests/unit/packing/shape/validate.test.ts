import { readModelXml, mergeMeshes, torus } from '@/shared/geometry';
import { taperedCup } from '@/shared/geometry/generate';
import { TOLERANCE_MM } from '@/shared/packing/geometry';
import { buildBvh, PlacedBvh } from '@/shared/packing/shape/bvh';
import { pairGap } from '@/shared/packing/shape/validate';
import { decodeText } from '@/shared/geometry/text';
import {
  summariseShapeLayout,
  validateShapeLayout,
  type PackInstanceV2,
  type PackResultV2,
} from '@/shared/packing';
import { box, fixture } from '../../geometry/helpers';
import { shapeInstance } from './instance';

const instance = shapeInstance;

/** A result for placements given as (id, rotation, minimum corner), listed in the given order. */
function layout(inst: PackInstanceV2, items: Array<[string, number, [number, number, number]]>): PackResultV2 {
  return summariseShapeLayout(inst, items.map(([id, rotation, position]) => ({ id, rotation, position })));
}

describe('shape validator against the meshes', () => {
  // Two unit cubes (Euclidean geometry: the gap between parallel faces is the difference of their coordinates).
  test('two unit cubes 2 mm apart face to face: valid at spacing 2, too close at spacing 2.5', () => {
    for (const [spacing, ok] of [[2, true], [2.5, false]] as const) {
      const inst = instance([{ id: 'cube', mesh: box(1, 1, 1), quantity: 2 }], spacing);
      const r = layout(inst, [['cube', 0, [10, 10, 0]], ['cube', 0, [13, 10, 0]]]);
      const problems = validateShapeLayout(inst, r);
      if (ok) expect(problems).toEqual([]);
      else expect(problems.map((p) => p.message).join()).toMatch(/only 2\.000000 mm from/);
    }
  });

  test("the utilization may differ from the meshes' by rounding (1 in 10^7), not by a figure of its own (1 in 10^4)", () => {
    // Two 10 mm cubes in a 23 x 10 x 10 mm chamber: a utilization of 0.87 (where 1 in 10^9 was all it might be off).
    const inst = instance([{ id: 'cube', mesh: box(10, 10, 10), quantity: 2 }], 3, { chamber: [23, 10, 10] });
    const r = layout(inst, [['cube', 0, [0, 0, 0]], ['cube', 0, [13, 0, 0]]]);
    expect(r.utilization).toBeCloseTo(2000 / 2300, 9);
    expect(validateShapeLayout(inst, { ...r, utilization: r.utilization * (1 + 1e-7) })).toEqual([]);
    expect(validateShapeLayout(inst, { ...r, utilization: r.utilization * (1 + 1e-4) }).map((p) => p.field)).toEqual(['utilization']);
  });

  test('two unit cubes offset along x and y: their nearest edges are sqrt(2) apart (Pythagoras)', () => {
    const inst = instance([{ id: 'cube', mesh: box(1, 1, 1), quantity: 2 }], 1.41);
    const r = layout(inst, [['cube', 0, [10, 10, 0]], ['cube', 0, [12, 12, 0]]]);
    expect(validateShapeLayout(inst, r)).toEqual([]);
    const tight = instance([{ id: 'cube', mesh: box(1, 1, 1), quantity: 2 }], 1.42);
    expect(validateShapeLayout(tight, layout(tight, [['cube', 0, [10, 10, 0]], ['cube', 0, [12, 12, 0]]])).map((p) => p.message).join()).toMatch(/only 1\.414214 mm/);
  });

  test('the 3MF specification example box (3MF Core, Appendix B.2): two copies 5 mm apart pass at 5, fail at 6', () => {
    const model = readModelXml(decodeText(fixture('3mf-core-example-box.model')), 'box.model');
    if (!model.ok) throw new Error('fixture must read');
    const mesh = mergeMeshes([...model.model.objects.values()].filter((o) => o.indices.length > 0));
    for (const [spacing, ok] of [[5, true], [6, false]] as const) {
      const inst = instance([{ id: 'box', mesh, quantity: 2 }], spacing);
      // The example box is 39.998 mm wide: the second copy starts 5 mm after the first ends.
      const r = layout(inst, [['box', 0, [10, 10, 0]], ['box', 0, [10 + 39.998 + 5, 10, 0]]]);
      expect(validateShapeLayout(inst, r).length === 0).toBe(ok);
    }
  });

  test('pairs alike (the same parts, turns and offset) are each reported: a row of cubes 2 mm apart at spacing 2.5, and a stack listed top first', () => {
    const inst = instance([{ id: 'cube', mesh: box(1, 1, 1), quantity: 4 }], 2.5);
    const row = layout(inst, [['cube', 0, [10, 10, 0]], ['cube', 0, [13, 10, 0]], ['cube', 0, [16, 10, 0]], ['cube', 0, [30, 10, 0]]]);
    const close = validateShapeLayout(inst, row).map((p) => `${p.field} ${p.message}`);
    expect(close).toHaveLength(2);
    expect(close[0]).toMatch(/^placements\[1\] is only 2\.000000 mm from placements\[0\]/);
    expect(close[1]).toMatch(/^placements\[2\] is only 2\.000000 mm from placements\[1\]/);
    const stack = layout(inst, [['cube', 0, [10, 10, 12]], ['cube', 0, [10, 10, 8]], ['cube', 0, [10, 10, 4]], ['cube', 0, [10, 10, 0]]]);
    // Each cube is blocked by every one listed before it (all are above it): 1 + 2 + 3 reports, two offsets repeating.
    const blocked = validateShapeLayout(inst, stack).filter((p) => /cannot be lifted/.test(p.message)).map((p) => p.field);
    expect(blocked.sort()).toEqual(['placements[1]', 'placements[2]', 'placements[2]', 'placements[3]', 'placements[3]', 'placements[3]']);
  });

  test('a tall column listed bottom first passes, and every pair of it is still looked at when listed top first', () => {
    // 30 cubes of 1 mm, 2 mm apart one above another (a column of parts stacked high): bottom first, valid; top
    // first, each is blocked by all 29 listed before it or above it: 435 pairs, all counted.
    const inst = instance([{ id: 'cube', mesh: box(1, 1, 1), quantity: 30 }], 2);
    const column = Array.from({ length: 30 }, (_, k) => ['cube', 0, [10, 10, 3 * k]] as [string, number, [number, number, number]]);
    expect(validateShapeLayout(inst, layout(inst, column))).toEqual([]);
    const down = validateShapeLayout(inst, layout(inst, [...column].reverse()), undefined, { maxReports: 1000 });
    expect(down.filter((p) => /cannot be lifted/.test(p.message))).toHaveLength((30 * 29) / 2);
  });

  test('a check told to stop says the layout was not all checked', () => {
    // 300 cubes in a valid grid; the check polls between placements (every 64 while reading them, 32 while pairing).
    const inst = instance([{ id: 'cube', mesh: box(1, 1, 1), quantity: 300 }], 2);
    const grid = Array.from({ length: 300 }, (_, k) => ['cube', 0, [3 * (k % 20), 3 * Math.floor(k / 20), 0]] as [string, number, [number, number, number]]);
    const r = layout(inst, grid);
    expect(validateShapeLayout(inst, r, undefined, { stopped: () => false })).toEqual([]);
    expect(validateShapeLayout(inst, r, undefined, { stopped: () => true })).toEqual([{ field: 'placements', message: 'were not all checked: the check was stopped' }]);
  });

  test('the lift-out of one pair of finely tessellated meshes asks the stop too, and told to stop, the check ends there', () => {
    // A cup of 512 sides (4,096 triangles) stacked in a copy of itself, 12 mm over it: its outer wall 3.58 mm from
    // the lower one's inner wall (spacing 3), so the pair is valid. Whether the lower one is in the upper one's way
    // up is a long search (the walls' long thin triangles overlap in plan); the stop is asked in it as well as in
    // the distance's: more often than the distance alone asks it.
    const mesh = taperedCup({ bottomRadiusMm: 16, topRadiusMm: 26, heightMm: 20, wallMm: 2, floorMm: 2.5, segments: 512 });
    const inst = instance([{ id: 'cup', mesh, quantity: 2 }], 3);
    const r = layout(inst, [['cup', 0, [10, 10, 0]], ['cup', 0, [10, 10, 12]]]);
    let asked = 0;
    expect(validateShapeLayout(inst, r, undefined, { stopped: () => (asked++, false) })).toEqual([]);
    // The distance alone, on the same two placements (the cup's own box starts at (-26, -26, 0)).
    const tree = buildBvh(mesh);
    let gapAsked = 0;
    expect(pairGap(new PlacedBvh(tree, 0, [36, 36, 0]), new PlacedBvh(tree, 0, [36, 36, 12]), 3, TOLERANCE_MM, () => (gapAsked++, false))).toBeNull();
    expect(asked).toBeGreaterThan(gapAsked + 2);
    asked = 0;
    expect(validateShapeLayout(inst, r, undefined, { stopped: () => (asked++, true) })).toEqual([{ field: 'placements', message: 'were not all checked: the check was stopped' }]);
    expect(asked).toBe(1);
  });

  test('a stop asked while one pair of finely tessellated meshes is measured ends the check there', () => {
    // A ring of 10,000 triangles lying in the hole of a larger one, about 3.2 mm from it all round (spacing 3): the
    // facing circles are within the spacing's reach everywhere, so measuring that one pair visits thousands of pairs
    // of tree leaves (the stop is asked every 256). Two placements never reach the polls between placements: only
    // the measuring itself can stop the check.
    const inst = instance(
      [
        { id: 'large', mesh: torus(20, 5, 100, 50), quantity: 1 },
        { id: 'small', mesh: torus(8.8, 3, 100, 50), quantity: 1 },
      ],
      3,
    );
    const r = layout(inst, [['large', 0, [10, 10, 0]], ['small', 0, [23.2, 23.2, 2]]]);
    let asked = 0;
    expect(validateShapeLayout(inst, r, undefined, { stopped: () => (asked++, false) })).toEqual([]);
    expect(asked).toBeGreaterThan(10);
    asked = 0;
    expect(validateShapeLayout(inst, r, undefined, { stopped: () => (asked++, true) })).toEqual([{ field: 'placements', message: 'were not all checked: the check was stopped' }]);
    expect(asked).toBe(1);
  });

  test('lift-out order: a cube above another must be listed after it', () => {
    const inst = instance([{ id: 'cube', mesh: box(4, 4, 4), quantity: 2 }], 1);
    const up = layout(inst, [['cube', 0, [10, 10, 0]], ['cube', 0, [11, 11, 6]]]);
    expect(validateShapeLayout(inst, up)).toEqual([]);
    const down = layout(inst, [['cube', 0, [11, 11, 6]], ['cube', 0, [10, 10, 0]]]);
    expect(validateShapeLayout(inst, down).map((p) => p.message).join()).toMatch(/cannot be lifted straight up/);
    // Beside each other (no overlap in plan view), either order lifts out.
    const side = layout(inst, [['cube', 0, [20, 10, 6]], ['cube', 0, [10, 10, 0]]]);
    expect(validateShapeLayout(inst, side)).toEqual([]);
  });

  test('a ring around a post slides off upwards past its side: not touching, so either order lifts out', () => {
    // A torus (major radius 10, tube 2: hole radius 8) around a 4 x 4 post (half-diagonal 2.83): no overlap in plan view.
    const ring = torus(10, 2, 32, 12);
    const post = box(4, 4, 30);
    const inst = instance([{ id: 'ring', mesh: ring, quantity: 1, orientations: ['xyz'] }, { id: 'post', mesh: post, quantity: 1, orientations: ['xyz'] }], 1);
    const ringFirst = layout(inst, [['post', 0, [48, 48, 0]], ['ring', 0, [38, 38, 10]]]);
    expect(validateShapeLayout(inst, ringFirst)).toEqual([]);
    const postFirst = layout(inst, [['ring', 0, [38, 38, 10]], ['post', 0, [48, 48, 0]]]);
    expect(validateShapeLayout(inst, postFirst)).toEqual([]);
  });

  test('a cube inside a larger hollow shell (surfaces far apart) is reported as inside', () => {
    const big = box(20, 20, 20);
    const inst = instance([{ id: 'big', mesh: big, quantity: 1 }, { id: 'small', mesh: box(2, 2, 2), quantity: 1 }], 1);
    const r = layout(inst, [['big', 0, [10, 10, 0]], ['small', 0, [19, 19, 9]]]);
    expect(validateShapeLayout(inst, r).map((p) => p.message).join()).toMatch(/lies inside/);
  });

  test('a rotation the part does not allow, and a transform that is not a quarter turn, are refused', () => {
    const inst = instance([{ id: 'cube', mesh: box(1, 2, 3), quantity: 1, orientations: ['upright'] }], 1);
    const r = layout(inst, [['cube', 1, [10, 10, 0]]]);
    expect(validateShapeLayout(inst, r).map((p) => p.message).join()).toMatch(/is not a rotation part "cube" allows/);
    const skew = layout(inst, [['cube', 0, [10, 10, 0]]]);
    skew.placements[0].transform = [0.5, 0.5, 0, -0.5, 0.5, 0, 0, 0, 1, 10, 10, 0];
    expect(validateShapeLayout(inst, skew).map((p) => p.field)).toContain('placements[0].transform');
  });

  test('counts must add up and the area profile must hold one number a layer', () => {
    const inst = instance([{ id: 'cube', mesh: box(1, 1, 1), quantity: 2 }], 1);
    const r = layout(inst, [['cube', 0, [10, 10, 0]]]);
    expect(r.unplaced).toEqual([{ id: 'cube', count: 1 }]);
    expect(validateShapeLayout(inst, { ...r, unplaced: [] }).map((p) => p.field)).toContain('parts[0].quantity');
    const ok = layout(inst, [['cube', 0, [10, 10, 0]], ['cube', 0, [15, 10, 0]]]);
    expect(ok.areaProfile).toHaveLength(10);
    // Each layer of two unit cubes has 2 mm^2 of section (sum x layer height = volume, 2 mm^3).
    ok.areaProfile.forEach((a) => expect(a).toBeCloseTo(2, 9));
    expect(validateShapeLayout(inst, { ...ok, areaProfile: ok.areaProfile.slice(1) }).map((p) => p.field)).toContain('areaProfile');
  });
});

describe('shape validator on layouts made to cost it', () => {
  test('copies more than the quantity: only the count is named, before any mesh is placed', () => {
    const inst = instance([{ id: 'cube', mesh: box(10, 10, 10), quantity: 2 }], 1);
    const one = layout(inst, [['cube', 0, [0, 0, 0]]]);
    const heap = { ...one, placements: Array.from({ length: 20_000 }, () => one.placements[0]) };
    expect(validateShapeLayout(inst, heap)).toEqual([{ field: 'parts[0].quantity', message: 'is 2 but "cube" has 20000 placed' }]);
  });

  test('20,000 copies heaped in one spot (the right count): the check stops at 10,000 faults, "at least" the rest', () => {
    const inst = instance([{ id: 'cube', mesh: box(10, 10, 10), quantity: 20_000 }], 1);
    const one = layout(inst, [['cube', 0, [0, 0, 0]]]);
    const heap = { ...one, placements: Array.from({ length: 20_000 }, () => one.placements[0]) };
    const problems = validateShapeLayout(inst, heap, undefined, { maxReports: 5 });
    const more = problems.filter((p) => p.field === 'placements').map((p) => p.message);
    expect(more).toEqual([expect.stringMatching(/^at least \d+ more pairs are closer than the spacing$/), expect.stringMatching(/^at least \d+ more parts are blocked on their way up$/)]);
    const counted = more.map((m) => Number(/\d+/.exec(m)![0]) + 5).reduce((a, b) => a + b, 0);
    expect(counted).toBeGreaterThanOrEqual(10_000);
    expect(counted).toBeLessThan(10_000 + 2 * 20_000);
  });
});
