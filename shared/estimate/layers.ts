/**
 * Lengths closer than this are equal (the packing result is compared with the same tolerance).
 * Without it, 11 mm of stack at 0.11 mm would count 101 layers because 11 / 0.11 = 100.00000000000001 in floating point.
 */
export const LENGTH_TOLERANCE_MM = 1e-6;

/**
 * Layers spread for a build whose highest part tops out at `heightMm` (from the chamber floor),
 * with `marginTopMm` of powder over it: ceil((height + margin.top) / layer height).
 */
export function layerCount(heightMm: number, marginTopMm: number, layerHeightMm: number): number {
  const stackMm = heightMm + marginTopMm;
  if (stackMm <= LENGTH_TOLERANCE_MM) return 0;
  return Math.ceil((stackMm - LENGTH_TOLERANCE_MM) / layerHeightMm);
}
