/**
 * The height map the packing by shape drops parts into: per plan cell, the
 * top of what is already there (H), and the same grown by the spacing (D:
 * the maximum of H over the cells within the spacing, plus the spacing), so
 * a part whose column profile stays above D keeps its distance from all.
 */
import { usableRegion } from '../geometry';
import type { PackInstanceV2 } from '../types';
import type { Profile } from './profile';

export interface Grid {
  nx: number;
  ny: number;
  cell: number;
  r: number;
  g: number;
  origin: [number, number, number];
  extent: [number, number, number];
  /** Top of the material per cell (-Infinity where empty). */
  H: Float64Array;
  /** Dilated: max of H over the (2r+1)^2 window, plus the spacing. */
  D: Float64Array;
}

export function newGrid(instance: PackInstanceV2, cell: number): Grid {
  const { min, extent } = usableRegion(instance);
  return gridOf([min[0], min[1], min[2]], [extent[0], extent[1], extent[2]], cell, instance.spacing);
}

/** An empty height map of a box from `origin` with `extent`, cells of `cell` mm, dilated by `spacing`. */
export function gridOf(origin: [number, number, number], extent: [number, number, number], cell: number, spacing: number): Grid {
  const nx = Math.max(1, Math.ceil(extent[0] / cell - 1e-9));
  const ny = Math.max(1, Math.ceil(extent[1] / cell - 1e-9));
  return {
    nx,
    ny,
    cell,
    r: spacing > 0 ? Math.ceil(spacing / cell - 1e-9) : 0,
    g: spacing,
    origin,
    extent,
    H: new Float64Array(nx * ny).fill(-Infinity),
    D: new Float64Array(nx * ny).fill(-Infinity),
  };
}

/**
 * Best drop of one profile: the lowest top, then the lowest row, then the leftmost; `bound` is the best score so far.
 * With `C` (per cell, the highest a point may reach there: a part over the drop, lowered by the spacing), a place
 * where the part's top in some column would pass it is not taken.
 */
export function bestDrop(G: Grid, p: Profile, bound: number, C?: Float64Array): { u: number; v: number; z: number; score: number } | null {
  const { nx, D, cell, extent, origin } = G;
  const umax = Math.floor((extent[0] - p.extent[0]) / cell + 1e-9);
  const vmax = Math.floor((extent[1] - p.extent[1]) / cell + 1e-9);
  if (umax < 0 || vmax < 0) return null;
  const floor = origin[2];
  const ceiling = origin[2] + extent[2] + 1e-9;
  const ez = p.extent[2];
  // The lowest this rotation can end: already no better than the bound, skip it.
  if (floor + ez >= bound) return null;
  const m = p.cellX.length;
  const off = new Int32Array(m);
  for (let k = 0; k < m; k++) off[k] = p.cellX[k] + nx * p.cellY[k];
  const bot = p.bottom;
  let best = Math.min(bound, ceiling);
  let bu = -1, bv = -1, bz = 0;
  for (let v = 0; v <= vmax; v++) {
    for (let u = 0; u <= umax; u++) {
      const base = u + nx * v;
      let z = floor;
      const limit = best - ez;
      let k = 0;
      for (; k < m; k++) {
        const h = D[base + off[k]] - bot[k];
        if (h > z) {
          z = h;
          if (z >= limit) break;
        }
      }
      if (k < m) continue;
      if (C) {
        for (k = 0; k < m; k++) if (z + p.top[k] > C[base + off[k]] + 1e-9) break;
        if (k < m) continue;
      }
      best = z + ez;
      bu = u;
      bv = v;
      bz = z;
      if (z <= floor) return { u, v, z, score: best };
    }
  }
  return bu < 0 ? null : { u: bu, v: bv, z: bz, score: best };
}

/**
 * The ceiling a part placed over the grid at `z` (its box bottom, corner at cell u, v) leaves: per cell, its lowest
 * point over any cell within the spacing, less the spacing (the same square window as the dilation D).
 */
export function ceilingOf(G: Grid, p: Profile, u: number, v: number, z: number): Float64Array {
  const { nx, ny, r, g } = G;
  const C = new Float64Array(nx * ny).fill(Infinity);
  for (let k = 0; k < p.cellX.length; k++) {
    const x = u + p.cellX[k], y = v + p.cellY[k];
    const b = z + p.bottom[k] - g;
    for (let yy = Math.max(0, y - r), ye = Math.min(ny - 1, y + r); yy <= ye; yy++) {
      for (let xx = Math.max(0, x - r), xe = Math.min(nx - 1, x + r); xx <= xe; xx++) if (b < C[xx + nx * yy]) C[xx + nx * yy] = b;
    }
  }
  return C;
}

export function drop(G: Grid, p: Profile, u: number, v: number, z: number): void {
  const { nx, ny, H, D, r, g } = G;
  for (let k = 0; k < p.cellX.length; k++) {
    const id = u + p.cellX[k] + nx * (v + p.cellY[k]);
    const t = z + p.top[k];
    if (t > H[id]) H[id] = t;
  }
  const x0 = Math.max(0, u - r), x1 = Math.min(nx - 1, u + p.nx - 1 + r);
  const y0 = Math.max(0, v - r), y1 = Math.min(ny - 1, v + p.ny - 1 + r);
  for (let y = y0; y <= y1; y++) {
    for (let x = x0; x <= x1; x++) {
      let h = -Infinity;
      for (let yy = Math.max(0, y - r), ye = Math.min(ny - 1, y + r); yy <= ye; yy++) {
        for (let xx = Math.max(0, x - r), xe = Math.min(nx - 1, x + r); xx <= xe; xx++) {
          const val = H[xx + nx * yy];
          if (val > h) h = val;
        }
      }
      D[x + nx * y] = h + g;
    }
  }
}

