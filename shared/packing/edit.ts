/**
 * Changing a layout by hand: moving chosen placements across the build plate, turning them by a quarter turn
 * about the build direction, dropping them to the lowest height where they keep the spacing, and naming the
 * placements a layout's check finds at fault. Plain functions over placements; the result is checked with
 * validateLayout like any other layout, here and on the server.
 *
 *   z ^     [j]            dropping [i]: the lowest z from the floor keep-out up
 *     |   +-----+          that keeps `spacing` from every placement whose
 *     |   |     |  [i]     footprint comes within `spacing` of its own
 *     +---+-----+---+---> x
 */
import { TOLERANCE_MM, usableRegion } from './geometry';
import type { Orientation, PackInstance, Placement, Vec3 } from './types';

/** The placement's orientation after a quarter turn about z: its x and y extents change places. */
export function turnedOrientation(o: Orientation): Orientation {
  return `${o[1]}${o[0]}${o[2]}` as Orientation;
}

/** True when two boxes come closer than `spacing` along each of the first `axes` axes (2: their footprints, 3: the boxes). */
function closerThan(a: Placement, b: Placement, spacing: number, axes: 2 | 3): boolean {
  for (let k = 0; k < axes; k++) {
    const gap = Math.max(b.position[k] - (a.position[k] + a.size[k]), a.position[k] - (b.position[k] + b.size[k]));
    if (gap >= spacing - TOLERANCE_MM) return false;
  }
  return true;
}

/** True when two boxes' footprints come closer than `spacing` on both x and y (so one must clear the other in z). */
export const footprintsMeet = (a: Placement, b: Placement, spacing: number) => closerThan(a, b, spacing, 2);

/** True when a placement's box lies inside the usable region. */
export function insideRegion(instance: Pick<PackInstance, 'chamber' | 'margin'>, p: Placement): boolean {
  const U = usableRegion(instance);
  return [0, 1, 2].every((k) => p.position[k] >= U.min[k] - TOLERANCE_MM && p.position[k] + p.size[k] <= U.max[k] + TOLERANCE_MM);
}

/**
 * The lowest z for placement `i` (its footprint unchanged) at which it is at least `spacing` from every other
 * placement and inside the usable height; null when no such height exists. Only the floor keep-out and the
 * heights just over the placements whose footprints meet it can be lowest, so those are tried in order.
 */
export function lowestFreeZ(instance: Pick<PackInstance, 'chamber' | 'margin' | 'spacing'>, placements: readonly Placement[], i: number): number | null {
  const p = placements[i];
  const g = instance.spacing;
  const U = usableRegion(instance);
  const h = p.size[2];
  const blockers = placements.filter((q, j) => j !== i && footprintsMeet(p, q, g));
  const candidates = [U.min[2], ...blockers.map((q) => q.position[2] + q.size[2] + g)].sort((a, b) => a - b);
  for (const z of candidates) {
    if (z < U.min[2] - TOLERANCE_MM || z + h > U.max[2] + TOLERANCE_MM) continue;
    const clear = blockers.every((q) => z + h + g <= q.position[2] + TOLERANCE_MM || z >= q.position[2] + q.size[2] + g - TOLERANCE_MM);
    if (clear) return z;
  }
  return null;
}

/** The placement moved so that its box starts at `position` (its transform, if any, moved with it). */
export function withPosition(p: Placement, position: Vec3): Placement {
  const d = [position[0] - p.position[0], position[1] - p.position[1], position[2] - p.position[2]];
  const transform = p.transform ? (p.transform.map((v, k) => (k >= 9 ? v + d[k - 9] : v)) as Placement['transform']) : undefined;
  return transform ? { ...p, position, transform } : { ...p, position };
}

/**
 * The chosen placements moved by (dx, dy) mm across the build plate at their height, kept inside the usable
 * region (a group moves together: the step is shortened so that none leaves it). Others stay where they are.
 */
export function movedPlacements(instance: Pick<PackInstance, 'chamber' | 'margin'>, placements: readonly Placement[], chosen: ReadonlySet<number>, dxMm: number, dyMm: number): Placement[] {
  const U = usableRegion(instance);
  const step = [dxMm, dyMm];
  for (const i of chosen) {
    const p = placements[i];
    if (!p) continue;
    for (let k = 0; k < 2; k++) {
      const low = U.min[k] - p.position[k];
      const high = U.max[k] - (p.position[k] + p.size[k]);
      step[k] = Math.min(Math.max(step[k], Math.min(0, low)), Math.max(0, high));
    }
  }
  return placements.map((p, i) => (chosen.has(i) ? withPosition(p, [p.position[0] + step[0], p.position[1] + step[1], p.position[2]]) : p));
}

export type TurnOutcome = { ok: true; placements: Placement[] } | { ok: false; message: string };

/**
 * The chosen placements each turned a quarter turn about z around the centre of its footprint, at its height
 * (pulled back inside the usable region if the turn takes it over an edge). A part whose rule does not allow
 * the turned orientation is not turned: the outcome says which.
 */
export function turnedPlacements(instance: Pick<PackInstance, 'chamber' | 'margin' | 'parts'>, placements: readonly Placement[], chosen: ReadonlySet<number>): TurnOutcome {
  const U = usableRegion(instance);
  const allowed = new Map(instance.parts.map((part) => [part.id, part.orientations] as const));
  const out = placements.slice();
  for (const i of chosen) {
    const p = placements[i];
    if (!p) continue;
    const orientation = turnedOrientation(p.orientation);
    if (!(allowed.get(p.id) ?? []).includes(orientation)) {
      return { ok: false, message: `"${p.id}" may not be turned: its orientation rule keeps it as it is.` };
    }
    const size: Vec3 = [p.size[1], p.size[0], p.size[2]];
    const cx = p.position[0] + p.size[0] / 2;
    const cy = p.position[1] + p.size[1] / 2;
    const position: Vec3 = [
      Math.min(Math.max(cx - size[0] / 2, U.min[0]), U.max[0] - size[0]),
      Math.min(Math.max(cy - size[1] / 2, U.min[1]), U.max[1] - size[1]),
      p.position[2],
    ];
    let transform = p.transform;
    if (transform) {
      // Row vectors (p' = [x y z 1] M): a quarter turn about z after M maps each row's (a, b, c) to (-b, a, c);
      // the turned box's minimum corner is (-max y, min x, min z) of the old one, then moved onto `position`.
      const turned = transform.slice() as number[];
      for (let r = 0; r < 4; r++) {
        const a = transform[3 * r];
        const b = transform[3 * r + 1];
        turned[3 * r] = -b;
        turned[3 * r + 1] = a;
      }
      const min = [-(p.position[1] + p.size[1]), p.position[0], p.position[2]];
      for (let k = 0; k < 3; k++) turned[9 + k] += position[k] - min[k];
      transform = turned as Placement['transform'];
    }
    out[i] = transform ? { ...p, orientation, size, position, transform } : { ...p, orientation, size, position };
  }
  return { ok: true, placements: out };
}

/**
 * The chosen placements dropped, lowest first, each to the lowest free height over its footprint (see
 * lowestFreeZ); one with no free height stays where it is.
 */
export function droppedPlacements(instance: Pick<PackInstance, 'chamber' | 'margin' | 'spacing'>, placements: readonly Placement[], chosen: ReadonlySet<number>): Placement[] {
  const out = placements.slice();
  const order = [...chosen].filter((i) => out[i]).sort((a, b) => out[a].position[2] - out[b].position[2]);
  for (const i of order) {
    const z = lowestFreeZ(instance, out, i);
    if (z !== null) out[i] = withPosition(out[i], [out[i].position[0], out[i].position[1], z]);
  }
  return out;
}

/** The placements a layout check names (by their index), e.g. both of a pair closer than the spacing. */
export function placementsAtFault(problems: readonly { field: string; message: string }[]): Set<number> {
  const at = new Set<number>();
  for (const p of problems) {
    for (const m of `${p.field} ${p.message}`.matchAll(/placements\[(\d+)\]/g)) at.add(Number(m[1]));
  }
  return at;
}

/**
 * The placements at fault after parts of a layout packed by shape were moved, turned or dropped by hand
 * (`moved`, by index). Parts packed by shape may share box space where they nest, so only the moved ones are
 * checked, and by their boxes, which hold their shapes: a moved part whose box comes within the spacing of
 * another part's box is at fault (a move into another part's hollow is refused this way; packing nests them),
 * and so is one that would block or be blocked on the way out: the layout lists parts in the order they are
 * placed (lifted out in reverse), so a part above a moved one over the same footprint must come after it, and
 * one below before it. What is not moved keeps the exact check it passed; the server checks the meshes again.
 */
export function shapeEditFaults(instance: Pick<PackInstance, 'chamber' | 'margin' | 'spacing'>, placements: readonly Placement[], moved: Iterable<number>): Set<number> {
  const at = new Set<number>();
  const g = instance.spacing;
  for (const i of moved) {
    const p = placements[i];
    if (!p) continue;
    if (!insideRegion(instance, p)) at.add(i);
    placements.forEach((q, j) => {
      if (j === i) return;
      // Their boxes, not their shapes, meet.
      if (closerThan(p, q, g, 3)) {
        at.add(i);
        return;
      }
      // Footprints that overlap: the upper one goes out first, so it must be listed after the lower one.
      if (!footprintsMeet(p, q, 0)) return;
      const qAbove = q.position[2] >= p.position[2] + p.size[2] - TOLERANCE_MM;
      if (qAbove ? j < i : i < j) at.add(i);
    });
  }
  return at;
}

/** How placement `q` stands to placement `p` (by index): under it, over it, or neither (apart, or side by side). */
export type LiftRelation = (p: number, q: number) => 'below' | 'above' | null;

/** By their boxes: over the same footprint, one box wholly under or over the other. */
function boxRelation(placements: readonly Placement[]): LiftRelation {
  return (i, k) => {
    const p = placements[i], q = placements[k];
    if (!footprintsMeet(p, q, 0)) return null;
    if (q.position[2] + q.size[2] <= p.position[2] + TOLERANCE_MM) return 'below';
    if (q.position[2] >= p.position[2] + p.size[2] - TOLERANCE_MM) return 'above';
    return null;
  };
}

/**
 * The placements of a layout packed by shape in an order they can be lifted out (in reverse) after the `moved`
 * ones changed place: each moved part, lowest first, stays where it is listed if that order holds, else is
 * listed again just after the last part under it, when that is before every part over it; a part with no such
 * place stays where it was (the check then names it). Which part is under which is `relation`'s answer (by
 * default the boxes': over the same footprint, one wholly under the other). Returns the new list and, for each
 * old index, its new index.
 */
export function inLiftOrder(placements: readonly Placement[], moved: Iterable<number>, relation: LiftRelation = boxRelation(placements)): { placements: Placement[]; indexOf: number[] } {
  let order = placements.map((_, i) => i);
  const ids = [...new Set(moved)].filter((i) => placements[i]).sort((a, b) => placements[a].position[2] - placements[b].position[2]);
  for (const i of ids) {
    const rest = order.filter((k) => k !== i);
    let lastBelow = -1;
    let firstAbove = rest.length;
    rest.forEach((k, at) => {
      const r = relation(i, k);
      if (r === 'below') lastBelow = at;
      else if (r === 'above' && at < firstAbove) firstAbove = at;
    });
    // Where it is may do already (nothing under it listed after it, nothing over it before it): it stays.
    const at = order.indexOf(i);
    if (lastBelow < at && at <= firstAbove) continue;
    if (lastBelow < firstAbove) order = [...rest.slice(0, lastBelow + 1), i, ...rest.slice(lastBelow + 1)];
  }
  const indexOf = new Array<number>(placements.length);
  order.forEach((old, at) => (indexOf[old] = at));
  return { placements: order.map((k) => placements[k]), indexOf };
}
