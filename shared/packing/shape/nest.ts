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
import { bestDrop, drop, gridOf, type Grid } from './grid';
import { profileOfColumns, type Profile } from './profile';

export interface NestMember {
  kind: number;
  profile: Profile;
  /** A smaller nest held whole (kind is then its holder's). */
  nest?: Nest;
  /** Offset of the member's placed box from the nest's: whole cells along x and y, millimetres along z. */
  du: number;
  dv: number;
  dz: number;
}

export interface Nest {
  /** The holder first, then its contents in the order they were dropped (a lift-out order, reversed). */
  members: NestMember[];
  profile: Profile;
}

interface NestKind {
  quantity: number;
  /** Candidate profiles, best first; empty when the kind fits nowhere. */
  profiles: Profile[];
}

/** Room under a profile's top that the part does not take, as a share of its box. */
function hollowShare(p: Profile, cell: number): number {
  let room = 0;
  for (let k = 0; k < p.top.length; k++) room += p.extent[2] - p.top[k];
  // Columns the part does not cover at all are room too.
  room += (p.nx * p.ny - p.top.length) * p.extent[2];
  return (room * cell * cell) / Math.max(1e-9, p.extent[0] * p.extent[1] * p.extent[2]);
}

function localGrid(p: Profile, cell: number, spacing: number): Grid {
  // The holder's own box: what it holds stays inside it.
  return gridOf([0, 0, 0], [p.extent[0], p.extent[1], p.extent[2]], cell, spacing);
}

/** The members' column profiles together, on the holder's grid. */
function nestProfile(holder: Profile, members: NestMember[], cell: number, spacing: number): Profile {
  const nx = holder.nx;
  const ny = holder.ny;
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
  return profileOfColumns(holder.rotation, [holder.extent[0], holder.extent[1], Math.max(holder.extent[2], zTop)], holder.rotatedMin, nx, ny, bot, top, cell, spacing);
}

/**
 * Nests made of the kinds' copies: holders smallest first, each filled with
 * the largest copies (or smaller nests) that still fit under its top, so a
 * small housing filled with clips can itself go into a large one. Returns the
 * top-level nests and how many copies of each kind they use; a kind whose
 * copy holds nothing is not tried again.
 */
export function buildNests(kinds: readonly NestKind[], cell: number, spacing: number, minHollow = 0.35, stop: () => boolean = () => false): { nests: Nest[]; used: number[] } {
  const left = kinds.map((k) => (k.profiles.length > 0 ? k.quantity : 0));
  const volume = (p: Profile) => p.extent[0] * p.extent[1] * p.extent[2];
  const holders = kinds
    .map((k, i) => i)
    .filter((i) => left[i] > 0 && hollowShare(kinds[i].profiles[0], cell) >= minHollow)
    .sort((a, b) => volume(kinds[b].profiles[0]) - volume(kinds[a].profiles[0]) || a - b);
  const byCost = kinds
    .map((k, i) => i)
    .filter((i) => left[i] > 0)
    .sort((a, b) => kinds[b].profiles[0].cost - kinds[a].profiles[0].cost || a - b);
  /** Nests not (yet) inside another. */
  let pool: Nest[] = [];
  for (const h of holders) {
    const holder = kinds[h].profiles[0];
    while (left[h] > 0 && !stop()) {
      const G = localGrid(holder, cell, spacing);
      drop(G, holder, 0, 0, 0);
      left[h]--;
      const members: NestMember[] = [{ kind: h, profile: holder, du: 0, dv: 0, dz: 0 }];
      const bound = holder.extent[2] + 1e-9;
      const fits = (p: Profile) => p.extent[0] <= holder.extent[0] && p.extent[1] <= holder.extent[1] && volume(p) < volume(holder);
      for (let placed = true; placed; ) {
        placed = false;
        // Candidates largest first: the smaller nests made so far, then the kinds' copies.
        const candidates: Array<{ cost: number; nest?: Nest; kind?: number }> = [
          ...pool.map((n) => ({ cost: n.profile.cost, nest: n })),
          ...byCost.filter((k) => left[k] > 0).map((k) => ({ cost: kinds[k].profiles[0].cost, kind: k })),
        ].sort((a, b) => b.cost - a.cost);
        for (const c of candidates) {
          if (c.kind !== undefined && left[c.kind] === 0) continue;
          const profiles = c.nest ? [c.nest.profile] : kinds[c.kind!].profiles;
          let best: { u: number; v: number; z: number; score: number; p: Profile } | null = null;
          for (const p of profiles) {
            if (!fits(p)) continue;
            const d = bestDrop(G, p, best ? best.score : bound);
            if (d) best = { ...d, p };
          }
          if (!best) continue;
          drop(G, best.p, best.u, best.v, best.z);
          if (c.nest) {
            members.push({ kind: c.nest.members[0].kind, profile: best.p, nest: c.nest, du: best.u, dv: best.v, dz: best.z });
            pool = pool.filter((n) => n !== c.nest);
          } else {
            members.push({ kind: c.kind!, profile: best.p, du: best.u, dv: best.v, dz: best.z });
            left[c.kind!]--;
          }
          placed = true;
        }
      }
      if (members.length === 1) {
        // Nothing fits in this kind's hollow: its copies pack on their own.
        left[h]++;
        break;
      }
      pool.push({ members, profile: nestProfile(holder, members, cell, spacing) });
    }
  }
  return { nests: pool, used: kinds.map((k, i) => (k.profiles.length > 0 ? k.quantity : 0) - left[i]) };
}

/** Every part of a nest with its offset from the nest's box (whole cells along x and y, mm along z), holders before what they hold. */
export function nestParts(nest: Nest): Array<{ kind: number; profile: Profile; du: number; dv: number; dz: number }> {
  const out: Array<{ kind: number; profile: Profile; du: number; dv: number; dz: number }> = [];
  for (const m of nest.members) {
    if (!m.nest) out.push({ kind: m.kind, profile: m.profile, du: m.du, dv: m.dv, dz: m.dz });
    else for (const inner of nestParts(m.nest)) out.push({ ...inner, du: inner.du + m.du, dv: inner.dv + m.dv, dz: inner.dz + m.dz });
  }
  return out;
}
