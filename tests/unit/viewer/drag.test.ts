import fc from 'fast-check';
import { dragDelta, deviceCoords, pastSlop, rayOnPlaneZ } from '../../../components/viewer/drag';
import type { Vec3 } from '../../../components/viewer/math';

describe('deviceCoords', () => {
  const rect = { left: 100, top: 50, width: 400, height: 200 };
  test('the canvas corners and centre map to -1..1, y up (the WebGL convention)', () => {
    expect(deviceCoords(100, 50, rect)).toEqual([-1, 1]);
    expect(deviceCoords(500, 250, rect)).toEqual([1, -1]);
    expect(deviceCoords(300, 150, rect)).toEqual([0, 0]);
  });
  test('a canvas with no size does not divide by zero', () => {
    const [x, y] = deviceCoords(10, 10, { left: 0, top: 0, width: 0, height: 0 });
    expect(Number.isFinite(x) && Number.isFinite(y)).toBe(true);
  });
});

describe('rayOnPlaneZ', () => {
  test('straight down from above lands under the origin', () => {
    expect(rayOnPlaneZ([12, -7, 500], [0, 0, -1], 20)).toEqual([12, -7]);
  });

  test('a slanted ray lands where the line meets the plane (worked example)', () => {
    // From (0, 0, 100) along (1, 2, -1): z = 100 - t reaches 40 at t = 60, so x = 60, y = 120.
    expect(rayOnPlaneZ([0, 0, 100], [1, 2, -1], 40)).toEqual([60, 120]);
  });

  test('the point found is on the ray and on the plane (property)', () => {
    const coord = fc.double({ min: -1000, max: 1000, noNaN: true });
    fc.assert(
      fc.property(coord, coord, fc.double({ min: 1, max: 2000, noNaN: true }), coord, coord, fc.double({ min: -1, max: -0.1, noNaN: true }), fc.double({ min: 0, max: 500, noNaN: true }), (ox, oy, oz, dx, dy, dz, z) => {
        fc.pre(oz > z);
        const o: Vec3 = [ox, oy, oz];
        const d: Vec3 = [dx / 1000, dy / 1000, dz];
        const hit = rayOnPlaneZ(o, d, z);
        if (!hit) return true; // too shallow a ray: refused
        const t = (z - oz) / dz;
        expect(hit[0]).toBeCloseTo(ox + t * d[0], 6);
        expect(hit[1]).toBeCloseTo(oy + t * d[1], 6);
        return true;
      }),
    );
  });

  test('a ray along the plate or pointing away from the plane gives no point', () => {
    expect(rayOnPlaneZ([0, 0, 100], [1, 0, 0], 0)).toBeNull();
    expect(rayOnPlaneZ([0, 0, 100], [1, 0, -0.01], 0)).toBeNull();
    expect(rayOnPlaneZ([0, 0, 100], [0, 0, 1], 0)).toBeNull();
    expect(rayOnPlaneZ([0, 0, 100], [0, 0, 0], 0)).toBeNull();
  });
});

describe('dragDelta', () => {
  test('the plate point moved, in mm, to a tenth', () => {
    expect(dragDelta([10, 20], [25.04, 12.96])).toEqual([15, -7]);
    expect(dragDelta([0, 0], [0.26, -0.24])).toEqual([0.3, -0.2]);
  });
  test('no movement is exactly zero (no negative zero)', () => {
    const [dx, dy] = dragDelta([5, 5], [5.01, 4.99]);
    expect(Object.is(dx, 0) && Object.is(dy, 0)).toBe(true);
  });
});

describe('pastSlop', () => {
  test('a jitter of a few pixels is still a click; further is a drag', () => {
    expect(pastSlop([100, 100], [103, 102])).toBe(false);
    expect(pastSlop([100, 100], [104, 104])).toBe(true);
  });
});
