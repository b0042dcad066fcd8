/**
 * A bounding volume hierarchy of axis-aligned boxes over a mesh's triangles,
 * built once per part in its own coordinates. A quarter-turn rotation and a
 * translation map an axis-aligned box to an axis-aligned box exactly, so the
 * same tree serves every placement of the part: boxes and triangles are moved
 * on the fly. Queries: the smallest distance between two placed meshes below
 * a cap, whether one placed mesh blocks another's straight lift upwards, and
 * whether a point lies inside a closed mesh.
 */
import { rotationMatrix } from '../../geometry/rotations';
import type { PartMesh } from '../types';
import { triangleDistance } from './tri';

const LEAF = 4;

export interface Bvh {
  /** 9 numbers per triangle, in tree order (part coordinates). */
  tris: Float64Array;
  /** Per node: min xyz, max xyz. */
  boxes: Float64Array;
  /** Per node: first child (the second is first + 1), or -1 for a leaf. */
  child: Int32Array;
  /** Per leaf node: first triangle and count. */
  start: Int32Array;
  count: Int32Array;
  triangleCount: number;
}

export function buildBvh(mesh: PartMesh): Bvh {
  const { positions: p, indices: ix } = mesh;
  const n = ix.length / 3;
  const cen = new Float64Array(3 * n);
  const order = new Int32Array(n);
  for (let t = 0; t < n; t++) {
    order[t] = t;
    for (let a = 0; a < 3; a++) cen[3 * t + a] = (p[3 * ix[3 * t] + a] + p[3 * ix[3 * t + 1] + a] + p[3 * ix[3 * t + 2] + a]) / 3;
  }
  const maxNodes = Math.max(1, 2 * Math.ceil(n / LEAF) * 2);
  let boxes = new Float64Array(6 * maxNodes);
  let child = new Int32Array(maxNodes);
  let start = new Int32Array(maxNodes);
  let count = new Int32Array(maxNodes);
  let nodes = 0;
  const grow = () => {
    const m = boxes.length / 6;
    const b = new Float64Array(12 * m);
    b.set(boxes);
    boxes = b;
    const c = new Int32Array(2 * m);
    c.set(child);
    child = c;
    const s = new Int32Array(2 * m);
    s.set(start);
    start = s;
    const k = new Int32Array(2 * m);
    k.set(count);
    count = k;
  };
  const alloc = () => {
    if (nodes + 1 > boxes.length / 6) grow();
    return nodes++;
  };
  const stack: Array<[number, number, number]> = [];
  const root = alloc();
  stack.push([root, 0, n]);
  while (stack.length > 0) {
    const [node, lo, hi] = stack.pop()!;
    let mnx = Infinity, mny = Infinity, mnz = Infinity, mxx = -Infinity, mxy = -Infinity, mxz = -Infinity;
    let cmn0 = Infinity, cmn1 = Infinity, cmn2 = Infinity, cmx0 = -Infinity, cmx1 = -Infinity, cmx2 = -Infinity;
    for (let i = lo; i < hi; i++) {
      const t = order[i];
      for (let k = 0; k < 3; k++) {
        const v = 3 * ix[3 * t + k];
        const x = p[v], y = p[v + 1], z = p[v + 2];
        if (x < mnx) mnx = x;
        if (y < mny) mny = y;
        if (z < mnz) mnz = z;
        if (x > mxx) mxx = x;
        if (y > mxy) mxy = y;
        if (z > mxz) mxz = z;
      }
      const c0 = cen[3 * t], c1 = cen[3 * t + 1], c2 = cen[3 * t + 2];
      if (c0 < cmn0) cmn0 = c0;
      if (c1 < cmn1) cmn1 = c1;
      if (c2 < cmn2) cmn2 = c2;
      if (c0 > cmx0) cmx0 = c0;
      if (c1 > cmx1) cmx1 = c1;
      if (c2 > cmx2) cmx2 = c2;
    }
    boxes.set([mnx, mny, mnz, mxx, mxy, mxz], 6 * node);
    const spread = [cmx0 - cmn0, cmx1 - cmn1, cmx2 - cmn2];
    if (hi - lo <= LEAF || Math.max(...spread) <= 0) {
      child[node] = -1;
      start[node] = lo;
      count[node] = hi - lo;
      continue;
    }
    const axis = spread[0] >= spread[1] && spread[0] >= spread[2] ? 0 : spread[1] >= spread[2] ? 1 : 2;
    const mid = (lo + hi) >> 1;
    // Median split (quickselect on the centroids along the axis).
    let l = lo, r = hi - 1;
    while (l < r) {
      const pivot = cen[3 * order[(l + r) >> 1] + axis];
      let i = l, j = r;
      while (i <= j) {
        while (cen[3 * order[i] + axis] < pivot) i++;
        while (cen[3 * order[j] + axis] > pivot) j--;
        if (i <= j) {
          const tmp = order[i];
          order[i] = order[j];
          order[j] = tmp;
          i++;
          j--;
        }
      }
      if (mid <= j) r = j;
      else if (mid >= i) l = i;
      else break;
    }
    const a = alloc();
    const b = alloc();
    if (b !== a + 1) throw new Error('bvh: children must be adjacent');
    child[node] = a;
    stack.push([a, lo, mid], [b, mid, hi]);
  }
  const tris = new Float64Array(9 * n);
  for (let i = 0; i < n; i++) {
    const t = order[i];
    for (let k = 0; k < 3; k++) {
      const v = 3 * ix[3 * t + k];
      tris[9 * i + 3 * k] = p[v];
      tris[9 * i + 3 * k + 1] = p[v + 1];
      tris[9 * i + 3 * k + 2] = p[v + 2];
    }
  }
  return { tris, boxes: boxes.slice(0, 6 * nodes), child: child.slice(0, nodes), start: start.slice(0, nodes), count: count.slice(0, nodes), triangleCount: n };
}

/** A part's tree placed by a rotation (index 0..23) and a translation: chamber = R part + t. */
export class PlacedBvh {
  readonly col = new Int32Array(3);
  readonly sign = new Float64Array(3);
  readonly t = new Float64Array(3);
  /** The placed mesh's bounding box. */
  readonly min = new Float64Array(3);
  readonly max = new Float64Array(3);

  constructor(
    readonly bvh: Bvh,
    rotation: number,
    translation: readonly number[],
  ) {
    const m = rotationMatrix(rotation);
    for (let r = 0; r < 3; r++) {
      for (let c = 0; c < 3; c++) {
        if (m[3 * r + c] !== 0) {
          this.col[r] = c;
          this.sign[r] = m[3 * r + c];
        }
      }
      this.t[r] = translation[r];
    }
    this.nodeBox(0, this.min, this.max);
  }

  nodeBox(node: number, mn: Float64Array | number[], mx: Float64Array | number[]): void {
    const b = this.bvh.boxes;
    for (let r = 0; r < 3; r++) {
      const c = this.col[r];
      if (this.sign[r] > 0) {
        mn[r] = b[6 * node + c] + this.t[r];
        mx[r] = b[6 * node + 3 + c] + this.t[r];
      } else {
        mn[r] = -b[6 * node + 3 + c] + this.t[r];
        mx[r] = -b[6 * node + c] + this.t[r];
      }
    }
  }

  /** Writes triangle i (tree order) in chamber coordinates to out[at..at+8]. */
  triangle(i: number, out: Float64Array, at: number): void {
    const s = this.bvh.tris;
    for (let k = 0; k < 3; k++) {
      const o = 9 * i + 3 * k;
      for (let r = 0; r < 3; r++) out[at + 3 * k + r] = this.sign[r] * s[o + this.col[r]] + this.t[r];
    }
  }
}

function boxGap(a0: Float64Array, a1: Float64Array, b0: Float64Array, b1: Float64Array): number {
  let d2 = 0;
  for (let r = 0; r < 3; r++) {
    const g = Math.max(b0[r] - a1[r], a0[r] - b1[r], 0);
    d2 += g * g;
  }
  return Math.sqrt(d2);
}

/** A placed triangle's box: min x, y, z then max x, y, z. */
function triangleBox(t: Float64Array, at: number, out: Float64Array, o: number): void {
  for (let a = 0; a < 3; a++) {
    out[o + a] = Math.min(t[at + a], t[at + 3 + a], t[at + 6 + a]);
    out[o + 3 + a] = Math.max(t[at + a], t[at + 3 + a], t[at + 6 + a]);
  }
}

/** A placed triangle's plane: its unit normal and offset (all zero for a triangle without area). */
function trianglePlane(t: Float64Array, at: number, out: Float64Array, o: number): void {
  const ux = t[at + 3] - t[at], uy = t[at + 4] - t[at + 1], uz = t[at + 5] - t[at + 2];
  const vx = t[at + 6] - t[at], vy = t[at + 7] - t[at + 1], vz = t[at + 8] - t[at + 2];
  const nx = uy * vz - uz * vy, ny = uz * vx - ux * vz, nz = ux * vy - uy * vx;
  const len = Math.sqrt(nx * nx + ny * ny + nz * nz);
  if (!(len > 1e-300)) {
    out.fill(0, o, o + 4);
    return;
  }
  out[o] = nx / len;
  out[o + 1] = ny / len;
  out[o + 2] = nz / len;
  out[o + 3] = -(out[o] * t[at] + out[o + 1] * t[at + 1] + out[o + 2] * t[at + 2]);
}

/**
 * How far triangle t lies from a plane when wholly on one side of it, else 0: a lower bound of its distance to any
 * triangle in that plane (every point of t is at least that far from every point of the plane).
 */
function sideGap(plane: Float64Array, o: number, t: Float64Array, at: number): number {
  const nx = plane[o], ny = plane[o + 1], nz = plane[o + 2], w = plane[o + 3];
  const d0 = nx * t[at] + ny * t[at + 1] + nz * t[at + 2] + w;
  const d1 = nx * t[at + 3] + ny * t[at + 4] + nz * t[at + 5] + w;
  const d2 = nx * t[at + 6] + ny * t[at + 7] + nz * t[at + 8] + w;
  if (d0 > 0 && d1 > 0 && d2 > 0) return Math.min(d0, d1, d2);
  if (d0 < 0 && d1 < 0 && d2 < 0) return -Math.max(d0, d1, d2);
  return 0;
}

/**
 * The smallest distance between the surfaces of A and B if it is below `cap`,
 * else `cap`. With `stopBelow`, the search ends as soon as a distance below it
 * is found (that distance is returned). With `halt`, asked every 256 pairs of
 * leaves, the search gives up when it says so and returns NaN (two finely
 * tessellated meshes nested within the cap over their whole surfaces take
 * seconds).
 */
export function surfaceDistance(A: PlacedBvh, B: PlacedBvh, cap: number, stopBelow = -Infinity, halt?: () => boolean): number {
  let best = cap;
  let leaves = 0;
  const amn = new Float64Array(3), amx = new Float64Array(3), bmn = new Float64Array(3), bmx = new Float64Array(3);
  const ta = new Float64Array(9), boxA = new Float64Array(6);
  // B's leaf, placed once per pair of leaves, with each triangle's box and plane: a pair of triangles whose boxes
  // are already further apart than the best so far needs no exact distance, nor a pair of which one lies wholly on
  // one side of the other's plane, that far from it (on sloping walls nested in each other, the triangles' boxes
  // are loose and the planes decide: 15 to 80 times fewer exact distances for a tapered cup in a copy of itself).
  let tb = new Float64Array(9 * 8);
  let boxesB = new Float64Array(6 * 8);
  let planesB = new Float64Array(4 * 8);
  const planeA = new Float64Array(4);
  const stack: number[] = [0, 0];
  while (stack.length > 0) {
    const nb = stack.pop()!;
    const na = stack.pop()!;
    A.nodeBox(na, amn, amx);
    B.nodeBox(nb, bmn, bmx);
    if (boxGap(amn, amx, bmn, bmx) >= best) continue;
    const ca = A.bvh.child[na];
    const cb = B.bvh.child[nb];
    if (ca < 0 && cb < 0) {
      if (halt && (++leaves & 255) === 0 && halt()) return NaN;
      const sa = A.bvh.start[na], ea = sa + A.bvh.count[na];
      const sb = B.bvh.start[nb], m = B.bvh.count[nb];
      if (tb.length < 9 * m) {
        tb = new Float64Array(9 * m);
        boxesB = new Float64Array(6 * m);
        planesB = new Float64Array(4 * m);
      }
      for (let j = 0; j < m; j++) {
        B.triangle(sb + j, tb, 9 * j);
        triangleBox(tb, 9 * j, boxesB, 6 * j);
        trianglePlane(tb, 9 * j, planesB, 4 * j);
      }
      for (let i = sa; i < ea; i++) {
        A.triangle(i, ta, 0);
        triangleBox(ta, 0, boxA, 0);
        trianglePlane(ta, 0, planeA, 0);
        for (let j = 0; j < m; j++) {
          const o = 6 * j;
          const dx = Math.max(boxesB[o] - boxA[3], boxA[0] - boxesB[o + 3], 0);
          const dy = Math.max(boxesB[o + 1] - boxA[4], boxA[1] - boxesB[o + 4], 0);
          const dz = Math.max(boxesB[o + 2] - boxA[5], boxA[2] - boxesB[o + 5], 0);
          if (dx * dx + dy * dy + dz * dz >= best * best) continue;
          if (sideGap(planeA, 0, tb, 9 * j) >= best || sideGap(planesB, 4 * j, ta, 0) >= best) continue;
          const d = triangleDistance(ta, 0, tb, 9 * j);
          if (d < best) {
            best = d;
            if (best < stopBelow) return best;
          }
        }
      }
      continue;
    }
    // Split the larger node (by box diagonal), or the one that is not a leaf.
    const sizeA = amx[0] - amn[0] + amx[1] - amn[1] + amx[2] - amn[2];
    const sizeB = bmx[0] - bmn[0] + bmx[1] - bmn[1] + bmx[2] - bmn[2];
    if (cb < 0 || (ca >= 0 && sizeA >= sizeB)) stack.push(ca, nb, ca + 1, nb);
    else stack.push(na, cb, na, cb + 1);
  }
  return best;
}

/**
 * Would lifting A straight up (+z) run into B? True when somewhere B's
 * material lies above A's over a patch of positive area in plan view (more
 * than `tol` higher). Parts that only slide past each other's sides do not block.
 * With `halt` (asked every 1,024 pairs of tree nodes): null when it stopped the
 * search, the answer unknown. Two finely tessellated cones nested in each other
 * (a stack of cups) keep most pairs of leaves overlapping in plan: 80,000
 * triangles a cup took 31 s.
 */
export function blocksLift(A: PlacedBvh, B: PlacedBvh, tol: number, halt?: () => boolean): boolean | null {
  let visits = 0;
  const amn = new Float64Array(3), amx = new Float64Array(3), bmn = new Float64Array(3), bmx = new Float64Array(3);
  const ta = new Float64Array(9), tb = new Float64Array(9);
  const stack: number[] = [0, 0];
  while (stack.length > 0) {
    if (halt && (++visits & 1023) === 0 && halt()) return null;
    const nb = stack.pop()!;
    const na = stack.pop()!;
    A.nodeBox(na, amn, amx);
    B.nodeBox(nb, bmn, bmx);
    if (bmx[2] <= amn[2] + tol) continue;
    if (bmn[0] >= amx[0] - tol || amn[0] >= bmx[0] - tol || bmn[1] >= amx[1] - tol || amn[1] >= bmx[1] - tol) continue;
    const ca = A.bvh.child[na];
    const cb = B.bvh.child[nb];
    if (ca < 0 && cb < 0) {
      const sa = A.bvh.start[na], ea = sa + A.bvh.count[na];
      const sb = B.bvh.start[nb], eb = sb + B.bvh.count[nb];
      for (let i = sa; i < ea; i++) {
        A.triangle(i, ta, 0);
        for (let j = sb; j < eb; j++) {
          B.triangle(j, tb, 0);
          if (aboveOver(ta, tb, tol)) return true;
        }
      }
      continue;
    }
    const sizeA = amx[0] - amn[0] + amx[1] - amn[1];
    const sizeB = bmx[0] - bmn[0] + bmx[1] - bmn[1];
    if (cb < 0 || (ca >= 0 && sizeA >= sizeB)) stack.push(ca, nb, ca + 1, nb);
    else stack.push(na, cb, na, cb + 1);
  }
  return false;
}

/** Signed area of a 2D polygon given as flat xy pairs. */
function area2(poly: number[]): number {
  let s = 0;
  const n = poly.length / 2;
  for (let i = 0; i < n; i++) {
    const j = (i + 1) % n;
    s += poly[2 * i] * poly[2 * j + 1] - poly[2 * j] * poly[2 * i + 1];
  }
  return s / 2;
}

/** z of the plane through triangle t (9 numbers) at (x, y); the triangle must not be vertical. */
function zOn(t: Float64Array, x: number, y: number): number {
  const ux = t[3] - t[0], uy = t[4] - t[1], uz = t[5] - t[2];
  const vx = t[6] - t[0], vy = t[7] - t[1], vz = t[8] - t[2];
  const nx = uy * vz - uz * vy, ny = uz * vx - ux * vz, nz = ux * vy - uy * vx;
  return t[2] - (nx * (x - t[0]) + ny * (y - t[1])) / nz;
}

/** Over the plan-view overlap of triangles a and b (positive area), is b anywhere more than tol above a? */
function aboveOver(a: Float64Array, b: Float64Array, tol: number): boolean {
  // Every point of the overlap lies on both triangles, so within their heights: b's highest no more than tol
  // above a's lowest answers at once; and plan boxes that do not overlap have no overlap to look at.
  if (Math.max(b[2], b[5], b[8]) - Math.min(a[2], a[5], a[8]) <= tol) return false;
  if (Math.max(a[0], a[3], a[6]) <= Math.min(b[0], b[3], b[6]) || Math.max(b[0], b[3], b[6]) <= Math.min(a[0], a[3], a[6])) return false;
  if (Math.max(a[1], a[4], a[7]) <= Math.min(b[1], b[4], b[7]) || Math.max(b[1], b[4], b[7]) <= Math.min(a[1], a[4], a[7])) return false;
  const pa = [a[0], a[1], a[3], a[4], a[6], a[7]];
  const pb = [b[0], b[1], b[3], b[4], b[6], b[7]];
  const sa = area2(pa);
  const sb = area2(pb);
  const AREA = 1e-10;
  if (Math.abs(sa) < AREA || Math.abs(sb) < AREA) return false;
  // Clip a's projection by b's three edges (Sutherland–Hodgman), b taken counter-clockwise.
  const ccw = sb > 0 ? pb : [pb[0], pb[1], pb[4], pb[5], pb[2], pb[3]];
  let poly = pa;
  for (let e = 0; e < 3 && poly.length >= 6; e++) {
    const x0 = ccw[2 * e], y0 = ccw[2 * e + 1], x1 = ccw[(2 * e + 2) % 6], y1 = ccw[(2 * e + 3) % 6];
    const ex = x1 - x0, ey = y1 - y0;
    const out: number[] = [];
    const n = poly.length / 2;
    for (let i = 0; i < n; i++) {
      const j = (i + 1) % n;
      const xi = poly[2 * i], yi = poly[2 * i + 1], xj = poly[2 * j], yj = poly[2 * j + 1];
      // Which side of the edge each end is on (no closure here: this runs for every pair of triangles).
      const si = ex * (yi - y0) - ey * (xi - x0), sj = ex * (yj - y0) - ey * (xj - x0);
      if (si >= 0) out.push(xi, yi);
      if ((si >= 0) !== (sj >= 0)) {
        const t = si / (si - sj);
        out.push(xi + t * (xj - xi), yi + t * (yj - yi));
      }
    }
    poly = out;
  }
  if (poly.length < 6 || Math.abs(area2(poly)) < AREA) return false;
  for (let i = 0; i < poly.length; i += 2) {
    if (zOn(b, poly[i], poly[i + 1]) - zOn(a, poly[i], poly[i + 1]) > tol) return true;
  }
  return false;
}

/** Is point q inside the closed placed mesh M? Ray parity along +z, the point nudged off edges by irrational offsets. */
export function containsPoint(M: PlacedBvh, q: readonly number[]): boolean {
  const x = q[0] + 1.3e-7 * Math.SQRT2, y = q[1] + 1.1e-7 * Math.PI, z = q[2];
  const mn = new Float64Array(3), mx = new Float64Array(3);
  const t = new Float64Array(9);
  let crossings = 0;
  const stack = [0];
  while (stack.length > 0) {
    const node = stack.pop()!;
    M.nodeBox(node, mn, mx);
    if (x < mn[0] || x > mx[0] || y < mn[1] || y > mx[1] || mx[2] < z) continue;
    const c = M.bvh.child[node];
    if (c >= 0) {
      stack.push(c, c + 1);
      continue;
    }
    for (let i = M.bvh.start[node], e = i + M.bvh.count[node]; i < e; i++) {
      M.triangle(i, t, 0);
      const d1 = (t[3] - t[0]) * (y - t[1]) - (t[4] - t[1]) * (x - t[0]);
      const d2 = (t[6] - t[3]) * (y - t[4]) - (t[7] - t[4]) * (x - t[3]);
      const d3 = (t[0] - t[6]) * (y - t[7]) - (t[1] - t[7]) * (x - t[6]);
      const inside = (d1 > 0 && d2 > 0 && d3 > 0) || (d1 < 0 && d2 < 0 && d3 < 0);
      if (inside && zOn(t, x, y) > z) crossings++;
    }
  }
  return crossings % 2 === 1;
}
