/**
 * Cross-section areas of placed parts at the middle of every layer, from the
 * triangles themselves: the section of a closed mesh by the plane z = c is a
 * set of polygons whose edges are the triangles' crossings with the plane;
 * its area is the shoelace sum ½ Σ (x1 y2 − x2 y1) over those edges, each
 * oriented so that the face's outward normal points to its right (Green's
 * theorem in the plane). No voxels, no sampling within a layer.
 */
import type { PartMesh } from '../types';
import type { ShapePart } from './parts';

export interface PlacedPart {
  part: ShapePart;
  /** 3MF transform (row vectors) from the part's coordinates to the chamber. */
  transform: readonly number[];
}

/**
 * Each triangle's lowest and highest point along a direction of the part (before the placement's lift), in single
 * precision, widened by `slack` (more than the rounding): a bound to skip a triangle by, never to slice it by.
 */
interface Spans {
  zmin: Float32Array;
  zmax: Float32Array;
  slack: number;
}

/** Per mesh, per direction (the transform's z column): kept while the mesh is, so copies and later layouts reuse them. */
const spansByMesh = new WeakMap<PartMesh, Map<string, Spans>>();

function spansOf(mesh: PartMesh, t: readonly number[]): Spans {
  let byDirection = spansByMesh.get(mesh);
  if (!byDirection) spansByMesh.set(mesh, (byDirection = new Map()));
  const key = `${t[2]},${t[5]},${t[8]}`;
  let spans = byDirection.get(key);
  if (!spans) {
    const { positions: p, indices: ix } = mesh;
    const n = ix.length / 3;
    let far = 0;
    for (let i = 0; i < p.length; i++) far = Math.max(far, Math.abs(p[i]));
    // Single precision rounds to within 6e-8 of the value's size; the transform's direction has length 1.
    spans = { zmin: new Float32Array(n), zmax: new Float32Array(n), slack: 1e-6 * (3 * far + 1) };
    for (let f = 0; f < n; f++) {
      let lo = Infinity, hi = -Infinity;
      for (let k = 0; k < 3; k++) {
        const o = 3 * ix[3 * f + k];
        const z = p[o] * t[2] + p[o + 1] * t[5] + p[o + 2] * t[8];
        lo = Math.min(lo, z);
        hi = Math.max(hi, z);
      }
      spans.zmin[f] = lo;
      spans.zmax[f] = hi;
    }
    byDirection.set(key, spans);
  }
  return spans;
}

/**
 * Summed section area (mm^2) at z = (k + 0.5) x layerHeight for k = 0 .. layers - 1.
 *
 * Most triangles of a finely meshed part cross no layer's middle, or one. A triangle whose height span along the
 * placement's up direction (worked out once per mesh and direction, shifted by the placement's lift and widened
 * by more than its rounding) holds no layer's middle is skipped before it is moved; the others are moved and
 * sliced as they are.
 *
 * A section's area does not depend on where the part stands in plan: copies of a part in the same turn at the same
 * lift (to the last bit, so every crossing is worked out from the same heights) share one slicing. A box layout of
 * 185,556 cubes in 85 rows of heights took 1 s before.
 */
export function areaProfile(placed: readonly PlacedPart[], layerHeight: number, layers: number): number[] {
  const out = new Float64Array(layers);
  const sliced = new Map<ShapePart, Map<string, { first: number; sections: Float64Array }>>();
  for (const { part, transform: t } of placed) {
    const key = `${t[0]},${t[1]},${t[2]},${t[3]},${t[4]},${t[5]},${t[6]},${t[7]},${t[8]},${t[11]}`;
    let byKey = sliced.get(part);
    if (!byKey) sliced.set(part, (byKey = new Map()));
    let own = byKey.get(key);
    if (!own) byKey.set(key, (own = sectionsOf(part, t, layerHeight)));
    for (let i = 0; i < own.sections.length; i++) {
      const k = own.first + i;
      if (k >= 0 && k < layers) out[k] += own.sections[i];
    }
  }
  return Array.from(out, (a) => Math.max(0, a));
}

/**
 * The sections of one placed part (where it stands in plan left out: that does not change an area) at z = (k + 0.5) x
 * layerHeight for k = first .. first + sections.length - 1 (first may be below 0 or the last past the layers given).
 */
function sectionsOf(part: ShapePart, transform: readonly number[], layerHeight: number): { first: number; sections: Float64Array } {
  const t = transform;
  const lift = t[11];
  const { positions: p, indices: ix } = part.sliceMesh;
  const sign = part.facing;
  const { zmin: lo, zmax: hi, slack } = spansOf(part.sliceMesh, t);
  if (lo.length === 0) return { first: 0, sections: new Float64Array(0) };
  let bottom = Infinity, top = -Infinity;
  for (let i = 0; i < lo.length; i++) {
    bottom = Math.min(bottom, lo[i]);
    top = Math.max(top, hi[i]);
  }
  const first = Math.ceil((bottom - slack + lift) / layerHeight - 0.5);
  const last = Math.ceil((top + slack + lift) / layerHeight - 0.5) - 1;
  const out = new Float64Array(Math.max(0, last - first + 1));
  // In plan, the turned mesh moved to its box's corner: small coordinates whatever the file's origin, so the
  // products of the area round least.
  let ox = Infinity, oy = Infinity;
  for (let o = 0; o < p.length; o += 3) {
    ox = Math.min(ox, p[o] * t[0] + p[o + 1] * t[3] + p[o + 2] * t[6]);
    oy = Math.min(oy, p[o] * t[1] + p[o + 1] * t[4] + p[o + 2] * t[7]);
  }
  const v = new Float64Array(9);
  for (let f = 0, i = 0; f < ix.length; f += 3, i++) {
    if (Math.ceil((hi[i] + slack + lift) / layerHeight - 0.5) - 1 < Math.ceil((lo[i] - slack + lift) / layerHeight - 0.5)) continue;
    let zmin = Infinity, zmax = -Infinity;
    for (let k = 0; k < 3; k++) {
      const o = 3 * ix[f + k];
      const x = p[o], y = p[o + 1], z = p[o + 2];
      v[3 * k] = x * t[0] + y * t[3] + z * t[6] - ox;
      v[3 * k + 1] = x * t[1] + y * t[4] + z * t[7] - oy;
      v[3 * k + 2] = x * t[2] + y * t[5] + z * t[8] + t[11];
      zmin = Math.min(zmin, v[3 * k + 2]);
      zmax = Math.max(zmax, v[3 * k + 2]);
    }
    // Layers whose middle lies in [zmin, zmax): a vertex at the plane counts as below it.
    const k0 = Math.max(first, Math.ceil(zmin / layerHeight - 0.5));
    const k1 = Math.min(last, Math.ceil(zmax / layerHeight - 0.5) - 1);
    if (k1 < k0) continue;
    // Face normal's plan-view part, for the orientation of each crossing.
    const ux = v[3] - v[0], uy = v[4] - v[1], uz = v[5] - v[2];
    const wx = v[6] - v[0], wy = v[7] - v[1], wz = v[8] - v[2];
    const nx = uy * wz - uz * wy, ny = uz * wx - ux * wz;
    for (let k = k0; k <= k1; k++) {
      const c = (k + 0.5) * layerHeight;
      let n = 0;
      let ax = 0, ay = 0, bx = 0, by = 0;
      for (let e = 0; e < 3; e++) {
        const i = 3 * e, j = 3 * ((e + 1) % 3);
        const zi = v[i + 2], zj = v[j + 2];
        if ((zi > c) === (zj > c)) continue;
        const s = (c - zi) / (zj - zi);
        const x = v[i] + s * (v[j] - v[i]), y = v[i + 1] + s * (v[j + 1] - v[i + 1]);
        if (n === 0) {
          ax = x;
          ay = y;
        } else {
          bx = x;
          by = y;
        }
        n++;
      }
      if (n !== 2) continue;
      // Orient a -> b so that the outward normal (nx, ny) is on its right: (dy, -dx) . n > 0.
      const dx = bx - ax, dy = by - ay;
      const cross = ax * by - bx * ay;
      out[k - first] += (dy * nx - dx * ny >= 0 ? cross : -cross) * 0.5 * sign;
    }
  }
  return { first, sections: out };
}
