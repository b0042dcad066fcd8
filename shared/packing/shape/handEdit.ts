/**
 * A layout packed by shape changed by hand, against the parts' meshes: which
 * placements the change leaves at fault (the exact check a kept layout gets on
 * the server), and the chosen placements dropped straight down as far as their
 * shapes allow (into a housing's hollow, under a bracket's leg), listed again
 * where they can be lifted out in turn. The plan editor runs both in its
 * packing worker, where the meshes are.
 */
import { placementRotation } from '../codec';
import { inLiftOrder, placementsAtFault, withPosition, type LiftRelation } from '../edit';
import { TOLERANCE_MM } from '../geometry';
import { RESULT_FORMAT_V2, type FieldProblem, type PackInstanceV2, type PackResult, type PackResultV2, type Placement } from '../types';
import { blocksLift, PlacedBvh } from './bvh';
import { shapeParts, type ShapePart } from './parts';
import { restingHeight, type SettleItem } from './settle';
import { translationOf, validateShapeLayout } from './validate';

/** The placements at fault (by index) and the problems naming them, from the check against the meshes. */
export function shapeLayoutFaults(instance: PackInstanceV2, result: PackResult, parts: ShapePart[] = shapeParts(instance)): { faults: Set<number>; problems: FieldProblem[] } {
  const asV2 = { ...(result as unknown as PackResultV2), format: RESULT_FORMAT_V2 };
  // The totals (height, density, area profile) are worked out again wherever the layout is kept: only the placements count here.
  const problems = validateShapeLayout(instance, asV2, parts).filter((p) => p.field.startsWith('placements'));
  return { faults: placementsAtFault(problems), problems };
}

/**
 * The chosen placements, lowest first, each lowered straight down until its shape comes within the spacing of
 * a part under it (or reaches the floor keep-out); one held by a part reaching over it stays. Each lowered part is
 * then listed after the parts it now lies over and before those over it (found by the meshes), so that the
 * list stays a lift-out order. Returns the new list and, for each old index, its new index.
 */
export function droppedByShape(
  instance: PackInstanceV2,
  placements: readonly Placement[],
  chosen: Iterable<number>,
  parts: ShapePart[] = shapeParts(instance),
): { placements: Placement[]; indexOf: number[] } {
  const byId = new Map(parts.map((p) => [p.id, p] as const));
  const out = placements.slice();
  const itemOf = (p: Placement): SettleItem => ({ part: byId.get(p.id)!.index, rotation: placementRotation(p), position: [p.position[0], p.position[1], p.position[2]] });
  const order = [...new Set(chosen)].filter((i) => out[i] && byId.has(out[i].id)).sort((a, b) => out[a].position[2] - out[b].position[2]);
  for (const i of order) {
    // A part wholly over this one's box only gets further away as it comes down.
    const p = out[i];
    const others = out.filter((q, j) => j !== i && byId.has(q.id) && q.position[2] < p.position[2] + p.size[2] - TOLERANCE_MM).map(itemOf);
    const z = restingHeight(instance, parts, itemOf(out[i]), others);
    if (z < p.position[2]) out[i] = withPosition(p, [p.position[0], p.position[1], z]);
  }
  // Which part lies over which, by the meshes: a part in a housing lies over its floor, not beside its walls.
  const placed = new Map<number, PlacedBvh | null>();
  const placedAt = (i: number): PlacedBvh | null => {
    if (!placed.has(i)) {
      const p = out[i];
      const part = byId.get(p.id);
      const rotation = part ? placementRotation(p) : -1;
      placed.set(i, part && rotation >= 0 ? new PlacedBvh(part.bvh(), rotation, translationOf(part, rotation, p)) : null);
    }
    return placed.get(i)!;
  };
  const relation: LiftRelation = (i, k) => {
    const p = out[i], q = out[k];
    for (let a = 0; a < 2; a++) if (q.position[a] >= p.position[a] + p.size[a] - TOLERANCE_MM || p.position[a] >= q.position[a] + q.size[a] - TOLERANCE_MM) return null;
    const A = placedAt(i), B = placedAt(k);
    if (!A || !B) return null;
    if (blocksLift(A, B, TOLERANCE_MM)) return 'above';
    if (blocksLift(B, A, TOLERANCE_MM)) return 'below';
    return null;
  };
  return inLiftOrder(out, order, relation);
}
