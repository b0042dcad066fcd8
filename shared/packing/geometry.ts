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

/**
 * Layers of a build whose highest part tops out at `heightMm` over the chamber floor, with `topMarginMm` of powder
 * over it: ceil((height + margin.top) / layer height), as the packing contract defines it (an empty layout too: its
 * top margin). Lengths within TOLERANCE_MM are equal: 11 mm at 0.11 mm is 100 layers, though 11 / 0.11 =
 * 100.00000000000001 in floating point. The packing's results, their validators and the estimates all count so.
 */
export function layerCount(heightMm: number, topMarginMm: number, layerHeightMm: number): number {
  const stackMm = heightMm + topMarginMm;
  if (stackMm <= TOLERANCE_MM) return 0;
  return Math.ceil((stackMm - TOLERANCE_MM) / layerHeightMm);
}
