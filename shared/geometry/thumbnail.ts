/**
 * A small picture of a part for the library: the mesh seen from above the
 * front-right corner (an isometric view: the camera looks along -(1, -1, 1)
 * with +z up on the picture), drawn with a depth buffer and flat shading by
 * each triangle's facing, on a transparent background. Orthographic and
 * scaled so the part's projected outline fills the picture less a margin.
 */
import type { MeshData } from './types';

export interface Thumbnail {
  width: number;
  height: number;
  /** Straight RGBA, row by row from the top. */
  rgba: Uint8Array;
}

/** The camera's axes for the isometric view: right, up (on the picture) and towards the viewer. */
const S2 = Math.SQRT1_2;
const S6 = 1 / Math.sqrt(6);
const S3 = 1 / Math.sqrt(3);
const RIGHT = [S2, S2, 0];
const UP = [-S6, S6, 2 * S6];
const TOWARDS = [S3, -S3, S3];
/** Light from over the viewer's left shoulder, so the three visible sides of a box read apart. */
const LIGHT = normalise([0.2, -0.6, 1]);

function normalise(v: number[]): number[] {
  const l = Math.hypot(v[0], v[1], v[2]) || 1;
  return [v[0] / l, v[1] / l, v[2] / l];
}

/** The part's colour (warm grey) shaded by how squarely a face meets the light. */
const BASE = [196, 120, 82];

export function renderThumbnail(mesh: MeshData, sizePx = 96, marginPx = 4): Thumbnail {
  const width = sizePx;
  const height = sizePx;
  const rgba = new Uint8Array(width * height * 4);
  const p = mesh.positions;
  const n = p.length / 3;
  if (n === 0) return { width, height, rgba };
  // Project every vertex: picture x, picture y (up) and depth (towards the viewer).
  const sx = new Float64Array(n);
  const sy = new Float64Array(n);
  const sz = new Float64Array(n);
  let minX = Infinity;
  let maxX = -Infinity;
  let minY = Infinity;
  let maxY = -Infinity;
  for (let v = 0; v < n; v++) {
    const x = p[3 * v];
    const y = p[3 * v + 1];
    const z = p[3 * v + 2];
    sx[v] = RIGHT[0] * x + RIGHT[1] * y + RIGHT[2] * z;
    sy[v] = UP[0] * x + UP[1] * y + UP[2] * z;
    sz[v] = TOWARDS[0] * x + TOWARDS[1] * y + TOWARDS[2] * z;
    if (sx[v] < minX) minX = sx[v];
    if (sx[v] > maxX) maxX = sx[v];
    if (sy[v] < minY) minY = sy[v];
    if (sy[v] > maxY) maxY = sy[v];
  }
  const span = Math.max(maxX - minX, maxY - minY) || 1;
  const scale = (sizePx - 2 * marginPx) / span;
  // Centred: pixel coordinates with y growing downwards.
  const offX = (width - (maxX - minX) * scale) / 2;
  const offY = (height - (maxY - minY) * scale) / 2;
  for (let v = 0; v < n; v++) {
    sx[v] = offX + (sx[v] - minX) * scale;
    sy[v] = height - (offY + (sy[v] - minY) * scale);
  }
  const depth = new Float64Array(width * height).fill(-Infinity);
  const idx = mesh.indices;
  for (let t = 0; t < idx.length; t += 3) {
    const a = idx[t];
    const b = idx[t + 1];
    const c = idx[t + 2];
    // The face's normal in the world, for its shade; both sides are drawn (meshes are not always oriented).
    const ux = p[3 * b] - p[3 * a];
    const uy = p[3 * b + 1] - p[3 * a + 1];
    const uz = p[3 * b + 2] - p[3 * a + 2];
    const vx = p[3 * c] - p[3 * a];
    const vy = p[3 * c + 1] - p[3 * a + 1];
    const vz = p[3 * c + 2] - p[3 * a + 2];
    let nx = uy * vz - uz * vy;
    let ny = uz * vx - ux * vz;
    let nz = ux * vy - uy * vx;
    const len = Math.hypot(nx, ny, nz);
    if (len === 0) continue;
    nx /= len;
    ny /= len;
    nz /= len;
    // Seen from its back: turn the normal to the viewer.
    if (nx * TOWARDS[0] + ny * TOWARDS[1] + nz * TOWARDS[2] < 0) {
      nx = -nx;
      ny = -ny;
      nz = -nz;
    }
    const shade = 0.35 + 0.65 * Math.max(0, nx * LIGHT[0] + ny * LIGHT[1] + nz * LIGHT[2]);
    const r = Math.round(BASE[0] * shade);
    const g = Math.round(BASE[1] * shade);
    const bl = Math.round(BASE[2] * shade);
    const x0 = sx[a], y0 = sy[a], x1 = sx[b], y1 = sy[b], x2 = sx[c], y2 = sy[c];
    const area = (x1 - x0) * (y2 - y0) - (x2 - x0) * (y1 - y0);
    if (area === 0) continue;
    const left = Math.max(0, Math.floor(Math.min(x0, x1, x2)));
    const right = Math.min(width - 1, Math.ceil(Math.max(x0, x1, x2)));
    const top = Math.max(0, Math.floor(Math.min(y0, y1, y2)));
    const bottom = Math.min(height - 1, Math.ceil(Math.max(y0, y1, y2)));
    for (let py = top; py <= bottom; py++) {
      const cy = py + 0.5;
      for (let px = left; px <= right; px++) {
        const cx = px + 0.5;
        // Barycentric weights of the pixel's centre; inside when all share the triangle's sign.
        const w0 = ((x1 - cx) * (y2 - cy) - (x2 - cx) * (y1 - cy)) / area;
        const w1 = ((x2 - cx) * (y0 - cy) - (x0 - cx) * (y2 - cy)) / area;
        const w2 = 1 - w0 - w1;
        if (w0 < 0 || w1 < 0 || w2 < 0) continue;
        const z = w0 * sz[a] + w1 * sz[b] + w2 * sz[c];
        const i = py * width + px;
        if (z <= depth[i]) continue;
        depth[i] = z;
        rgba[4 * i] = r;
        rgba[4 * i + 1] = g;
        rgba[4 * i + 2] = bl;
        rgba[4 * i + 3] = 255;
      }
    }
  }
  return { width, height, rgba };
}

/** Share of the picture's pixels the part covers (for checks and tests). */
export function coverage(t: Thumbnail): number {
  let filled = 0;
  for (let i = 3; i < t.rgba.length; i += 4) if (t.rgba[i] > 0) filled++;
  return filled / (t.width * t.height);
}
