/**
 * The floor under every packing by shape (shapeLowerBound), against worked
 * examples by hand: a part stands whole above the floor margin in one of its
 * allowed quarter turns, and meshes that share no volume need their volume's
 * worth of the usable base. Every layout the engine returns stands on or
 * above it; where the parts nest it can stand on it exactly.
 */
import { housing } from '@/shared/geometry';
import { createShapePacking, shapeLowerBound, shapeParts, validateShapeLayout } from '@/shared/packing';
import { box } from '../../geometry/helpers';
import { shapeInstance } from './instance';

// 80 x 50 x 30 mm outside, walls and floor 2.5 mm: inside 75 x 45 mm, 27.5 mm deep.
const cup = housing({ lengthMm: 80, widthMm: 50, heightMm: 30, wallMm: 2.5, floorMm: 2.5, cornerRadiusMm: 5, cornerSegments: 6 });

describe('shapeLowerBound', () => {
  it('is the tallest part in its lowest allowed turn, over the floor margin', () => {
    const margin = { xy: 0, bottom: 5, top: 5 };
    // A 10 x 10 x 50 mm pin upright only stands 50 mm; allowed to lie down, 10 mm. The cup lies lowest on its floor: 30 mm.
    const upright = shapeInstance([{ id: 'pin', mesh: box(10, 10, 50), quantity: 2, orientations: ['upright'] }, { id: 'cup', mesh: cup, quantity: 1 }], 3, { margin });
    const b = shapeLowerBound(upright, shapeParts(upright));
    expect(b.tallest).toEqual({ id: 'pin', heightMm: 50 });
    expect(b.height).toBeCloseTo(55, 9);
    const any = shapeInstance([{ id: 'pin', mesh: box(10, 10, 50), quantity: 2 }, { id: 'cup', mesh: cup, quantity: 1 }], 3, { margin });
    const c = shapeLowerBound(any, shapeParts(any));
    expect(c.tallest?.id).toBe('cup');
    expect(c.tallest?.heightMm).toBeCloseTo(30, 9);
    expect(c.height).toBeCloseTo(35, 9);
  });

  it("spreads the meshes' volume over the usable base, and the engine never packs under it", () => {
    // 40 cubes of 10 mm (40,000 mm^3) on a 50 x 50 mm usable base: 16 mm at the least, 21 mm with the 5 mm floor.
    const inst = shapeInstance([{ id: 'cube', mesh: box(10, 10, 10), quantity: 40 }], 1, { chamber: [50, 50, 200], margin: { xy: 0, bottom: 5, top: 0 }, timeLimitMs: 500 });
    const parts = shapeParts(inst);
    const b = shapeLowerBound(inst, parts);
    expect(b.byVolumeMm).toBeCloseTo(16, 9);
    expect(b.height).toBeCloseTo(21, 9);
    const result = createShapePacking(inst, { maxRuns: 2 }).runSync();
    expect(result.unplaced).toEqual([]);
    expect(validateShapeLayout(inst, result, parts)).toEqual([]);
    // Four by four a layer with 1 mm between (43 mm), three layers: 5 + 3 x 10 + 2 x 1 = 37 mm, over the floor of 21.
    expect(result.height).toBeGreaterThanOrEqual(b.height);
  });

  it('is met exactly where the small parts nest in the tallest one', () => {
    // Six 10 x 10 x 8 mm blocks go inside the cup on a plate its size: the build is the cup's 30 mm (no margins).
    const inst = shapeInstance(
      [
        { id: 'cup', mesh: cup, quantity: 1, orientations: ['upright'] },
        { id: 'block', mesh: box(10, 10, 8), quantity: 6, orientations: ['upright'] },
      ],
      3,
      { chamber: [82, 52, 200], margin: { xy: 0, bottom: 0, top: 0 }, timeLimitMs: 400 },
    );
    const parts = shapeParts(inst);
    const b = shapeLowerBound(inst, parts);
    expect(b.height).toBeCloseTo(30, 9);
    const result = createShapePacking(inst, { maxRuns: 4 }).runSync();
    expect(result.unplaced).toEqual([]);
    expect(validateShapeLayout(inst, result, parts)).toEqual([]);
    expect(result.height).toBeCloseTo(b.height, 6);
  });
});
