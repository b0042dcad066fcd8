import { taperedCup } from '@/shared/geometry/generate';
import { blocksLift, buildBvh, PlacedBvh, surfaceDistance } from '@/shared/packing/shape/bvh';

/**
 * Two copies of a tapered cup, one straight over the other, are closest between the lower cup's inner wall and
 * the upper cup's outer wall: in a section through the axis, two parallel lines. Their distance is elementary
 * geometry (the perpendicular distance of parallel lines): walls of slope (r1 - r0) / h, the inner one the wall
 * thickness w inwards (horizontally), the upper copy z higher: ((r1 - r0) / h * z - w) * cos(atan((r1 - r0) / h)).
 * A polygon of n sides errs from its circle by r (1 - cos(pi / n)), under 0.01 mm here. Finely tessellated walls
 * are the case the triangles' planes prune (their boxes are long and loose).
 */
describe('surface distance of copies nested in each other', () => {
  const [r0, r1, h, w] = [16, 26, 20, 2];
  const slope = (r1 - r0) / h;
  const exact = (z: number) => (slope * z - w) * Math.cos(Math.atan(slope));

  it.each([48, 256, 512])('is the walls\' distance for a cup of %i sides, one copy over another', (segments) => {
    const cup = buildBvh(taperedCup({ bottomRadiusMm: r0, topRadiusMm: r1, heightMm: h, wallMm: w, floorMm: 2.5, segments }));
    const low = new PlacedBvh(cup, 0, [0, 0, 0]);
    for (const z of [10, 12, 14]) {
      const d = surfaceDistance(low, new PlacedBvh(cup, 0, [0, 0, z]), exact(z) + 1);
      expect(Math.abs(d - exact(z))).toBeLessThan(r1 * (1 - Math.cos(Math.PI / segments)) + 1e-9);
    }
    // Under a cap, the cap.
    expect(surfaceDistance(low, new PlacedBvh(cup, 0, [0, 0, 14]), 3)).toBe(3);
  });

  it('gives up when told to, and says so (NaN)', () => {
    const cup = buildBvh(taperedCup({ bottomRadiusMm: r0, topRadiusMm: r1, heightMm: h, wallMm: w, floorMm: 2.5, segments: 256 }));
    const low = new PlacedBvh(cup, 0, [0, 0, 0]);
    let asked = 0;
    const d = surfaceDistance(low, new PlacedBvh(cup, 0, [0, 0, 12]), 10, -Infinity, () => ++asked >= 2);
    expect(d).toBeNaN();
    expect(asked).toBe(2);
  });
});

/**
 * The straight lift of the same nested copies: the upper cup, 12 mm over the lower (clear of it by the walls'
 * distance above), comes straight up out of it; the lower cannot come up through the upper. A cone tessellated into
 * long thin triangles keeps most pairs of tree leaves overlapping in plan (each triangle's box spans its whole run
 * from foot to rim), so the search is long for fine cups and must stop when told to.
 */
describe('lift-out of copies nested in each other', () => {
  const cup = buildBvh(taperedCup({ bottomRadiusMm: 16, topRadiusMm: 26, heightMm: 20, wallMm: 2, floorMm: 2.5, segments: 512 }));
  const low = new PlacedBvh(cup, 0, [0, 0, 0]);
  const up = new PlacedBvh(cup, 0, [0, 0, 12]);

  it('lets the upper copy out and keeps the lower one under it', () => {
    expect(blocksLift(up, low, 1e-6)).toBe(false);
    expect(blocksLift(low, up, 1e-6)).toBe(true);
  });

  it('asks on the way whether to stop, and when told to, gives up and says so (null)', () => {
    let asked = 0;
    expect(blocksLift(up, low, 1e-6, () => (asked++, false))).toBe(false);
    expect(asked).toBeGreaterThan(2);
    asked = 0;
    expect(blocksLift(up, low, 1e-6, () => ++asked >= 2)).toBeNull();
    expect(asked).toBe(2);
  });
});
