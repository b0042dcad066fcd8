/**
 * Parts' meshes projected onto a plane of the chamber, for drawings (the
 * build sheet's top and side views): a grid of square cells over the view,
 * each holding the nearest depth of any triangle that covers the cell's
 * centre (-Infinity where none does; depths are signed so that larger is
 * nearer). A part with a hole shows the hole; a part standing in an open
 * housing shows inside its walls from above, and wherever nothing nearer
 * covers it.
 *
 *     view plane (axes a, b)            depth: the third axis, nearer = larger
 *     +---------------------+ nb cells
 *     |  ..###..   ####     |           each triangle is scan-converted with
 *     | .#####.#  #  #      |           edge functions at the cell centres and
 *     |  ..###..   ####     |           its depth interpolated there (the
 *     +---------------------+           usual z-buffer test, kept as a max)
 *       na cells of `cellMm`
 */
import { applyTransform } from './rotations';

export interface ProjectionGrid {
  /** The chamber axes drawn across (a) and up (b): 0 = x, 1 = y, 2 = z. */
  axes: [number, number];
  /** The chamber axis along the line of sight. */
  depthAxis: number;
  /** 1: a larger coordinate on the depth axis is nearer the viewer (looking down -z from above); -1: a smaller one is. */
  nearer: 1 | -1;
  cellMm: number;
  na: number;
  nb: number;
  /** Nearest depth per cell (the coordinate times `nearer`), row by row from b = 0 (cell (i, j) at i + na * j); -Infinity where empty. */
  depth: Float32Array;
}

export function projectionGrid(axes: [number, number], depthAxis: number, sizeMm: readonly [number, number], cellMm: number, nearer: 1 | -1 = 1): ProjectionGrid {
  const na = Math.max(1, Math.ceil(sizeMm[0] / cellMm - 1e-9));
  const nb = Math.max(1, Math.ceil(sizeMm[1] / cellMm - 1e-9));
  return { axes, depthAxis, nearer, cellMm, na, nb, depth: new Float32Array(na * nb).fill(-Infinity) };
}

/** Draws the triangles of a mesh placed by a 3MF transform (row vectors, p' = [x y z 1] M) into the grid. */
export function projectMesh(grid: ProjectionGrid, positions: ArrayLike<number>, indices: ArrayLike<number>, transform: readonly number[]): void {
  const { axes, depthAxis, nearer, cellMm, na, nb, depth } = grid;
  const vertices = positions.length / 3;
  // Every vertex placed once: view coordinates in cells, and depth.
  const u = new Float64Array(vertices);
  const v = new Float64Array(vertices);
  const d = new Float64Array(vertices);
  const p = [0, 0, 0];
  for (let k = 0; k < vertices; k++) {
    p[0] = positions[3 * k];
    p[1] = positions[3 * k + 1];
    p[2] = positions[3 * k + 2];
    const q = applyTransform(transform, p);
    u[k] = q[axes[0]] / cellMm;
    v[k] = q[axes[1]] / cellMm;
    d[k] = nearer * q[depthAxis];
  }
  for (let t = 0; t + 2 < indices.length; t += 3) {
    const i0 = indices[t], i1 = indices[t + 1], i2 = indices[t + 2];
    const ax = u[i0], ay = v[i0], bx = u[i1], by = v[i1], cx = u[i2], cy = v[i2];
    const area = (bx - ax) * (cy - ay) - (by - ay) * (cx - ax);
    // Seen edge on: it covers no cell centre that its neighbours do not.
    if (Math.abs(area) < 1e-12) continue;
    const i0c = Math.max(0, Math.ceil(Math.min(ax, bx, cx) - 0.5));
    const i1c = Math.min(na - 1, Math.floor(Math.max(ax, bx, cx) - 0.5));
    const j0c = Math.max(0, Math.ceil(Math.min(ay, by, cy) - 0.5));
    const j1c = Math.min(nb - 1, Math.floor(Math.max(ay, by, cy) - 0.5));
    if (i0c > i1c || j0c > j1c) continue;
    const inv = 1 / area;
    const da = d[i0], db = d[i1], dc = d[i2];
    for (let j = j0c; j <= j1c; j++) {
      const y = j + 0.5;
      for (let i = i0c; i <= i1c; i++) {
        const x = i + 0.5;
        // Barycentric weights of the cell centre; inside (edges included) when all are >= 0.
        const w0 = ((bx - x) * (cy - y) - (by - y) * (cx - x)) * inv;
        const w1 = ((cx - x) * (ay - y) - (cy - y) * (ax - x)) * inv;
        const w2 = 1 - w0 - w1;
        if (w0 < -1e-9 || w1 < -1e-9 || w2 < -1e-9) continue;
        const z = w0 * da + w1 * db + w2 * dc;
        const id = i + na * j;
        if (z > depth[id]) depth[id] = z;
      }
    }
  }
}

/**
 * The view as a picture, one RGB pixel a cell, the top row first (row b = nb - 1): the nearest depth of each
 * covered cell cut into `palette.length` bands between the farthest and the nearest covered depth (the first
 * colour farthest), `background` where nothing covers a cell. Where every covered cell lies within a cell's size
 * of the same depth (plates laid flat, seen from above), all of them are the nearest there is: the last colour.
 */
export function shadeImage(grid: ProjectionGrid, palette: ReadonlyArray<readonly [number, number, number]>, background: readonly [number, number, number]): Uint8Array {
  const { na, nb, depth } = grid;
  let far = Infinity, near = -Infinity;
  for (const z of depth) {
    if (z === -Infinity) continue;
    if (z < far) far = z;
    if (z > near) near = z;
  }
  const levels = palette.length;
  const flat = near - far < grid.cellMm;
  const span = Math.max(1e-9, near - far);
  const rgb = new Uint8Array(3 * na * nb);
  for (let j = 0; j < nb; j++) {
    const row = (nb - 1 - j) * na;
    for (let i = 0; i < na; i++) {
      const z = depth[i + na * j];
      const c = z === -Infinity ? background : palette[flat ? levels - 1 : Math.max(0, Math.min(levels - 1, Math.floor(((z - far) / span) * levels)))];
      rgb.set(c, 3 * (row + i));
    }
  }
  return rgb;
}
