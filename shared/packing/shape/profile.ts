/**
 * A part's occupancy as seen from above and below, on a square grid of plan
 * cells: for each column of the grid, the lowest and the highest point of the
 * part inside that column (closed cell, so a point on a cell edge counts for
 * both cells). Each triangle is clipped to each cell it covers, so the values
 * are exact for the triangles, not samples: the column profile contains the
 * part (a conservative voxelization in the sense of Lamas-Fernandez, Bennell &
 * Martinez-Sykora, Oper. Res. 2023, reduced to columns).
 */
import { rotationMatrix } from '../../geometry/rotations';
import type { ShapePart } from './parts';

export interface Profile {
  rotation: number;
  /** Extent of the rotated part along chamber x, y, z. */
  extent: [number, number, number];
  /** Rotated part's bounding-box minimum in part-rotated coordinates (translation = position - this). */
  rotatedMin: [number, number, number];
  nx: number;
  ny: number;
  /** Columns holding material, sorted by `bottom` ascending: cell i + nx * j. */
  cellX: Int32Array;
  cellY: Int32Array;
  /** Lowest and highest point in the column, above the rotated box's bottom. */
  bottom: Float64Array;
  top: Float64Array;
  /** Sum over columns of (top + bottom + spacing) x cell area: room the part costs when dropped (mm^3). */
  cost: number;
}

const EPS = 1e-9;

/**
 * The column profile of `part` turned by `rotation`, on cells of size `cell`.
 * With `asBox`, the part is treated as its bounding box (for a mesh that is
 * not watertight).
 */
export function columnProfile(part: ShapePart, rotation: number, cell: number, spacing: number, asBox = false): Profile {
  const m = rotationMatrix(rotation);
  const { positions: p, indices: ix } = part.mesh;
  const nv = p.length / 3;
  const q = new Float64Array(p.length);
  const mn = [Infinity, Infinity, Infinity];
  const mx = [-Infinity, -Infinity, -Infinity];
  for (let v = 0; v < nv; v++) {
    for (let r = 0; r < 3; r++) {
      const val = m[3 * r] * p[3 * v] + m[3 * r + 1] * p[3 * v + 1] + m[3 * r + 2] * p[3 * v + 2];
      q[3 * v + r] = val;
    }
  }
  // The bounding box over used vertices only.
  for (let f = 0; f < ix.length; f++) {
    const o = 3 * ix[f];
    for (let r = 0; r < 3; r++) {
      if (q[o + r] < mn[r]) mn[r] = q[o + r];
      if (q[o + r] > mx[r]) mx[r] = q[o + r];
    }
  }
  for (let v = 0; v < nv; v++) for (let r = 0; r < 3; r++) q[3 * v + r] -= mn[r];
  const extent: [number, number, number] = [mx[0] - mn[0], mx[1] - mn[1], mx[2] - mn[2]];
  const nx = Math.max(1, Math.ceil(extent[0] / cell - EPS));
  const ny = Math.max(1, Math.ceil(extent[1] / cell - EPS));
  const bot = new Float64Array(nx * ny).fill(Infinity);
  const top = new Float64Array(nx * ny).fill(-Infinity);
  if (asBox) {
    bot.fill(0);
    top.fill(extent[2]);
  } else {
    // Each triangle is cut to one row of cells (a strip along x) at a time, then the strip's piece to each cell
    // of the row it reaches: two cuts per cell instead of four, and no cell of the row the piece misses.
    const strip = new Float64Array(3 * 16);
    const poly = new Float64Array(3 * 16);
    const tmp = new Float64Array(3 * 16);
    const keep = (i: number, j: number, lo: number, hi: number) => {
      const id = i + nx * j;
      if (lo < bot[id]) bot[id] = lo;
      if (hi > top[id]) top[id] = hi;
    };
    for (let f = 0; f < ix.length; f += 3) {
      const a = 3 * ix[f], b = 3 * ix[f + 1], c = 3 * ix[f + 2];
      const x0 = Math.min(q[a], q[b], q[c]), x1 = Math.max(q[a], q[b], q[c]);
      const y0 = Math.min(q[a + 1], q[b + 1], q[c + 1]), y1 = Math.max(q[a + 1], q[b + 1], q[c + 1]);
      const i0 = Math.max(0, Math.floor((x0 - EPS) / cell)), i1 = Math.min(nx - 1, Math.floor((x1 + EPS) / cell));
      const j0 = Math.max(0, Math.floor((y0 - EPS) / cell)), j1 = Math.min(ny - 1, Math.floor((y1 + EPS) / cell));
      if (i0 === i1 && j0 === j1) {
        keep(i0, j0, Math.min(q[a + 2], q[b + 2], q[c + 2]), Math.max(q[a + 2], q[b + 2], q[c + 2]));
        continue;
      }
      for (let j = j0; j <= j1; j++) {
        poly[0] = q[a]; poly[1] = q[a + 1]; poly[2] = q[a + 2];
        poly[3] = q[b]; poly[4] = q[b + 1]; poly[5] = q[b + 2];
        poly[6] = q[c]; poly[7] = q[c + 1]; poly[8] = q[c + 2];
        let n = clip(poly, 3, tmp, 1, j * cell - EPS, 1);
        n = clip(tmp, n, strip, 1, (j + 1) * cell + EPS, -1);
        if (n === 0) continue;
        // The cells of this row the piece reaches.
        let sx0 = Infinity, sx1 = -Infinity;
        for (let k = 0; k < n; k++) {
          if (strip[3 * k] < sx0) sx0 = strip[3 * k];
          if (strip[3 * k] > sx1) sx1 = strip[3 * k];
        }
        const k0 = Math.max(i0, Math.floor((sx0 - EPS) / cell)), k1 = Math.min(i1, Math.floor((sx1 + EPS) / cell));
        for (let i = k0; i <= k1; i++) {
          let m = clip(strip, n, tmp, 0, i * cell - EPS, 1);
          m = clip(tmp, m, poly, 0, (i + 1) * cell + EPS, -1);
          if (m === 0) continue;
          let lo = Infinity;
          let hi = -Infinity;
          for (let k = 0; k < m; k++) {
            const z = poly[3 * k + 2];
            if (z < lo) lo = z;
            if (z > hi) hi = z;
          }
          keep(i, j, lo, hi);
        }
      }
    }
  }
  return profileOfColumns(rotation, extent, [mn[0], mn[1], mn[2]], nx, ny, bot, top, cell, spacing);
}

/**
 * A profile from per-cell lowest and highest points (cells without material
 * have top < bottom): the columns with material, sorted by bottom, and their cost.
 */
export function profileOfColumns(
  rotation: number,
  extent: [number, number, number],
  rotatedMin: [number, number, number],
  nx: number,
  ny: number,
  bot: Float64Array,
  top: Float64Array,
  cell: number,
  spacing: number,
): Profile {
  const ids: number[] = [];
  for (let id = 0; id < nx * ny; id++) if (top[id] >= bot[id]) ids.push(id);
  ids.sort((u, v) => bot[u] - bot[v] || u - v);
  const cellX = new Int32Array(ids.length), cellY = new Int32Array(ids.length);
  const bottom = new Float64Array(ids.length), topOut = new Float64Array(ids.length);
  let cost = 0;
  ids.forEach((id, k) => {
    cellX[k] = id % nx;
    cellY[k] = Math.floor(id / nx);
    bottom[k] = bot[id];
    topOut[k] = top[id];
    cost += (top[id] + bot[id] + spacing) * cell * cell;
  });
  return { rotation, extent, rotatedMin, nx, ny, cellX, cellY, bottom, top: topOut, cost };
}

/**
 * One Sutherland–Hodgman step: keeps the part of polygon `src` (n vertices,
 * xyz) where dir x (coordinate axis - bound) >= 0; writes to `dst`, returns its size.
 */
function clip(src: Float64Array, n: number, dst: Float64Array, axis: number, bound: number, dir: number): number {
  let m = 0;
  for (let k = 0; k < n; k++) {
    const l = (k + 1) % n;
    const sk = dir * (src[3 * k + axis] - bound);
    const sl = dir * (src[3 * l + axis] - bound);
    if (sk >= 0) {
      dst[3 * m] = src[3 * k];
      dst[3 * m + 1] = src[3 * k + 1];
      dst[3 * m + 2] = src[3 * k + 2];
      m++;
    }
    if ((sk >= 0) !== (sl >= 0)) {
      const t = sk / (sk - sl);
      dst[3 * m] = src[3 * k] + t * (src[3 * l] - src[3 * k]);
      dst[3 * m + 1] = src[3 * k + 1] + t * (src[3 * l + 1] - src[3 * k + 1]);
      dst[3 * m + 2] = src[3 * k + 2] + t * (src[3 * l + 2] - src[3 * k + 2]);
      m++;
    }
  }
  return m;
}
