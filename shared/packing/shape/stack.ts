/**
 * Stacks of one part: a tapered cup, bowl, tray or cone sinks into a copy of
 * itself set straight over it, as far as the spacing between the upper copy's
 * outside and the lower one's inside allows. Copies stacked so pack as one
 * unit (a nest, ./nest.ts), each copy the same height (the pitch) over the
 * one under it.
 *
 * The pitch is found on the meshes, not on the plan grid: a column profile
 * keeps the highest point of a sloping wall over the whole cell, and the
 * height map's square dilation takes the highest top within the spacing, so on
 * a wall of slope s the grid's pitch errs upwards by about s times a few cells
 * (for a cup whose walls lean 22 degrees, 23 mm against 13 mm; for a deep
 * bin whose walls lean 10 degrees, more than its height). The grid's pitch
 * (valid by the drop argument of ./grid.ts), or for a turn open upwards the
 * copy's height and the spacing, bounds it from above; a
 * search below it (regula falsi on the surfaces' distance) keeps, at every
 * step, a pitch at which the copies' surfaces are the spacing apart
 * (./bvh.ts surfaceDistance, exact to the triangles) and the upper copy lifts
 * straight out (blocksLift); copies two and more pitches apart are checked
 * the same way.
 *
 * Where a stack pays: the per-copy pitch against the copy's own height plus
 * the spacing, as for pairs (./nest.ts bestPair). How many copies a stack
 * holds: enough that the stacks stand on the plate side by side, or as tall as
 * the whole build is foreseen to be (foreseenHeight), whichever is more.
 */
import { TOLERANCE_MM } from '../geometry';
import { blocksLift, PlacedBvh, surfaceDistance } from './bvh';
import { drop, gridOf } from './grid';
import { isHolder, nestProfile, type Nest } from './nest';
import type { ShapePart } from './parts';
import type { Profile } from './profile';
import { pairGap } from './validate';

/** Meshes up to this many triangles have their pitch looked for on the mesh (a finely tessellated cup of 16,000 takes about 10 s unhalted); heavier ones keep the grid's. */
const MAX_EXACT_TRIANGLES = 20_000;

/** The pitch the grid allows: the height a copy dropped straight onto another (same plan place) comes to rest at. */
function gridPitch(p: Profile, cell: number, spacing: number): number {
  const G = gridOf([0, 0, 0], [p.nx * cell, p.ny * cell, 2 * p.extent[2] + spacing], cell, spacing);
  drop(G, p, 0, 0, 0);
  let z = 0;
  for (let k = 0; k < p.cellX.length; k++) z = Math.max(z, G.D[p.cellX[k] + G.nx * p.cellY[k]] - p.bottom[k]);
  return z;
}

/** Whether a turn may stack: the grid sinks a copy into another, or the turn is open upwards (stackPitch). */
function worthALook(p: Profile, grid: number, cell: number, spacing: number): boolean {
  return grid < p.extent[2] + spacing - 1e-9 || isHolder(p, cell);
}

/**
 * The pitch at which copies of `part` turned as `p` stack, checked on the meshes, when it is at most `gain` of the
 * copy's height plus the spacing (the height it takes stacked as a box); otherwise null. `halt` ends the search
 * early with the lowest pitch found clear so far.
 */
export function stackPitch(part: ShapePart, p: Profile, cell: number, spacing: number, gain = 0.85, halt: () => boolean = () => false): number | null {
  if (!part.watertight) return null;
  const full = p.extent[2] + spacing;
  const grid = gridPitch(p, cell, spacing);
  // Where the grid sees no copy sink into another, only a turn open upwards is looked at on the meshes: on a
  // steep wall the grid errs upwards by about the wall's slope times a few cells, so a deep bin whose walls lean
  // 10 degrees comes out at its full height there though its copies sink in by a sixth. Such a turn is searched
  // from the full height down (a copy on top of another is the spacing clear of it).
  if (!worthALook(p, grid, cell, spacing)) return null;
  const hi0 = Math.min(grid, full);
  // A heavy mesh's nested copies take seconds a look (every triangle is near many of the other copy's): the grid's
  // pitch stands, as it does for the drop (a copy at twice the pitch clears the first, since the map only rises);
  // so it does when there is no time to look, and a look the halt cuts short counts for nothing.
  if (part.mesh.indices.length / 3 > MAX_EXACT_TRIANGLES || halt()) return grid <= gain * full ? grid : null;
  const bvh = part.bvh();
  const at = (z: number) => new PlacedBvh(bvh, p.rotation, [-p.rotatedMin[0], -p.rotatedMin[1], z - p.rotatedMin[2]]);
  const low = at(0);
  const need = spacing + 2 * TOLERANCE_MM;
  // The most material a plan cell's column spans: a copy z above another can only be held down by it (the lower
  // one's material over the upper's, at one plan point) where the part spans more than z at that point.
  let span = 0;
  for (let k = 0; k < p.top.length; k++) span = Math.max(span, p.top[k] - p.bottom[k]);
  /**
   * How far the copies' surfaces are apart beyond what is needed, with the upper copy at z: negative when closer
   * (or when the upper copy cannot go straight up, or a copy k pitches up is too close).
   */
  const margin = (z: number): number => {
    const up = at(z);
    // Capped a millimetre over what is needed (the grid pitch's margin is taken as this): pairs further apart are not
    // looked at closely. Copies far into each other end the look at the first pair under half the spacing. A look
    // halted half-way is NaN: the search ends there, with the lowest pitch found clear.
    const d = surfaceDistance(low, up, need + 1, need / 2, halt) - need;
    if (!(d >= 0)) return d;
    // Two copies of one shape, one shifted, cannot lie one in the other: no test for it.
    if (span > z) {
      const blocked = blocksLift(up, low, TOLERANCE_MM, halt);
      if (blocked === null) return NaN;
      if (blocked) return -TOLERANCE_MM;
    }
    for (let k = 2; (k - 1) * z < full; k++) {
      const gap = pairGap(low, at(k * z), need, TOLERANCE_MM, halt);
      if (typeof gap === 'number' && Number.isNaN(gap)) return NaN;
      if (gap !== null) return -TOLERANCE_MM;
    }
    return d;
  };
  // Regula falsi (the Illinois variant) on the margin, between z = 0 (a copy in itself) and the grid's pitch: on
  // the sloping walls of a nested pair the distance grows about linearly with the pitch, so a few steps do. It aims
  // a few microns over the root (TARGET), so that its guesses land on the clear side, and ends within twice that.
  // The grid's pitch is clear by the drop argument (and the full height trivially), so it is not looked at again:
  // its margin is taken as the cap (what the surfaces' distance, capped, mostly comes to there), and the first look
  // is already below it. Where it is exact (a flat floor over a flat floor, the spacing apart), the looks below all
  // fail and it stands.
  let lo = 0, flo = -need;
  let hi = hi0, fhi = 1;
  let side = 0;
  for (let step = 0; step < 40 && hi - lo > 0.01 && fhi > 2 * TARGET && !halt(); step++) {
    let z = hi - ((fhi - TARGET) * (hi - lo)) / (fhi - flo);
    // Never at the ends (no progress).
    if (!(z > lo + 0.002 && z < hi - 0.002)) z = (lo + hi) / 2;
    const f = margin(z);
    if (Number.isNaN(f)) break;
    if (f >= 0) {
      [hi, fhi] = [z, f];
      if (side === 1) flo /= 2;
      side = 1;
    } else {
      [lo, flo] = [z, f];
      if (side === -1) fhi /= 2;
      side = -1;
    }
  }
  return hi <= gain * full ? hi : null;
}

/** The margin the pitch search aims at over the spacing (mm). */
const TARGET = 0.003;

export interface StackTurn {
  profile: Profile;
  pitch: number;
}

/**
 * The turn of `part` whose copies take least room stacked (grown plan box times pitch) among `turns`: the grid's
 * pitches rank them (at most the copy's height and the spacing, for the turns open upwards), the meshes decide
 * among the three best. Null when no turn stacks with a gain.
 */
export function stackTurn(part: ShapePart, turns: readonly Profile[], cell: number, spacing: number, gain = 0.85, halt: () => boolean = () => false): StackTurn | null {
  if (!part.watertight) return null;
  const g = spacing;
  const ranked = turns
    .map((p) => ({ p, grid: gridPitch(p, cell, g) }))
    .filter((c) => worthALook(c.p, c.grid, cell, g))
    .map((c) => ({ p: c.p, grid: Math.min(c.grid, c.p.extent[2] + g) }))
    .sort((a, b) => (a.p.extent[0] + g) * (a.p.extent[1] + g) * a.grid - (b.p.extent[0] + g) * (b.p.extent[1] + g) * b.grid)
    .slice(0, 3);
  let best: (StackTurn & { room: number }) | null = null;
  for (const { p } of ranked) {
    const pitch = stackPitch(part, p, cell, g, gain, halt);
    if (pitch === null) continue;
    const room = (p.extent[0] + g) * (p.extent[1] + g) * pitch;
    if (!best || room < best.room) best = { profile: p, pitch, room };
  }
  return best && { profile: best.profile, pitch: best.pitch };
}

/**
 * `quantity` copies of kind `kind` in stacks of `n` or one fewer (as even as they split), each a nest whose
 * members stand `pitch` over each other; a stack of one is no nest (that copy packs on its own).
 */
export function stacksOf(kind: number, quantity: number, turn: StackTurn, n: number, cell: number, spacing: number): Nest[] {
  if (n < 2 || quantity < 2) return [];
  const stacks = Math.ceil(quantity / n);
  const small = Math.floor(quantity / stacks);
  const large = quantity - small * stacks;
  const stackOf = (m: number): Nest => {
    const members = Array.from({ length: m }, (_, i) => ({ kind, profile: turn.profile, du: 0, dv: 0, dz: i * turn.pitch }));
    return { members, profile: nestProfile(turn.profile, members, cell, spacing), stacked: true };
  };
  const out: Nest[] = [];
  if (large > 0) {
    const s = stackOf(small + 1);
    for (let i = 0; i < large; i++) out.push(s);
  }
  if (small >= 2) {
    const s = stackOf(small);
    for (let i = large; i < stacks; i++) out.push(s);
  }
  return out;
}

/**
 * Copies in one stack: enough for the stacks to stand side by side on the plate, or as many as reach `height`
 * (the build's foreseen height over the floor), whichever is more (at least 2), and no more than the copies or the
 * usable height `tall` allow.
 */
export function copiesPerStack(quantity: number, turn: StackTurn, spacing: number, plate: readonly [number, number], tall: number, height: number, sideBySide = true): number {
  const g = spacing;
  const { extent } = turn.profile;
  const side = sideBySide ? Math.ceil(quantity / placesOn(plate, extent, g)) : 1;
  const reach = 1 + Math.floor(Math.max(0, height - extent[2]) / turn.pitch);
  const most = 1 + Math.floor(Math.max(0, tall - extent[2]) / turn.pitch);
  return Math.max(1, Math.min(quantity, most, Math.max(sideBySide ? 2 : 1, side, reach)));
}

/** The share of a plate that boxes of several sizes are reckoned to cover (they rarely tile it wholly). */
const EFFICIENCY = 0.85;

/**
 * The build's foreseen height over the floor when kinds are stacked: the lowest height (in steps of half a
 * millimetre) at which the stacks, each as tall as that height allows (copiesPerStack), and the rest of the
 * build's volume (`otherVolume`, boxes grown by the spacing, standing in columns as tall) cover no more than
 * EFFICIENCY of the plate, or fill no more than the places each kind's stacks have on the plate alone. Taller
 * stacks take fewer places on the plate, so where the stacks' places bound the build, this finds the height at
 * which they fit. Without `byPlaces`, the whole volume over the plate.
 */
export function foreseenHeight(stacks: ReadonlyArray<{ quantity: number; turn: StackTurn }>, otherVolume: number, spacing: number, plate: readonly [number, number], tall: number, byPlaces = true): number {
  const g = spacing;
  const area = (plate[0] + g) * (plate[1] + g);
  const stackVolume = stacks.reduce((v, s) => v + s.quantity * (s.turn.profile.extent[0] + g) * (s.turn.profile.extent[1] + g) * s.turn.pitch, 0);
  // Without the places: the volume over the whole plate, as if it packed without loss.
  if (!byPlaces) return (otherVolume + stackVolume) / area;
  const room = EFFICIENCY * area;
  let height = Math.max(...stacks.map((s) => s.turn.profile.extent[2]), (otherVolume + stackVolume) / room);
  for (; height < tall; height += 0.5) {
    const others = otherVolume / (height + g);
    let used = others;
    // Or by the places each kind's stacks have on the plate alone (a kind's own stacks tile it without loss).
    let share = others / room;
    for (const s of stacks) {
      const { extent } = s.turn.profile;
      const count = Math.ceil(s.quantity / copiesPerStack(s.quantity, s.turn, g, plate, tall, height, false));
      used += count * (extent[0] + g) * (extent[1] + g);
      share += count / placesOn(plate, extent, g);
    }
    if (used <= room || share <= 1) return height;
  }
  return tall;
}

/** How many plan boxes of `extent` (grown by the spacing) fit the plate side by side in rows, in the better of the two turns. */
function placesOn(plate: readonly [number, number], extent: readonly number[], g: number): number {
  const across = (a: number, b: number) => Math.floor((plate[0] + g) / (a + g)) * Math.floor((plate[1] + g) / (b + g));
  return Math.max(1, across(extent[0], extent[1]), across(extent[1], extent[0]));
}
