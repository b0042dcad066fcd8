/**
 * Settling a layout by shape: every part, bottom first, is lowered straight
 * down until its true shape comes within the spacing of a part below it (or
 * reaches the floor). A layout of bounding boxes stacks a part on the top of
 * the box below it; settled, the part sinks into that part's hollows (an open
 * housing, the empty corner of a bracket, the hole of a ring) as far as the
 * two surfaces allow.
 *
 * The distance is kept by geometry on both parts' column profiles (for each
 * column of a fine plan grid, the lowest and the highest point of the part in
 * it, exact to the triangles): a column of the part coming down must stay
 * above every column of the part below within the spacing in plan, by the
 * height of a ball of that radius over the horizontal distance between the
 * columns (measured between the nearest points of the two cells, so the
 * grid can only keep parts further apart, never closer).
 *
 * Only parts whose plan boxes come within the spacing of each other matter:
 * two parts further apart in plan stay apart whatever their heights. Because
 * each part moves straight down along a free path from above everything it
 * passes, the settling order stays a lift-out order (Cui et al., ACM TOG
 * 42(4), 2023: vertical removal keeps a packing free of interlocks).
 */
import { rotatedExtent } from '../../geometry/rotations';
import { usableRegion } from '../geometry';
import type { PackInstanceV2 } from '../types';
import type { ShapePart } from './parts';
import { columnProfile, type Profile } from './profile';
import { bestDrop, newGrid, type Grid } from './grid';

export interface SettleItem {
  /** Index in the prepared parts. */
  part: number;
  /** Rotation 0..23. */
  rotation: number;
  /** Minimum corner of the placed bounding box (mm). */
  position: [number, number, number];
  /**
   * Items of one group (listed one after another, first the lowest) keep their heights over the first of them
   * when it sinks, where nothing else stops them: their places relative to each other were found clear on the
   * meshes (a stack, ./stack.ts), closer than this grid would put them.
   */
  group?: number;
  /**
   * An item of a group may rest this high over a copy of its part in the same turn straight under it (same plan
   * place): the pitch its group was found clear at on the meshes. Two stacks one on the other then close up into
   * one, where the grid alone would leave them further apart.
   */
  pitch?: number;
}

/** A profile as dense maps over its own cells: bottom (+Infinity where empty) and top (-Infinity). */
interface Dense {
  nx: number;
  ny: number;
  extent: [number, number, number];
  bottom: Float64Array;
  top: Float64Array;
  /**
   * The top grown by a ball of the spacing, over the cells around the part too
   * (R cells beyond each side): at cell (k, l), the height a point of another
   * part in that column must keep above this part's box bottom, taking the
   * horizontal distance to each column as the gap between the two cells.
   */
  grown: Float64Array;
  /** The bottom lowered by the same ball: below it, in that column, a point of another part is clear of this one. */
  low: Float64Array;
  R: number;
}

function dense(p: Profile, g: number, h: number): Dense {
  const { nx, ny } = p;
  const bottom = new Float64Array(nx * ny).fill(Infinity);
  const top = new Float64Array(nx * ny).fill(-Infinity);
  for (let k = 0; k < p.cellX.length; k++) {
    const id = p.cellX[k] + nx * p.cellY[k];
    bottom[id] = p.bottom[k];
    top[id] = p.top[k];
  }
  const R = g > 0 ? Math.ceil(g / h) + 1 : 1;
  const wx = nx + 2 * R, wy = ny + 2 * R;
  const grown = new Float64Array(wx * wy).fill(-Infinity);
  const low = new Float64Array(wx * wy).fill(Infinity);
  const g2 = g * g;
  // Rise over a column at a gap of (d - 1) cells, d = 0..R (0 and 1: the same or a touching cell).
  const rise = new Float64Array((R + 1) * (R + 1)).fill(-Infinity);
  for (let a = 0; a <= R; a++) {
    for (let b = 0; b <= R; b++) {
      const dx = Math.max(0, a - 1) * h, dy = Math.max(0, b - 1) * h;
      const d2 = dx * dx + dy * dy;
      if (g > 0 ? d2 < g2 : d2 === 0) rise[a + (R + 1) * b] = Math.sqrt(Math.max(0, g2 - d2));
    }
  }
  for (let l = 0; l < ny; l++) {
    for (let k = 0; k < nx; k++) {
      const t = top[k + nx * l];
      if (t === -Infinity) continue;
      const u = bottom[k + nx * l];
      for (let b = -R; b <= R; b++) {
        const row = wx * (l + b + R);
        for (let a = -R; a <= R; a++) {
          const r = rise[Math.abs(a) + (R + 1) * Math.abs(b)];
          if (r === -Infinity) continue;
          const id = row + k + a + R;
          if (t + r > grown[id]) grown[id] = t + r;
          if (u - r < low[id]) low[id] = u - r;
        }
      }
    }
  }
  return { nx, ny, extent: p.extent, bottom, top, grown, low, R };
}

/** The plan cell size the settling works at: a third of the spacing, between 0.5 and 1.5 mm. */
export function settleCell(spacing: number): number {
  return Math.min(1.5, Math.max(0.5, spacing / 3));
}

/**
 * The layout with every part lowered as far as its shape allows, in the same
 * order (which must be bottom first, as a box layout lists its placements).
 * `stopped` ends the work early; the parts not reached keep their height.
 */
export function settleLayout(
  instance: PackInstanceV2,
  parts: ShapePart[],
  items: readonly SettleItem[],
  options: { cell?: number; stopped?: () => boolean } = {},
): SettleItem[] {
  const g = instance.spacing;
  const h = options.cell ?? settleCell(g);
  const floor = usableRegion(instance).min[2];
  const profileOf = denseProfiles(parts, g, h);
  // Plan buckets of the settled parts (by their boxes grown by the spacing), for the near ones.
  const bucket = Math.max(10, 4 * g);
  const buckets = new Map<number, number[]>();
  const keyOf = (i: number, j: number) => i * 100_003 + j;
  const out: SettleItem[] = [];
  /** How far the first item of each group sank. */
  const sank = new Map<number, number>();
  /** The copy a group's first item rests on at the group's pitch (./stack.ts): the rest of the group stands a whole number of pitches over it. */
  const restsOn = new Map<number, number>();
  /** The lowest clear height of P at (x, y) under `z0` among the settled items (not those of group `skip`, nor item `skipItem`). */
  const needOf = (P: Dense, x: number, y: number, z0: number, skip?: number, skipItem?: number): number => {
    let need = floor;
    const seen = new Set<number>();
    const i0 = Math.floor((x - g) / bucket), i1 = Math.floor((x + P.extent[0] + g) / bucket);
    const j0 = Math.floor((y - g) / bucket), j1 = Math.floor((y + P.extent[1] + g) / bucket);
    for (let i = i0; i <= i1 && need < z0; i++) {
      for (let j = j0; j <= j1 && need < z0; j++) {
        for (const q of buckets.get(keyOf(i, j)) ?? []) {
          if (seen.has(q) || q === skipItem) continue;
          seen.add(q);
          const Q = out[q];
          if (skip !== undefined && Q.group === skip) continue;
          need = Math.max(need, clearAbove(P, x, y, profileOf(Q.part, Q.rotation), Q.position, g, h));
          if (need >= z0) break;
        }
      }
    }
    return need;
  };
  /** The highest settled copy of the item's part in its turn at its plan place, under `z` (-1: none). */
  const copyUnder = (item: SettleItem, z: number): number => {
    let best = -1;
    const [x, y] = item.position;
    for (const q of buckets.get(keyOf(Math.floor(x / bucket), Math.floor(y / bucket))) ?? []) {
      const Q = out[q];
      if (Q.part !== item.part || Q.rotation !== item.rotation || Math.abs(Q.position[0] - x) > 1e-6 || Math.abs(Q.position[1] - y) > 1e-6) continue;
      if (Q.position[2] < z && (best < 0 || Q.position[2] > out[best].position[2])) best = q;
    }
    return best;
  };
  for (const item of items) {
    // Stopped: the rest keep their heights, and need no buckets (nothing after them is settled).
    if (options.stopped?.()) {
      for (let k = out.length; k < items.length; k++) {
        const it = items[k];
        out.push({ part: it.part, rotation: it.rotation, position: [it.position[0], it.position[1], it.position[2]], ...(it.group !== undefined ? { group: it.group } : {}) });
      }
      break;
    }
    const P = profileOf(item.part, item.rotation);
    const [x, y, z0] = item.position;
    // A later item of a group whose first sank: as far down with it, if nothing else is in the way.
    const by = item.group !== undefined ? sank.get(item.group) : undefined;
    let z = z0;
    if (by !== undefined && by > 0 && needOf(P, x, y, z0 - by, item.group, restsOn.get(item.group!)) + 1e-7 <= z0 - by) z = z0 - by;
    else {
      z = restingZ(needOf(P, x, y, z0), z0);
      // A stack's copy over a copy of its part in the same turn, straight under it (the top of another stack, or
      // of its own where it could not follow): the stack's pitch over that copy, clear on the meshes, if nothing
      // else is in the way (the copies further down, a whole number of pitches away or further where the settling
      // opened their stack up, the grid checks).
      const under = item.pitch !== undefined ? copyUnder(item, z) : -1;
      if (under >= 0) {
        const over = out[under].position[2] + item.pitch!;
        if (over < z - 1e-9 && needOf(P, x, y, z0, undefined, under) <= over + 1e-9) {
          z = over;
          if (!sank.has(item.group!)) restsOn.set(item.group!, under);
        }
      }
    }
    if (item.group !== undefined && !sank.has(item.group)) sank.set(item.group, z0 - z);
    const placed: SettleItem = { part: item.part, rotation: item.rotation, position: [x, y, z], ...(item.group !== undefined ? { group: item.group } : {}) };
    const at = out.length;
    out.push(placed);
    const bi0 = Math.floor((x - g) / bucket), bi1 = Math.floor((x + P.extent[0] + g) / bucket);
    const bj0 = Math.floor((y - g) / bucket), bj1 = Math.floor((y + P.extent[1] + g) / bucket);
    for (let i = bi0; i <= bi1; i++) {
      for (let j = bj0; j <= bj1; j++) {
        const k = keyOf(i, j);
        let list = buckets.get(k);
        if (!list) buckets.set(k, (list = []));
        list.push(at);
      }
    }
  }
  return out;
}

/** Never up: the place a part had is free by the layout it came from; lowered, it keeps a hair above what stops it. */
function restingZ(need: number, z0: number): number {
  return need < z0 - 1e-6 ? need + 1e-7 : z0;
}

/** Dense profiles of the parts' turns on cells of `h`, each drawn once. */
function denseProfiles(parts: ShapePart[], g: number, h: number): (part: number, rotation: number) => Dense {
  const cache = new Map<string, Dense>();
  return (part, rotation) => {
    const key = `${part}:${rotation}`;
    let d = cache.get(key);
    if (!d) {
      const p = parts[part];
      d = dense(columnProfile(p, rotation, h, g, p.hasMesh && !p.watertight), g, h);
      cache.set(key, d);
    }
    return d;
  };
}

/** True when two plan boxes (corners x, y, extents ex, ey) are at least the spacing apart: no height brings them closer. */
function apartInPlan(x: number, y: number, ex: number, ey: number, qx: number, qy: number, qex: number, qey: number, g: number): boolean {
  const gx = Math.max(qx - (x + ex), x - (qx + qex), 0);
  const gy = Math.max(qy - (y + ey), y - (qy + qey), 0);
  return gx * gx + gy * gy >= g * g;
}

/**
 * The lowest height of P's box bottom (at plan corner x, y) that keeps it the spacing clear of Q coming from
 * above; -Infinity when their plan boxes are further apart than the spacing (no height brings them closer).
 */
function clearAbove(P: Dense, x: number, y: number, Q: Dense, q: readonly number[], g: number, h: number): number {
  if (apartInPlan(x, y, P.extent[0], P.extent[1], q[0], q[1], Q.extent[0], Q.extent[1], g)) return -Infinity;
  return lowestAbove(P, x, y, Q, q, h);
}

/**
 * Where parts come to rest lowered straight down from where they are: for an item, the lowest box bottom (never
 * above its own) at which it keeps the spacing from every one of `others` that it comes down onto, or the floor.
 * Where another part reaches over it (an overhang, a bracket's arm) it comes down from under it: a column of the
 * other part wholly above this one's, the spacing clear, only gets further away. A part with another both over
 * and under it in one column stays where it is. The profiles drawn are kept for the next item.
 */
export function restingHeights(instance: PackInstanceV2, parts: ShapePart[], options: { cell?: number } = {}): (item: SettleItem, others: readonly SettleItem[]) => number {
  const g = instance.spacing;
  const h = options.cell ?? settleCell(g);
  const floor = usableRegion(instance).min[2];
  const profileOf = denseProfiles(parts, g, h);
  return (item, others) => {
    const P = profileOf(item.part, item.rotation);
    const [x, y, z0] = item.position;
    let need = floor;
    for (const Q of others) {
      if (need >= z0) break;
      // Only the parts within the spacing in plan are drawn as profiles.
      const e = rotatedExtent(Q.rotation, parts[Q.part].size);
      if (apartInPlan(x, y, P.extent[0], P.extent[1], Q.position[0], Q.position[1], e[0], e[1], g)) continue;
      need = Math.max(need, lowestAbove(P, x, y, profileOf(Q.part, Q.rotation), Q.position, h, z0));
    }
    return restingZ(need, z0);
  };
}

/**
 * The lowest height of P's box bottom (P's box at plan corner x, y) at which
 * every point of P is at least the spacing from every point of Q, coming from
 * above. P's cell i spans Q's columns floor(sx + i) and the next; the grown
 * top of either, measured from a whole cell, errs only upwards (its gap to
 * every column of Q is at most the true one).
 */
function lowestAbove(P: Dense, x: number, y: number, Q: Dense, q: readonly number[], h: number, from?: number): number {
  let need = -Infinity;
  const { R, grown, low } = Q;
  const wx = Q.nx + 2 * R, wy = Q.ny + 2 * R;
  const sx = (x - q[0]) / h + R, sy = (y - q[1]) / h + R;
  const fx = Math.floor(sx + 1e-9), fy = Math.floor(sy + 1e-9);
  const ex = sx - fx > 1e-6 ? 1 : 0, ey = sy - fy > 1e-6 ? 1 : 0;
  for (let j = 0; j < P.ny; j++) {
    const l0 = fy + j;
    if (l0 + ey < 0 || l0 >= wy) continue;
    for (let i = 0; i < P.nx; i++) {
      const b = P.bottom[i + P.nx * j];
      if (b === Infinity) continue;
      const k0 = fx + i;
      if (k0 + ex < 0 || k0 >= wx) continue;
      // Lowered from `from`: P's top in this column, under which Q's grown bottom leaves it clear all the way down.
      const pTop = from === undefined ? Infinity : from + P.top[i + P.nx * j];
      for (let l = Math.max(0, l0), le = Math.min(wy - 1, l0 + ey); l <= le; l++) {
        for (let k = Math.max(0, k0), ke = Math.min(wx - 1, k0 + ex); k <= ke; k++) {
          const t = grown[k + wx * l];
          if (t === -Infinity) continue;
          if (pTop <= q[2] + low[k + wx * l]) continue;
          const z = q[2] + t - b;
          if (z > need) need = z;
        }
      }
    }
  }
  return need;
}

export interface TopItem {
  kind: number;
  /** Its column profile on the height map's cells. */
  profile: Profile;
  /** Minimum corner of the placed bounding box (mm). */
  position: [number, number, number];
}

/** Marks a part placed anywhere (not only on the cells' corners) into H: every cell its columns touch gets its top. */
function stamp(G: Grid, it: TopItem): void {
  const { nx, ny, cell, origin, H } = G;
  const fx = (it.position[0] - origin[0]) / cell, fy = (it.position[1] - origin[1]) / cell;
  const u0 = Math.floor(fx + 1e-9), v0 = Math.floor(fy + 1e-9);
  const ex = fx - u0 > 1e-6 ? 1 : 0, ey = fy - v0 > 1e-6 ? 1 : 0;
  const p = it.profile;
  for (let k = 0; k < p.cellX.length; k++) {
    const t = it.position[2] + p.top[k];
    for (let dv = 0; dv <= ey; dv++) {
      const v = v0 + p.cellY[k] + dv;
      if (v < 0 || v >= ny) continue;
      for (let du = 0; du <= ex; du++) {
        const u = u0 + p.cellX[k] + du;
        if (u < 0 || u >= nx) continue;
        const id = u + nx * v;
        if (t > H[id]) H[id] = t;
      }
    }
  }
}

/** D from H over the whole map: the maximum over the square of cells within the spacing, plus the spacing. */
function dilateAll(G: Grid): void {
  const { nx, ny, r, g, H, D } = G;
  const rows = new Float64Array(nx * ny);
  for (let y = 0; y < ny; y++) {
    for (let x = 0; x < nx; x++) {
      let h = -Infinity;
      for (let xx = Math.max(0, x - r), xe = Math.min(nx - 1, x + r); xx <= xe; xx++) if (H[xx + nx * y] > h) h = H[xx + nx * y];
      rows[x + nx * y] = h;
    }
  }
  for (let y = 0; y < ny; y++) {
    for (let x = 0; x < nx; x++) {
      let h = -Infinity;
      for (let yy = Math.max(0, y - r), ye = Math.min(ny - 1, y + r); yy <= ye; yy++) if (rows[x + nx * yy] > h) h = rows[x + nx * yy];
      D[x + nx * y] = h + g;
    }
  }
}

/**
 * Brings the top of a layout down: the part whose top is highest is taken out
 * and dropped again, among all the others, at the place and rotation (of
 * `choices` for its kind) where its top ends lowest, if that is lower than
 * where it was; then the next highest, until the highest part finds no lower
 * place. A part dropped so sits above everything in its columns, so it goes
 * last in the lift-out order.
 */
export function lowerTheTop(instance: PackInstanceV2, items: readonly TopItem[], choices: readonly Profile[][], cell: number, stopped?: () => boolean): TopItem[] {
  const out = items.slice();
  const topOf = (it: TopItem) => it.position[2] + it.profile.extent[2];
  for (let round = 0; round < 4 * items.length && !stopped?.(); round++) {
    let hi = -1;
    for (let i = 0; i < out.length; i++) if (hi < 0 || topOf(out[i]) > topOf(out[hi])) hi = i;
    if (hi < 0) break;
    const moving = out[hi];
    const G = newGrid(instance, cell);
    for (let i = 0; i < out.length; i++) if (i !== hi) stamp(G, out[i]);
    dilateAll(G);
    let best: { u: number; v: number; z: number; score: number; p: Profile } | null = null;
    for (const p of choices[moving.kind]) {
      const d = bestDrop(G, p, best ? best.score : topOf(moving) - 1e-6);
      if (d) best = { ...d, p };
    }
    if (!best) break;
    out.splice(hi, 1);
    out.push({ kind: moving.kind, profile: best.p, position: [G.origin[0] + best.u * cell, G.origin[1] + best.v * cell, best.z] });
  }
  return out;
}
