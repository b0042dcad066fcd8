/**
 * A layout packed by shape changed by hand, against the parts' meshes: which
 * placements the change leaves at fault (the exact check a kept layout gets on
 * the server), and the chosen placements dropped straight down as far as their
 * shapes allow (into a housing's hollow, through a ring's hole), listed again
 * where they can be lifted out in turn. The plan editor runs both in its
 * packing worker, where the meshes are.
 */
import { placementRotation } from '../codec';
import { footprintsMeet, inLiftOrder, placementsAtFault, withPosition, type LiftRelation } from '../edit';
import { TOLERANCE_MM, usableRegion } from '../geometry';
import { RESULT_FORMAT_V2, type FieldProblem, type PackInstanceV2, type PackResult, type PackResultV2, type Placement } from '../types';
import { blocksLift, PlacedBvh } from './bvh';
import { shapeParts, type ShapePart } from './parts';
import { restingHeights, type SettleItem } from './settle';
import { pairGap, translationOf, validateShapeLayout } from './validate';

/**
 * The placements at fault (by index) and the problems naming them, from the check against the meshes. With
 * `only`, just the pairs that hold one of those placements are checked (parts being moved over a layout that
 * passed: the rest cannot have changed), which is what makes the check quick enough to follow a drag.
 */
export function shapeLayoutFaults(
  instance: PackInstanceV2,
  result: PackResult,
  parts: ShapePart[] = shapeParts(instance),
  only?: Iterable<number>,
): { faults: Set<number>; problems: FieldProblem[] } {
  const asV2 = { ...(result as unknown as PackResultV2), format: RESULT_FORMAT_V2 };
  // The totals (height, density, area profile) are worked out again wherever the layout is kept: only the placements count here.
  // Every part at fault is named, so the editor can mark each one.
  const focus = only ? new Set(only) : undefined;
  const problems = validateShapeLayout(instance, asV2, parts, { focus, maxReports: Infinity }).filter((p) => p.field.startsWith('placements'));
  return { faults: placementsAtFault(problems), problems };
}

/**
 * The chosen placements, lowest first, each dropped: one clear of the others where it is comes straight down
 * until its shape comes within the spacing of a part under it (or reaches the floor keep-out), also from under a
 * part reaching over it (a bridge's deck), and stays where a part reaches both over and under it; one that
 * clashes with another (closer than the spacing, by the meshes) is first lifted over every part around it, as a
 * drop by boxes would, and then comes down the same way. Each
 * dropped part is then listed after the parts it now lies over and before those over it (found by the meshes),
 * so that the list stays a lift-out order. Returns the new list and, for each old index, its new index.
 */
export function droppedByShape(
  instance: PackInstanceV2,
  placements: readonly Placement[],
  chosen: Iterable<number>,
  parts: ShapePart[] = shapeParts(instance),
): { placements: Placement[]; indexOf: number[] } {
  const byId = new Map(parts.map((p) => [p.id, p] as const));
  const g = instance.spacing;
  const top = usableRegion(instance).max[2];
  const out = placements.slice();
  const itemOf = (p: Placement): SettleItem => ({ part: byId.get(p.id)!.index, rotation: placementRotation(p), position: [p.position[0], p.position[1], p.position[2]] });
  // Each placement's mesh where it is (a moved placement is a new object).
  const placed = new WeakMap<Placement, PlacedBvh | null>();
  const placedOf = (p: Placement): PlacedBvh | null => {
    if (!placed.has(p)) {
      const part = byId.get(p.id);
      const rotation = part ? placementRotation(p) : -1;
      placed.set(p, part && rotation >= 0 ? new PlacedBvh(part.bvh(), rotation, translationOf(part, rotation, p)) : null);
    }
    return placed.get(p)!;
  };
  const planNear = (p: Placement, q: Placement) => {
    let d2 = 0;
    for (let a = 0; a < 2; a++) {
      const d = Math.max(q.position[a] - (p.position[a] + p.size[a]), p.position[a] - (q.position[a] + q.size[a]), 0);
      d2 += d * d;
    }
    return d2 < g * g;
  };
  const clashes = (p: Placement, q: Placement): boolean => {
    const A = placedOf(p), B = placedOf(q);
    return !!A && !!B && pairGap(A, B, g, TOLERANCE_MM) !== null;
  };
  const restingHeight = restingHeights(instance, parts);
  const order = [...new Set(chosen)].filter((i) => out[i] && byId.has(out[i].id)).sort((a, b) => out[a].position[2] - out[b].position[2]);
  for (const i of order) {
    let p = out[i];
    const near = out.filter((q, j) => j !== i && byId.has(q.id) && planNear(p, q));
    if (near.some((q) => clashes(p, q))) {
      // Lifted over every part around it, the spacing clear, if the chamber has the room.
      const over = Math.max(p.position[2], ...near.map((q) => q.position[2] + q.size[2] + g));
      if (over + p.size[2] <= top + TOLERANCE_MM) p = withPosition(p, [p.position[0], p.position[1], over]);
    }
    // A part wholly over this one's box only gets further away as it comes down.
    const others = near.filter((q) => q.position[2] < p.position[2] + p.size[2] - TOLERANCE_MM).map(itemOf);
    const z = restingHeight(itemOf(p), others);
    out[i] = z < p.position[2] ? withPosition(p, [p.position[0], p.position[1], z]) : p;
  }
  // Which part lies over which, by the meshes: a part in a housing lies over its floor, not beside its walls.
  const relation: LiftRelation = (i, k) => {
    const p = out[i], q = out[k];
    if (!footprintsMeet(p, q, 0)) return null;
    const A = placedOf(p), B = placedOf(q);
    if (!A || !B) return null;
    if (blocksLift(A, B, TOLERANCE_MM)) return 'above';
    if (blocksLift(B, A, TOLERANCE_MM)) return 'below';
    return null;
  };
  return inLiftOrder(out, order, relation);
}
