// Over 450 lines: one computation (plane-triangle cuts, areas and contours per rotation, layout sums) whose steps share their typed arrays.
/**
 * Cross-sections of a triangle mesh with horizontal planes: the area and the
 * contour length of the solid at the middle of every layer, for a part in any
 * of its 24 quarter-turn rotations, and a placed layout's per-layer sums.
 *
 * Exact to the triangle soup: every triangle that a plane crosses contributes
 * one directed segment of the section's boundary, and the section's area is
 * the shoelace sum over those segments (Green's theorem:
 * A = 1/2 sum (x_a y_b - x_b y_a) over the boundary's directed edges). For a
 * closed, consistently oriented mesh the segments chain into closed loops,
 * outer loops counter-clockwise seen from +z and holes clockwise, so the sum
 * is the loops' signed polygon areas added up; no chaining is needed for the
 * total, and `sliceLoops` does the chaining for one plane when the loops
 * themselves are wanted. The contour length is the sum of the segment lengths.
 *
 * Segment direction: the solid lies to the left of the travel, i.e. along
 * ez x n for a triangle with outward normal n. Walking the triangle's
 * counter-clockwise edges, the edge that goes from above the plane to below it
 * gives the segment's start and the edge that goes from below to above its end.
 *
 * Vertices on a plane: a vertex counts as above a plane when its height is
 * greater than or equal to the plane's (a symbolic perturbation of the plane
 * downwards). Every triangle then meets a plane in a single segment or not at
 * all, neighbours agree on the shared edge's point (it is computed from the
 * edge's two ends in a fixed order: from the vertex below to the vertex
 * above), and a face lying in the plane is counted as the section just below
 * it. So a flat top exactly at a plane's height counts in that layer, a flat
 * bottom there does not.
 *
 * Speed: each triangle is binned straight into the planes its height range
 * spans (uniform planes need no search), so the work is O(triangles +
 * crossings) with no sort and no per-plane lists; positions stay in the
 * mesh's typed arrays.
 *
 * Only the rotation's vertical axis changes the profile: the 24 rotations
 * give 6 profiles (part +x, -x, +y, -y, +z or -z up), since turning a
 * section within its plane keeps its area and length.
 */
import { rotationMatrix, ROTATION_COUNT } from './rotations';
import type { MeshData } from './types';

/** Which of the part's own axes points up (0 x, 1 y, 2 z) and whether reversed. */
export interface UpAxis {
  axis: 0 | 1 | 2;
  sign: 1 | -1;
}

/** The part's own axis that a rotation (index 0..23) turns to chamber +z. */
export function upAxisOfRotation(rotation: number): UpAxis {
  if (!Number.isInteger(rotation) || rotation < 0 || rotation >= ROTATION_COUNT) {
    throw new RangeError(`rotation index ${rotation} is not 0..23`);
  }
  const m = rotationMatrix(rotation);
  const axis = ([0, 1, 2] as const).find((c) => m[6 + c] !== 0)!;
  return { axis, sign: m[6 + axis] > 0 ? 1 : -1 };
}

/** The up axis of a 3MF transform (row vectors: chamber z = x m02 + y m12 + z m22 + m32). */
export function upAxisOfTransform(t: ArrayLike<number>): UpAxis {
  const col = [t[2], t[5], t[8]];
  let axis: 0 | 1 | 2 = 0;
  for (const c of [1, 2] as const) if (Math.abs(col[c]) > Math.abs(col[axis])) axis = c;
  const others = col.filter((_, c) => c !== axis);
  if (Math.abs(Math.abs(col[axis]) - 1) > 1e-9 || others.some((v) => Math.abs(v) > 1e-9)) {
    throw new RangeError('transform is not a quarter-turn rotation (its z column must be one signed unit axis)');
  }
  return { axis, sign: col[axis] > 0 ? 1 : -1 };
}

/** In-plane axes (u, v) such that (u, v, up) is right-handed, so sections keep their orientation. */
function planeAxes(up: UpAxis): [number, number] {
  const u = (up.axis + 1) % 3;
  const v = (up.axis + 2) % 3;
  return up.sign > 0 ? [u, v] : [v, u];
}

/** Extent of the part along an up axis: [lowest, highest] of sign x coordinate. */
export function upRange(mesh: MeshData, up: UpAxis): [number, number] {
  const p = mesh.positions;
  let lo = Infinity;
  let hi = -Infinity;
  for (let i = up.axis; i < p.length; i += 3) {
    const w = up.sign * p[i];
    if (w < lo) lo = w;
    if (w > hi) hi = w;
  }
  return [lo, hi];
}

export interface SectionProfile {
  /** Signed section area (mm^2) at each plane; positive for an outward-oriented solid. */
  areaMm2: Float64Array;
  /** Total contour length (mm) at each plane: outer loops and holes. */
  contourMm: Float64Array;
}

/**
 * Sections at the planes w = firstMm + k stepMm (k = 0..count-1), where w is the
 * height along `up` in the part's own coordinates (sign x coordinate, no shift).
 */
export function sliceAlong(mesh: MeshData, up: UpAxis, firstMm: number, stepMm: number, count: number): SectionProfile {
  if (!(stepMm > 0) || !Number.isFinite(firstMm) || !Number.isInteger(count) || count < 0) {
    throw new RangeError('slice planes need a finite first height, a positive step and a whole count');
  }
  const areaMm2 = new Float64Array(count);
  const contourMm = new Float64Array(count);
  if (count === 0) return { areaMm2, contourMm };
  const planes = new Float64Array(count);
  for (let k = 0; k < count; k++) planes[k] = firstMm + k * stepMm;

  const p = mesh.positions;
  const idx = mesh.indices;
  const a = up.axis;
  const s = up.sign;
  const [ua, va] = planeAxes(up);
  // Shoelace sums cancel large terms far from the origin: measure from the middle of the part.
  let cu = 0;
  let cv = 0;
  {
    let minU = Infinity;
    let maxU = -Infinity;
    let minV = Infinity;
    let maxV = -Infinity;
    for (let i = 0; i < p.length; i += 3) {
      const uu = p[i + ua];
      const vv = p[i + va];
      if (uu < minU) minU = uu;
      if (uu > maxU) maxU = uu;
      if (vv < minV) minV = vv;
      if (vv > maxV) maxV = vv;
    }
    if (p.length > 0) {
      cu = (minU + maxU) / 2;
      cv = (minV + maxV) / 2;
    }
  }

  // The part's own coordinates turned once into (u, v, w) per vertex, so the loop below reads flat arrays.
  const vertexCount = Math.floor(p.length / 3);
  const W = new Float64Array(vertexCount);
  const U = new Float64Array(vertexCount);
  const V = new Float64Array(vertexCount);
  for (let i = 0; i < vertexCount; i++) {
    W[i] = s * p[3 * i + a];
    U[i] = p[3 * i + ua] - cu;
    V[i] = p[3 * i + va] - cv;
  }

  const last = count - 1;
  for (let f = 0; f + 2 < idx.length; f += 3) {
    const i0 = idx[f];
    const i1 = idx[f + 1];
    const i2 = idx[f + 2];
    const w0 = W[i0];
    const w1 = W[i1];
    const w2 = W[i2];
    const wMin = w0 < w1 ? (w0 < w2 ? w0 : w2) : w1 < w2 ? w1 : w2;
    const wMax = w0 > w1 ? (w0 > w2 ? w0 : w2) : w1 > w2 ? w1 : w2;
    // Planes with wMin < plane <= wMax cross the triangle (a vertex on the plane is above it).
    let k0 = Math.floor((wMin - firstMm) / stepMm) + 1;
    if (k0 > last) continue;
    if (k0 < 0) k0 = 0;
    while (k0 > 0 && planes[k0 - 1] > wMin) k0--;
    while (k0 <= last && planes[k0] <= wMin) k0++;
    if (k0 > last || planes[k0] > wMax) continue;
    let k1 = Math.floor((wMax - firstMm) / stepMm);
    if (k1 > last) k1 = last;
    if (k1 < k0) k1 = k0;
    while (k1 < last && planes[k1 + 1] <= wMax) k1++;
    while (k1 >= k0 && planes[k1] > wMax) k1--;

    for (let k = k0; k <= k1; k++) {
      const z = planes[k];
      const mask = (w0 < z ? 1 : 0) | (w1 < z ? 2 : 0) | (w2 < z ? 4 : 0);
      // L is the vertex alone on its side, A and B follow it counter-clockwise. The edges L-A and B-L cross.
      let l: number;
      let aa: number;
      let bb: number;
      switch (mask) {
        case 1:
        case 6:
          l = i0;
          aa = i1;
          bb = i2;
          break;
        case 2:
        case 5:
          l = i1;
          aa = i2;
          bb = i0;
          break;
        default:
          l = i2;
          aa = i0;
          bb = i1;
      }
      const lBelow = mask === 1 || mask === 2 || mask === 4;
      // Start: where the walk goes from above to below; end: from below to above. Each point is taken on its
      // edge from the vertex below to the vertex above.
      let lo1: number;
      let hi1: number;
      let lo2: number;
      let hi2: number;
      if (lBelow) {
        lo1 = l; // start on B-L
        hi1 = bb;
        lo2 = l; // end on L-A
        hi2 = aa;
      } else {
        lo1 = aa; // start on L-A
        hi1 = l;
        lo2 = bb; // end on B-L
        hi2 = l;
      }
      let su: number;
      let sv: number;
      let eu: number;
      let ev: number;
      if (W[hi1] === z) {
        su = U[hi1];
        sv = V[hi1];
      } else {
        const t = (z - W[lo1]) / (W[hi1] - W[lo1]);
        su = U[lo1] + t * (U[hi1] - U[lo1]);
        sv = V[lo1] + t * (V[hi1] - V[lo1]);
      }
      if (W[hi2] === z) {
        eu = U[hi2];
        ev = V[hi2];
      } else {
        const t = (z - W[lo2]) / (W[hi2] - W[lo2]);
        eu = U[lo2] + t * (U[hi2] - U[lo2]);
        ev = V[lo2] + t * (V[hi2] - V[lo2]);
      }
      areaMm2[k] += 0.5 * (su * ev - eu * sv);
      const du = eu - su;
      const dv = ev - sv;
      contourMm[k] += Math.sqrt(du * du + dv * dv);
    }
  }
  return { areaMm2, contourMm };
}

/** A part's profile in one rotation, its lowest point on z = 0, sliced at the middle of every layer. */
export interface PartProfile extends SectionProfile {
  layerHeightMm: number;
  /** The rotated part's height; areaMm2[k] is the section at (k + 1/2) layerHeightMm above its lowest point. */
  heightMm: number;
}

/**
 * The part in rotation `rotation` (0..23), resting on z = 0, sliced at the
 * middle of each layer of `layerHeightMm`: ceil(height / layer) planes.
 */
export function slicePart(mesh: MeshData, rotation: number, layerHeightMm: number): PartProfile {
  if (!(layerHeightMm > 0) || !Number.isFinite(layerHeightMm)) throw new RangeError('layer height must be a positive number');
  const up = upAxisOfRotation(rotation);
  const [lo, hi] = upRange(mesh, up);
  if (!(hi >= lo)) return { layerHeightMm, heightMm: 0, areaMm2: new Float64Array(0), contourMm: new Float64Array(0) };
  const heightMm = hi - lo;
  const count = Math.max(1, Math.ceil(heightMm / layerHeightMm - 1e-9));
  const s = sliceAlong(mesh, up, lo + layerHeightMm / 2, layerHeightMm, count);
  return { layerHeightMm, heightMm, ...s };
}

/** One closed (or, for a mesh with holes in its surface, open) boundary loop of a section. */
export interface SectionLoop {
  /** x, y pairs in the rotated part's coordinates (chamber axes), in walking order. */
  points: Float64Array;
  closed: boolean;
  /** Signed shoelace area: positive for an outer boundary, negative for a hole. Open loops are closed by their chord. */
  areaMm2: number;
  lengthMm: number;
}

/**
 * The section of the part turned by `rotation` with the plane z = zMm (z of
 * the rotated part, R p, unshifted), chained into loops. Segment ends are
 * matched exactly (shared edges give the same point), so a closed, oriented
 * mesh gives closed loops.
 */
export function sliceLoops(mesh: MeshData, rotation: number, zMm: number): SectionLoop[] {
  const m = rotationMatrix(rotation);
  const p = mesh.positions;
  const idx = mesh.indices;
  const rot = (o: number, row: number) => m[3 * row] * p[o] + m[3 * row + 1] * p[o + 1] + m[3 * row + 2] * p[o + 2];
  const segs: number[] = []; // su, sv, eu, ev
  const x = [0, 0, 0];
  const y = [0, 0, 0];
  const w = [0, 0, 0];
  for (let f = 0; f + 2 < idx.length; f += 3) {
    for (let c = 0; c < 3; c++) {
      const o = 3 * idx[f + c];
      x[c] = rot(o, 0);
      y[c] = rot(o, 1);
      w[c] = rot(o, 2);
    }
    const below = w.map((h) => h < zMm);
    if (below[0] === below[1] && below[1] === below[2]) continue;
    let s: [number, number] = [0, 0];
    let e: [number, number] = [0, 0];
    for (let c = 0; c < 3; c++) {
      const d = (c + 1) % 3;
      if (below[c] === below[d]) continue;
      const lo = below[c] ? c : d;
      const hi = below[c] ? d : c;
      const t = (zMm - w[lo]) / (w[hi] - w[lo]);
      const pt: [number, number] = w[hi] === zMm ? [x[hi], y[hi]] : [x[lo] + t * (x[hi] - x[lo]), y[lo] + t * (y[hi] - y[lo])];
      if (below[c]) e = pt;
      else s = pt;
    }
    segs.push(s[0], s[1], e[0], e[1]);
  }
  const n = segs.length / 4;
  const key = (u: number, v: number) => `${u},${v}`;
  const byStart = new Map<string, number[]>();
  for (let i = 0; i < n; i++) {
    const k = key(segs[4 * i], segs[4 * i + 1]);
    const list = byStart.get(k);
    if (list) list.push(i);
    else byStart.set(k, [i]);
  }
  const used = new Uint8Array(n);
  const take = (k: string): number => {
    const list = byStart.get(k);
    while (list && list.length > 0) {
      const i = list.pop()!;
      if (!used[i]) return i;
    }
    return -1;
  };
  // Open chains (a mesh with holes in its surface) are walked from their heads, so each comes out whole;
  // a head is a segment whose start no other segment ends at.
  const ends = new Set<string>();
  for (let i = 0; i < n; i++) ends.add(key(segs[4 * i + 2], segs[4 * i + 3]));
  const order: number[] = [];
  for (let i = 0; i < n; i++) if (!ends.has(key(segs[4 * i], segs[4 * i + 1]))) order.push(i);
  for (let i = 0; i < n; i++) order.push(i);
  const loops: SectionLoop[] = [];
  for (const first of order) {
    if (used[first]) continue;
    const pts: number[] = [];
    used[first] = 1;
    const startKey = key(segs[4 * first], segs[4 * first + 1]);
    pts.push(segs[4 * first], segs[4 * first + 1]);
    let cur = first;
    let closed = false;
    for (;;) {
      const eu = segs[4 * cur + 2];
      const ev = segs[4 * cur + 3];
      const k = key(eu, ev);
      if (k === startKey) {
        closed = true;
        break;
      }
      pts.push(eu, ev);
      const next = take(k);
      if (next < 0) break;
      used[next] = 1;
      cur = next;
    }
    const points = Float64Array.from(pts);
    let area = 0;
    let length = 0;
    const count = points.length / 2;
    for (let i = 0; i < count; i++) {
      const j = (i + 1) % count;
      area += points[2 * i] * points[2 * j + 1] - points[2 * j] * points[2 * i + 1];
      if (closed || j !== 0) length += Math.hypot(points[2 * j] - points[2 * i], points[2 * j + 1] - points[2 * i + 1]);
    }
    loops.push({ points, closed, areaMm2: area / 2, lengthMm: length });
  }
  return loops;
}

/**
 * Cached section profiles. A profile depends on the mesh (named by `key`, e.g.
 * the file's hash and the part's index in it), the up axis (6 of the 24
 * rotations' worth), the layer height and where the layer planes fall on the
 * part (its height modulo the layer height), so a part repeated at the same
 * phase is sliced once. Oldest entries go first when the cache is full.
 */
export class SliceCache {
  private entries = new Map<string, SectionProfile & { first: number }>();
  hits = 0;
  misses = 0;

  constructor(private readonly maxEntries = 2000) {}

  get size(): number {
    return this.entries.size;
  }

  /** Sections at the planes first + k step (k = 0..count-1) along `up`. */
  sections(key: string, mesh: MeshData, up: UpAxis, firstMm: number, stepMm: number, count: number): SectionProfile {
    // The first plane to a nanometre names the phase; a profile for the same phase serves any placement of it.
    const k = `${key}|${up.sign > 0 ? '+' : '-'}${'xyz'[up.axis]}|${stepMm}|${Math.round(firstMm * 1e6)}|${count}`;
    const found = this.entries.get(k);
    if (found) {
      this.hits++;
      this.entries.delete(k);
      this.entries.set(k, found);
      return found;
    }
    this.misses++;
    const made = { ...sliceAlong(mesh, up, firstMm, stepMm, count), first: firstMm };
    this.entries.set(k, made);
    while (this.entries.size > this.maxEntries) this.entries.delete(this.entries.keys().next().value!);
    return made;
  }

  clear(): void {
    this.entries.clear();
  }
}

/** A part of a layout: its mesh (null when unknown or unusable: counted by its box) and a cache key. */
export interface ProfileSource {
  /** Names the mesh for the cache (the stored file's hash and the part's index in the file). */
  key: string;
  mesh: MeshData | null;
}

/** One placed part: which source, its 3MF transform (file coordinates to chamber), and its placed box as a fallback. */
export interface ProfilePlacement {
  part: number;
  /** 3MF row-vector transform with a quarter-turn rotation; when left out the part is counted by its box. */
  transform?: ArrayLike<number> | null;
  /** The placed bounding box (minimum corner and extent, chamber mm). */
  position: ArrayLike<number>;
  size: ArrayLike<number>;
}

export interface LayoutProfiles {
  /** Summed section area (mm^2) at the middle of each layer, layer 0 on the chamber floor. */
  areaProfile: Float64Array;
  /** Summed contour length (mm) at the middle of each layer. */
  contourProfile: Float64Array;
  /** Placements counted by their sliced mesh. */
  meshPlacements: number;
  /** Placements counted by their bounding box (no mesh or no transform). */
  boxPlacements: number;
}

/**
 * A placed layout's area and contour per layer: each placed part's sections at
 * the layout's own layer middles, z = (L + 1/2) h for L = 0..layers-1.
 *
 * Exact at any placement height: a part placed at chamber height tz (its file
 * coordinates moved by the transform) is sliced at the planes
 * w = (L + 1/2) h - tz in its own coordinates, so the layout's planes are
 * used directly, whether or not tz is a multiple of h; there is no
 * resampling. Placements at the same phase share one cached slicing.
 *
 * A part without a mesh or a transform counts as its box: its footprint's
 * area and perimeter in every layer whose middle lies inside it (same plane
 * rule: bottom face excluded, top face included).
 */
export function layoutProfiles(input: {
  parts: readonly ProfileSource[];
  placements: readonly ProfilePlacement[];
  layerHeightMm: number;
  layers: number;
  cache?: SliceCache;
}): LayoutProfiles {
  const { parts, placements, layerHeightMm: h, layers } = input;
  if (!(h > 0) || !Number.isFinite(h)) throw new RangeError('layer height must be a positive number');
  if (!Number.isInteger(layers) || layers < 0) throw new RangeError('layers must be a whole number');
  const cache = input.cache ?? new SliceCache();
  const areaProfile = new Float64Array(layers);
  const contourProfile = new Float64Array(layers);
  const ranges = new Map<string, [number, number]>();
  let meshPlacements = 0;
  let boxPlacements = 0;
  const mid = (L: number) => (L + 0.5) * h;

  placements.forEach((pl, i) => {
    const source = parts[pl.part];
    if (!source) throw new RangeError(`placements[${i}].part ${pl.part} names no part`);
    const t = pl.transform;
    if (source.mesh && t && t.length === 12) {
      const up = upAxisOfTransform(t);
      const rk = `${source.key}|${up.axis}|${up.sign}`;
      let range = ranges.get(rk);
      if (!range) {
        range = upRange(source.mesh, up);
        ranges.set(rk, range);
      }
      const tz = t[11];
      // Layer L's middle is at w = (L + 1/2) h - tz in the part's own coordinates. Where those planes fall on the
      // part (its phase) is taken from its bottom, so copies at the same phase name the same cached slicing;
      // the first plane is one below the bottom (it cuts nothing) so that rounding of the phase loses no layer.
      let off = (((mid(0) - tz - range[0]) % h) + h) % h;
      if (off > h - 1e-9) off = 0;
      const firstMm = range[0] + off - h;
      const count = Math.ceil((range[1] - firstMm) / h) + 1;
      const layer0 = Math.round((firstMm + tz) / h - 0.5);
      const s = cache.sections(source.key, source.mesh, up, firstMm, h, count);
      const k0 = Math.max(0, -layer0);
      const k1 = Math.min(count, layers - layer0);
      for (let k = k0; k < k1; k++) {
        areaProfile[layer0 + k] += s.areaMm2[k];
        contourProfile[layer0 + k] += s.contourMm[k];
      }
      meshPlacements++;
      return;
    }
    const z0 = pl.position[2];
    const z1 = z0 + pl.size[2];
    const area = pl.size[0] * pl.size[1];
    const perimeter = 2 * (pl.size[0] + pl.size[1]);
    const first = Math.max(0, Math.ceil(z0 / h - 0.5));
    for (let L = first; L < layers && mid(L) <= z1; L++) {
      if (mid(L) <= z0) continue;
      areaProfile[L] += area;
      contourProfile[L] += perimeter;
    }
    boxPlacements++;
  });
  // Sums of signed areas can leave a rounding residue where nothing is: an empty layer reads 0. (An outward
  // mesh's sections are never negative; callers turn inside-out meshes round first.)
  for (let L = 0; L < layers; L++) {
    if (areaProfile[L] < 1e-9) areaProfile[L] = 0;
    if (Math.abs(contourProfile[L]) < 1e-9) contourProfile[L] = 0;
  }
  return { areaProfile, contourProfile, meshPlacements, boxPlacements };
}

/**
 * A bound on how far sum(area) x h can be from the volume, for sections at
 * layer middles: within one layer the section area changes by at most the
 * horizontal projection of the surface in that layer (divergence theorem on
 * the slab), so the midpoint sum is off by at most h x sum over triangles of
 * |projected xy area| for the part's up axis.
 */
export function slicingErrorBoundMm3(mesh: MeshData, up: UpAxis, layerHeightMm: number): number {
  const p = mesh.positions;
  const idx = mesh.indices;
  const [ua, va] = planeAxes(up);
  let projected = 0;
  for (let f = 0; f + 2 < idx.length; f += 3) {
    const a = 3 * idx[f];
    const b = 3 * idx[f + 1];
    const c = 3 * idx[f + 2];
    const cross = (p[b + ua] - p[a + ua]) * (p[c + va] - p[a + va]) - (p[c + ua] - p[a + ua]) * (p[b + va] - p[a + va]);
    projected += Math.abs(cross) / 2;
  }
  return layerHeightMm * projected;
}
