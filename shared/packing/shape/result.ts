/** The result record of placed parts: unplaced counts, height, layers, utilisation by mesh volume, area profile. */
import { extentCode, placementTransform, rotatedBox, ROTATION_CODES } from '../../geometry/rotations';
import { layerCount, usableRegion } from '../geometry';
import { RESULT_FORMAT_V2, type PackInstanceV2, type PackResultV2, type PackWarning, type PlacementV2 } from '../types';
import { areaProfile, type PlacedPart } from './area';
import { shapeParts, type ShapePart } from './parts';

/** The orientation code a placement names: the box letters for a part without a mesh in a box rotation, else the signed code. */
export function codeFor(part: ShapePart, rotation: number): string {
  return signedOrBox(part.hasMesh, rotation);
}

function signedOrBox(hasMesh: boolean, rotation: number): string {
  if (!hasMesh && rotation < 6) return extentCode(rotation);
  return ROTATION_CODES[rotation];
}

export function finishResult(
  instance: PackInstanceV2,
  parts: ShapePart[],
  placements: PlacementV2[],
  forArea: PlacedPart[],
  count: number[],
  top: number,
  volume: number,
  elapsedMs: number,
  warnings: PackWarning[],
): PackResultV2 {
  const unplaced = [];
  for (const part of parts) {
    const left = part.quantity - count[part.index];
    if (left > 0) unplaced.push({ id: part.id, count: left });
  }
  const any = placements.length > 0;
  const height = any ? top : 0;
  const { extent } = usableRegion(instance);
  const denominator =
    instance.objective === 'min-height' ? extent[0] * extent[1] * (height - instance.margin.bottom) : extent[0] * extent[1] * extent[2];
  const layers = any ? Math.ceil(height / instance.layerHeight - 1e-9) : 0;
  const result: PackResultV2 = {
    format: RESULT_FORMAT_V2,
    placements,
    unplaced,
    height,
    layers: layerCount(height, instance.margin.top, instance.layerHeight),
    utilization: any && denominator > 0 ? volume / denominator : 0,
    elapsedMs: Math.round(elapsedMs * 10) / 10,
    areaProfile: areaProfile(forArea, instance.layerHeight, layers),
  };
  if (warnings.length > 0) result.warnings = warnings;
  return result;
}


/**
 * The full result record of placements given as part, rotation (0..23) and
 * the placed bounding box's minimum corner, kept in the order given (which
 * must be a lift-out order). For tests, the server and callers that arrange
 * parts themselves.
 */
export function summariseShapeLayout(
  instance: PackInstanceV2,
  items: ReadonlyArray<{ id: string; rotation: number; position: readonly number[] }>,
  prepared?: ShapePart[],
  elapsedMs = 0,
): PackResultV2 {
  const parts = prepared ?? shapeParts(instance);
  const byId = new Map(parts.map((p) => [p.id, p] as const));
  const placements: PlacementV2[] = [];
  const forArea: PlacedPart[] = [];
  const count = new Array<number>(parts.length).fill(0);
  let top = 0;
  let volume = 0;
  for (const it of items) {
    const part = byId.get(it.id);
    if (!part) throw new RangeError(`"${it.id}" is not a part of the instance`);
    const box = rotatedBox(it.rotation, part.min, part.max);
    const size: [number, number, number] = [0, 1, 2].map((a) => box.max[a] - box.min[a]) as [number, number, number];
    const transform = placementTransform(it.rotation, part.min, part.max, it.position);
    const out: PlacementV2 = { id: part.id, position: [it.position[0], it.position[1], it.position[2]], size, orientation: codeFor(part, it.rotation) };
    if (part.hasMesh) out.transform = [...transform];
    placements.push(out);
    forArea.push({ part, transform });
    count[part.index]++;
    top = Math.max(top, it.position[2] + size[2]);
    volume += part.volume;
  }
  return finishResult(instance, parts, placements, forArea, count, top, volume, elapsedMs, []);
}
