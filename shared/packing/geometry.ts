import { ORIENTATIONS, type Orientation, type PackInstance, type Vec3 } from './types';

/** Comparisons of lengths allow this much, as the layout rules do. */
export const TOLERANCE_MM = 1e-6;

const AXIS: Record<string, 0 | 1 | 2> = { x: 0, y: 1, z: 2 };

/** Placed extent of a part of `size` in `orientation`: letter k picks the part axis put along chamber axis k. */
export function orientedSize(size: Vec3, orientation: Orientation): Vec3 {
  return [size[AXIS[orientation[0]]], size[AXIS[orientation[1]]], size[AXIS[orientation[2]]]];
}

export function orientationCode(o: Orientation): number {
  return ORIENTATIONS.indexOf(o);
}

export function isOrientation(v: unknown): v is Orientation {
  return typeof v === 'string' && (ORIENTATIONS as readonly string[]).includes(v);
}

/** The usable region [xy, X - xy] x [xy, Y - xy] x [bottom, Z - top] as min and max corners. */
export function usableRegion(inst: Pick<PackInstance, 'chamber' | 'margin'>): { min: Vec3; max: Vec3; extent: Vec3 } {
  const { chamber, margin } = inst;
  const min: Vec3 = [margin.xy, margin.xy, margin.bottom];
  const max: Vec3 = [chamber[0] - margin.xy, chamber[1] - margin.xy, chamber[2] - margin.top];
  return { min, max, extent: [max[0] - min[0], max[1] - min[1], max[2] - min[2]] };
}

export function layerCount(heightMm: number, topMarginMm: number, layerHeightMm: number, anyPlaced: boolean): number {
  if (!anyPlaced) return 0;
  // A relative slack keeps 128.4 / 0.1 from counting as 1285 layers through rounding noise.
  const exact = (heightMm + topMarginMm) / layerHeightMm;
  return Math.ceil(exact - 1e-9 * Math.max(1, exact));
}
