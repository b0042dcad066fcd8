/**
 * Dragging parts across the build plate: where the pointer's ray meets the
 * horizontal plane at the dragged part's base height, and how far that point
 * has moved since the press. The part moves by the same amount, so the point
 * of its base under the pointer stays under it.
 *
 *   camera o
 *           \  ray through the pointer
 *            \
 *   ----------x----------  z = base of the pressed part
 *
 * Plain functions (no three.js), checked in tests/unit/viewer/drag.test.ts.
 */
import type { Vec3 } from './math';

/** A pointer position in the canvas as normalised device coordinates: x right and y up, each -1..1 across the canvas. */
export function deviceCoords(clientX: number, clientY: number, rect: { left: number; top: number; width: number; height: number }): [number, number] {
  const w = rect.width > 0 ? rect.width : 1;
  const h = rect.height > 0 ? rect.height : 1;
  return [((clientX - rect.left) / w) * 2 - 1, 1 - ((clientY - rect.top) / h) * 2];
}

/**
 * Rays that meet the plane at less than this angle (about 3 degrees) are taken as running along it: looking at
 * the plate edge on (the front or side view), a pixel of pointer travel would be metres on the plate.
 */
const MIN_SINE = 0.05;

/**
 * Where the ray from `origin` along `direction` meets the plane z = `zMm`, as [x, y]; null when it runs along the
 * plane or points away from it. (Ray-plane intersection: t = (z - origin.z) / direction.z, kept when t >= 0.)
 */
export function rayOnPlaneZ(origin: Vec3, direction: Vec3, zMm: number): [number, number] | null {
  const len = Math.hypot(direction[0], direction[1], direction[2]);
  if (!(len > 0) || Math.abs(direction[2]) / len < MIN_SINE) return null;
  const t = (zMm - origin[2]) / direction[2];
  if (!(t >= 0) || !Number.isFinite(t)) return null;
  return [origin[0] + t * direction[0], origin[1] + t * direction[1]];
}

/** How far the plate point under the pointer has moved since the press, in mm, to a tenth of a millimetre. */
export function dragDelta(start: readonly [number, number], now: readonly [number, number]): [number, number] {
  // Kept to a tenth of a millimetre (finer than a pointer can place a part), rounded through whole tenths so that
  // no 0.30000000000000004 or -0 is stored.
  const r = (v: number) => Math.round(v * 10) / 10 + 0;
  return [r(now[0] - start[0]), r(now[1] - start[1])];
}

/** Pointer travel (px) below which a press and release is a click, not a drag. */
export const DRAG_SLOP_PX = 4;

/** True once the pointer has travelled further than the slop from where it was pressed. */
export function pastSlop(startPx: readonly [number, number], nowPx: readonly [number, number]): boolean {
  return Math.hypot(nowPx[0] - startPx[0], nowPx[1] - startPx[1]) > DRAG_SLOP_PX;
}
