/**
 * Filling the hollows of parts before they are packed: each part whose
 * column profile leaves room under its own top (an open housing, a channel,
 * a standing bracket) is set alone on a height map of its footprint, and
 * smaller parts are dropped into it, largest first, as long as they stay
 * under its top. The part and what it holds then pack as one unit (a
 * "nest"), whose column profile is theirs together.
 *
 * Nothing here is special to housings: the same drop, dilation by the
 * spacing and lift-out argument as the plate's (./grid.ts) hold inside a nest,
 * since its contents are dropped from above after the part that holds them.
 * A whole drop packing still puts a clip on the bare floor rather than inside
 * a housing (its top ends as low either way); filling the hollows first is
 * what lets the hollows be used.
 */
import { bestDrop, ceilingOf, drop, gridOf } from './grid';
import { profileOfColumns, type Profile } from './profile';

export interface NestMember {
  kind: number;
  profile: Profile;
  /** Offset of the member's placed box from the nest's: whole cells along x and y, millimetres along z. */
  du: number;
  dv: number;
  dz: number;
}

export interface Nest {
  /** The holder first, then its contents in the order they were dropped (a lift-out order, reversed), then its lid. */
  members: NestMember[];
  profile: Profile;
  /** The last member is a second copy of the holder, upside down over it (see buildNests). */
  lidded?: boolean;
  /** Copies of one kind, each over the one before at a pitch found on the meshes (./stack.ts). */
  stacked?: boolean;
}

interface NestKind {
  quantity: number;
  /** Candidate profiles, best first; empty when the kind fits nowhere. */
  profiles: Profile[];
  /**
   * The profiles it may take inside a holder (default: `profiles`). Under a rim a turn that costs more room on
   * the plate costs nothing (a thin plate that packs best on end lies flat in a shallow housing).
   */
  inside?: Profile[];
  /** A profile turned upside down (half a turn about x), when the part allows it: a second copy as a lid. */
  flip?: (p: Profile) => Profile | null;
}

/** A part holds others when at least this share of its box is room under its top. */
export const MIN_HOLLOW = 0.35;

/** Room under a profile's top that the part does not take, as a share of its box. */
export function hollowShare(p: Profile, cell: number): number {
  let room = 0;
  for (let k = 0; k < p.top.length; k++) room += p.extent[2] - p.top[k];
  // Columns the part does not cover at all are room too.
  room += (p.nx * p.ny - p.top.length) * p.extent[2];
  return (room * cell * cell) / Math.max(1e-9, p.extent[0] * p.extent[1] * p.extent[2]);
}

/** Whether a part in this turn holds others (buildNests fills it): at least `minHollow` of its box is room under its top. */
export function isHolder(p: Profile, cell: number, minHollow = MIN_HOLLOW): boolean {
  return hollowShare(p, cell) >= minHollow;
}

/** A kind whose copies fit the holder's plan in some turn, but in none under its rim. */
function tooTallFor(holder: Profile, kind: NestKind): boolean {
  const turns = kind.inside ?? kind.profiles;
  const inPlan = (p: Profile) => p.extent[0] <= holder.extent[0] && p.extent[1] <= holder.extent[1];
  return turns.some(inPlan) && !turns.some((p) => inPlan(p) && p.extent[2] <= holder.extent[2]);
}

/**
 * Whether buildNests could put a lid on any holder: a holder kind with two copies or more that may turn upside
 * down, and another kind too tall for its hollow (tooTallFor). Cheap: no nest is filled.
 */
export function lidsMayHold(kinds: readonly NestKind[], cell: number, minHollow = MIN_HOLLOW): boolean {
  return kinds.some(
    (k, h) => k.quantity >= 2 && !!k.flip && k.profiles.length > 0 && isHolder(k.profiles[0], cell, minHollow) && kinds.some((o, j) => j !== h && o.quantity > 0 && o.profiles.length > 0 && tooTallFor(k.profiles[0], o)),
  );
}

/** The members' column profiles together, on the holder's grid (or on a grid of `size` from the same corner). */
export function nestProfile(holder: Profile, members: NestMember[], cell: number, spacing: number, size: [number, number] = [holder.extent[0], holder.extent[1]]): Profile {
  const nx = Math.max(holder.nx, Math.ceil(size[0] / cell - 1e-9));
  const ny = Math.max(holder.ny, Math.ceil(size[1] / cell - 1e-9));
  const bot = new Float64Array(nx * ny).fill(Infinity);
  const top = new Float64Array(nx * ny).fill(-Infinity);
  for (const m of members) {
    const p = m.profile;
    for (let k = 0; k < p.cellX.length; k++) {
      const id = m.du + p.cellX[k] + nx * (m.dv + p.cellY[k]);
      const b = m.dz + p.bottom[k];
      const t = m.dz + p.top[k];
      if (b < bot[id]) bot[id] = b;
      if (t > top[id]) top[id] = t;
    }
  }
  let zTop = 0;
  for (let id = 0; id < nx * ny; id++) if (top[id] >= bot[id] && top[id] > zTop) zTop = top[id];
  return profileOfColumns(holder.rotation, [size[0], size[1], Math.max(holder.extent[2], zTop)], holder.rotatedMin, nx, ny, bot, top, cell, spacing);
}

/**
 * Nests made of the kinds' copies: holders largest first, each filled with
 * the largest copies that still fit under its top. Returns the nests and how
 * many copies of each kind they use; a kind whose copy holds nothing is not
 * tried again. With `ways` above 1, each holder copy is filled in each of its
 * first `ways` candidate turns that leave room under the top, and the one
 * that saves the most room is kept (the grown boxes of what it holds, less
 * what its own grown box gains over its cheapest turn's). With a kind's
 * `flip`, two of its copies may face each other: the second upside down, its
 * rim the spacing over the first's, as a lid; what they hold is dropped into
 * the first under a ceiling (the lid lowered by the spacing, ./grid.ts
 * ceilingOf), so it may rise into the lid's hollow. The lid is listed last: it
 * is lifted out first, and what was dropped under it then lifts out as in any
 * nest.
 */
export function buildNests(
  kinds: readonly NestKind[],
  cell: number,
  spacing: number,
  minHollow = MIN_HOLLOW,
  stop: () => boolean = () => false,
  ways = 1,
): { nests: Nest[]; used: number[] } {
  const left = kinds.map((k) => (k.profiles.length > 0 ? k.quantity : 0));
  const volume = (p: Profile) => p.extent[0] * p.extent[1] * p.extent[2];
  const holders = kinds
    .map((k, i) => i)
    .filter((i) => left[i] > 0 && isHolder(kinds[i].profiles[0], cell, minHollow))
    .sort((a, b) => volume(kinds[b].profiles[0]) - volume(kinds[a].profiles[0]) || a - b);
  // Contents largest first: the small ones then fill what the large leave.
  const byCost = kinds
    .map((k, i) => i)
    .filter((i) => left[i] > 0)
    .sort((a, b) => kinds[b].profiles[0].cost - kinds[a].profiles[0].cost || a - b);
  const nests: Nest[] = [];
  const grown = (p: Profile) => (p.extent[0] + spacing) * (p.extent[1] + spacing) * (p.extent[2] + spacing);
  /**
   * One copy of `holder` filled from the copies `left` (which it takes from). With a `lid` (a second copy upside
   * down, the spacing over the first), what it holds may rise into the lid's hollow too, under its ceiling.
   */
  const fill = (h: number, holder: Profile, left: number[], lid?: Profile): NestMember[] => {
    const lidZ = holder.extent[2] + spacing;
    const height = lid ? lidZ + lid.extent[2] : holder.extent[2];
    // The holder's own box (with its lid): what it holds stays inside it.
    const G = gridOf([0, 0, 0], [holder.extent[0], holder.extent[1], height], cell, spacing);
    drop(G, holder, 0, 0, 0);
    left[h]--;
    const C = lid ? ceilingOf(G, lid, 0, 0, lidZ) : undefined;
    if (lid) left[h]--;
    const members: NestMember[] = [{ kind: h, profile: holder, du: 0, dv: 0, dz: 0 }];
    const bound = height + 1e-9;
    // A copy as large as the holder (its own kind among them) cannot go inside it.
    const fits = (p: Profile) => p.extent[0] <= holder.extent[0] && p.extent[1] <= holder.extent[1] && volume(p) < volume(holder);
    // A kind that found no place once finds none later: the map only rises.
    const full = new Set<number>();
    for (let placed = true; placed; ) {
      placed = false;
      for (const k of byCost) {
        if (left[k] === 0 || full.has(k)) continue;
        let best: { u: number; v: number; z: number; score: number; p: Profile } | null = null;
        for (const p of kinds[k].inside ?? kinds[k].profiles) {
          if (!fits(p)) continue;
          const d = bestDrop(G, p, best ? best.score : bound, C);
          if (d) best = { ...d, p };
        }
        if (!best) {
          full.add(k);
          continue;
        }
        drop(G, best.p, best.u, best.v, best.z);
        members.push({ kind: k, profile: best.p, du: best.u, dv: best.v, dz: best.z });
        left[k]--;
        placed = true;
      }
    }
    // Listed last, the lid is lifted out first.
    if (lid) members.push({ kind: h, profile: lid, du: 0, dv: 0, dz: lidZ });
    return members;
  };
  /** Room saved: the grown boxes of what is held, less what the unit's grown box takes over its holders' own. */
  const savedBy = (held: NestMember[], h: number, box: readonly number[], holders: number) =>
    held.reduce((v, m) => v + grown(kinds[m.kind].profiles[0]), 0) - (box[0] + spacing) * (box[1] + spacing) * (box[2] + spacing) + holders * grown(kinds[h].profiles[0]);
  // Holder kinds a lid did not pay for once are not tried with one again.
  const noLid = new Set<number>();
  for (const h of holders) {
    const up = ways > 1 ? kinds[h].profiles.filter((p) => isHolder(p, cell, minHollow)).slice(0, ways) : [kinds[h].profiles[0]];
    /**
     * The last copy worked out: the copies left before it, what each fill tried took, and the nest kept. Copies
     * of one holder often come out alike, and filling one costs many drops. The next copy comes out the same, and
     * is not worked out again, when each fill tried would find the same kinds with copies left at every step and
     * after it (a fill is deterministic and sees only whether a kind has copies left; which kinds have copies
     * left after the fill also decides whether a lid is tried).
     */
    let last: { before: number[]; tried: number[][]; nest: Nest; took: number[] } | null = null;
    const repeats = (l: NonNullable<typeof last>) => l.tried.every((u) => u.every((n, k) => left[k] >= n && left[k] - n > 0 === l.before[k] - n > 0));
    while (left[h] > 0 && !stop()) {
      if (last && repeats(last)) {
        last.took.forEach((n, k) => (left[k] -= n));
        nests.push(last.nest);
        continue;
      }
      const tried: number[][] = [];
      const took = (after: number[]) => left.map((n, k) => n - after[k]);
      // The way up that saves the most room: the boxes of what it holds, less what its own box grows.
      let best: { members: NestMember[]; left: number[]; saved: number; lidded?: boolean } | null = null;
      for (const holder of up) {
        const after = left.slice();
        const members = fill(h, holder, after);
        tried.push(took(after));
        if (members.length === 1) continue;
        const saved = savedBy(members.slice(1), h, holder.extent, 1);
        if (!best || saved > best.saved) best = { members, left: after, saved };
      }
      // Two copies facing each other, the second upside down as a lid: what is too tall for one stands in both.
      // Tried only while copies are left that fit the holder's plan but in no turn under its rim; taken when it
      // saves more room than this copy and the next filled alone (reckoned as twice this one: the largest go first).
      const holder = up[0];
      const rest = best ? best.left : left;
      const lid = left[h] >= 2 && kinds[h].flip && !noLid.has(h) && kinds.some((_, k) => k !== h && rest[k] > 0 && tooTallFor(holder, kinds[k])) ? kinds[h].flip(holder) : null;
      if (lid && Math.abs(lid.extent[0] - holder.extent[0]) < 1e-6 && Math.abs(lid.extent[1] - holder.extent[1]) < 1e-6) {
        const after = left.slice();
        const members = fill(h, holder, after, lid);
        tried.push(took(after));
        const saved = savedBy(members.slice(1, -1), h, [holder.extent[0], holder.extent[1], holder.extent[2] + spacing + lid.extent[2]], 2);
        if (members.length > 2 && saved > (best ? 2 * Math.max(0, best.saved) : 0)) best = { members, left: after, saved, lidded: true };
        else noLid.add(h);
      }
      // Nothing fits in this kind's hollow: its copies pack on their own.
      if (!best) break;
      const nest: Nest = { members: best.members, profile: nestProfile(best.members[0].profile, best.members, cell, spacing), ...(best.lidded ? { lidded: true } : {}) };
      last = { before: left.slice(), tried, nest, took: took(best.left) };
      best.left.forEach((n, i) => (left[i] = n));
      nests.push(nest);
    }
  }
  return { nests, used: kinds.map((k, i) => (k.profiles.length > 0 ? k.quantity : 0) - left[i]) };
}

/**
 * The best pair of two copies of one kind side by side on the floor, each
 * reaching into the other's empty columns (two L brackets corner to corner):
 * the second copy is tried in every allowed rotation at every offset where it
 * rests on the floor clear of the first by the spacing, and the pair whose
 * box (grown by the spacing) is smallest and fits the plate is kept if it is
 * at most `gain` of the two boxes apart. The second is dropped after the
 * first, so the pair lifts out like any nest; the spacing is the drop's
 * (dilated height map), checked exactly against the meshes with the rest of
 * the layout.
 */
export function bestPair(
  kind: number,
  first: readonly Profile[],
  turns: readonly Profile[],
  cell: number,
  spacing: number,
  plate: readonly [number, number],
  gain = 0.85,
): Nest | null {
  const grown = (x: number, y: number, z: number) => (x + spacing) * (y + spacing) * (z + spacing);
  let best: { volume: number; members: NestMember[]; holder: Profile; size: [number, number] } | null = null;
  for (const a of first) {
    const single = grown(a.extent[0], a.extent[1], a.extent[2]);
    for (const b of turns) {
      let limit = Math.min(best ? best.volume : Infinity, 2 * gain * Math.min(single, grown(b.extent[0], b.extent[1], b.extent[2])));
      // The first at (b.nx, b.ny) of a grid with room for the second on every side.
      const G = gridOf([0, 0, 0], [(a.nx + 2 * b.nx) * cell, (a.ny + 2 * b.ny) * cell, Math.max(a.extent[2], b.extent[2])], cell, spacing);
      drop(G, a, b.nx, b.ny, 0);
      const m = b.cellX.length;
      const off = new Int32Array(m);
      for (let k = 0; k < m; k++) off[k] = b.cellX[k] + G.nx * b.cellY[k];
      const ez = Math.max(a.extent[2], b.extent[2]);
      for (let v = 0; v <= a.ny + b.ny; v++) {
        for (let u = 0; u <= a.nx + b.nx; u++) {
          const x0 = Math.min(u, b.nx) * cell, y0 = Math.min(v, b.ny) * cell;
          const x1 = Math.max(u * cell + b.extent[0], b.nx * cell + a.extent[0]);
          const y1 = Math.max(v * cell + b.extent[1], b.ny * cell + a.extent[1]);
          const volume = grown(x1 - x0, y1 - y0, ez);
          if (volume >= limit || x1 - x0 > plate[0] + 1e-9 || y1 - y0 > plate[1] + 1e-9) continue;
          const base = u + G.nx * v;
          let k = 0;
          for (; k < m; k++) if (G.D[base + off[k]] - b.bottom[k] > 1e-9) break;
          if (k < m) continue;
          const du = Math.min(u, b.nx), dv = Math.min(v, b.ny);
          limit = volume;
          best = {
            volume,
            holder: a,
            size: [x1 - x0, y1 - y0],
            members: [
              { kind, profile: a, du: b.nx - du, dv: b.ny - dv, dz: 0 },
              { kind, profile: b, du: u - du, dv: v - dv, dz: 0 },
            ],
          };
        }
      }
    }
  }
  if (!best) return null;
  return { members: best.members, profile: nestProfile(best.holder, best.members, cell, spacing, best.size) };
}
