/**
 * A floor under every packing by shape of a "pack-instance/2", measured like a
 * result's height (from the chamber floor):
 *
 *   bottom + max( max_i min_{r allowed for i} z-extent of part i turned by r,
 *                 sum_i q_i V_i / (Ux * Uy) )
 *
 * The first term: each part stands whole above the floor margin, in one of its
 * allowed quarter turns, and a quarter turn's z-extent is one side of the
 * part's bounding box. The second: placed meshes share no volume, so their
 * enclosed volume fits in the usable base (Ux by Uy) times the height above
 * the floor margin; the spacing only adds room. Both hold for any layout,
 * whatever the packing, which the box bound (../bounds.ts lowerBound, on
 * boxes grown by the spacing) does not.
 */
import { rotatedExtent } from '../../geometry/rotations';
import { usableRegion } from '../geometry';
import type { PackInstanceV2 } from '../types';
import type { ShapePart } from './parts';

export interface ShapeBound {
  /** The floor, from the chamber floor (mm). */
  height: number;
  /** The part that stands tallest in its lowest allowed turn, and that height (mm, over the floor margin). */
  tallest: { id: string; heightMm: number } | null;
  /** The parts' volume spread over the usable base (mm, over the floor margin). */
  byVolumeMm: number;
}

/** A part as the floor sees it: how tall it stands at its lowest allowed turn, and the room it fills. */
export interface FloorPart {
  id: string;
  quantity: number;
  /** Its height in the lowest turn it may take (mm). */
  lowestMm: number;
  /** The volume one copy fills for certain (mm^3): its mesh's, or for a part packed as its box, the box's. */
  volumeMm3: number;
}

/** The floor of parts given by their lowest height and volume (see above). */
export function packingFloor(instance: Pick<PackInstanceV2, 'chamber' | 'margin'>, parts: readonly FloorPart[]): ShapeBound {
  const { extent } = usableRegion(instance);
  let tallest: ShapeBound['tallest'] = null;
  let volume = 0;
  for (const part of parts) {
    if (part.quantity <= 0) continue;
    if (!tallest || part.lowestMm > tallest.heightMm) tallest = { id: part.id, heightMm: part.lowestMm };
    volume += part.quantity * part.volumeMm3;
  }
  const byVolumeMm = volume / (extent[0] * extent[1]);
  return { height: instance.margin.bottom + Math.max(tallest?.heightMm ?? 0, byVolumeMm), tallest, byVolumeMm };
}

/** The floor of a version 2 instance's parts, their meshes measured (./parts.ts shapeParts). */
export function shapeLowerBound(instance: Pick<PackInstanceV2, 'chamber' | 'margin'>, parts: readonly ShapePart[]): ShapeBound {
  return packingFloor(
    instance,
    parts
      .filter((p) => p.rotations.length > 0)
      .map((p) => ({ id: p.id, quantity: p.quantity, lowestMm: Math.min(...p.rotations.map((r) => rotatedExtent(r, p.size)[2])), volumeMm3: p.volume })),
  );
}
