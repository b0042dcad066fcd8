// Over 450 lines: the demo library's shapes, one small builder each over the same loft helper.
/**
 * Closed, consistently oriented meshes for the demo part library, built as
 * lofts: a stack of closed loops (all counter-clockwise seen from +z, all with
 * the same number of points) joined by strips, with flat caps on the first and
 * last loop, or joined back to the first loop for a solid with a hole.
 *
 *   z                      the cross-section walked by the loops of a cup:
 *   ^   I_H +----+ O_H     O_0 -> O_H -> I_H -> I_T; caps on O_0 (down) and I_T (up)
 *   |       |    |
 *   |   I_T +    |         a strip from loop A to loop B faces (tangent x (B - A)),
 *   |            |         outward when the walk keeps the solid on the same side
 *   +----------- + O_0
 *
 * The shapes are invented: brackets, clips, gears, housings, hinges and cable
 * guides sized like small robot parts.
 */
import type { MeshData } from './types';

export type Loop = [number, number][];

export interface LoftRing {
  loop: Loop;
  z: number;
}

/** Joins rings in order; caps the first (facing -z) and last (facing +z) ring unless `closed`. */
export function loft(rings: LoftRing[], closed: boolean): MeshData {
  const n = rings[0].loop.length;
  if (rings.some((r) => r.loop.length !== n)) throw new Error('loft: every ring needs the same number of points');
  const positions = new Float64Array(rings.length * n * 3);
  rings.forEach((ring, r) => {
    ring.loop.forEach(([x, y], j) => {
      const o = (r * n + j) * 3;
      positions[o] = x;
      positions[o + 1] = y;
      positions[o + 2] = ring.z;
    });
  });
  const tris: number[] = [];
  const strips = closed ? rings.length : rings.length - 1;
  for (let r = 0; r < strips; r++) {
    const a = r * n;
    const b = ((r + 1) % rings.length) * n;
    for (let j = 0; j < n; j++) {
      const j1 = (j + 1) % n;
      tris.push(a + j, a + j1, b + j1, a + j, b + j1, b + j);
    }
  }
  if (!closed) {
    for (const [p, q, s] of triangulate(rings[0].loop)) tris.push(p, s, q);
    const last = (rings.length - 1) * n;
    for (const [p, q, s] of triangulate(rings[rings.length - 1].loop)) tris.push(last + p, last + q, last + s);
  }
  return { positions, indices: Uint32Array.from(tris) };
}

/** A straight extrusion of a simple counter-clockwise polygon from z0 to z1. */
export function prism(loop: Loop, z0: number, z1: number): MeshData {
  return loft([{ loop, z: z0 }, { loop, z: z1 }], false);
}

/** Ear clipping of a simple polygon given counter-clockwise; returns counter-clockwise index triples. */
export function triangulate(loop: Loop): [number, number, number][] {
  const remaining = loop.map((_, i) => i);
  const out: [number, number, number][] = [];
  const cross = (a: number, b: number, c: number) =>
    (loop[b][0] - loop[a][0]) * (loop[c][1] - loop[a][1]) - (loop[b][1] - loop[a][1]) * (loop[c][0] - loop[a][0]);
  let guard = 0;
  while (remaining.length > 3 && guard++ < 100000) {
    let clipped = false;
    for (let i = 0; i < remaining.length; i++) {
      const a = remaining[(i + remaining.length - 1) % remaining.length];
      const b = remaining[i];
      const c = remaining[(i + 1) % remaining.length];
      if (cross(a, b, c) <= 1e-12) continue;
      let inside = false;
      for (const p of remaining) {
        if (p === a || p === b || p === c) continue;
        // A bridge repeats vertices: a copy of a corner is not inside the ear.
        if (samePoint(loop[p], loop[a]) || samePoint(loop[p], loop[b]) || samePoint(loop[p], loop[c])) continue;
        if (cross(a, b, p) >= 0 && cross(b, c, p) >= 0 && cross(c, a, p) >= 0) {
          inside = true;
          break;
        }
      }
      if (inside) continue;
      out.push([a, b, c]);
      remaining.splice(i, 1);
      clipped = true;
      break;
    }
    if (!clipped) throw new Error('triangulate: the polygon is not simple or not counter-clockwise');
  }
  out.push([remaining[0], remaining[1], remaining[2]]);
  return out;
}

/**
 * A straight extrusion of a polygon with holes: outer loop counter-clockwise,
 * holes clockwise. Walls use the strip rule of `loft` (a clockwise hole's walls
 * then face into the hole, away from the material); the caps triangulate the
 * outer loop with each hole joined to it by a bridge edge, the usual way ear
 * clipping handles holes.
 */
export function prismWithHoles(outer: Loop, holes: Loop[], z0: number, z1: number): MeshData {
  const loops = [outer, ...holes];
  const offsets: number[] = [];
  let count = 0;
  for (const loop of loops) {
    offsets.push(count);
    count += loop.length;
  }
  // Vertex ids: all loops at z0 (ids 0..count-1), then all loops at z1.
  const positions = new Float64Array(count * 2 * 3);
  loops.forEach((loop, l) => {
    loop.forEach(([x, y], j) => {
      const id = offsets[l] + j;
      positions.set([x, y, z0], id * 3);
      positions.set([x, y, z1], (count + id) * 3);
    });
  });
  const tris: number[] = [];
  loops.forEach((loop, l) => {
    const n = loop.length;
    for (let j = 0; j < n; j++) {
      const a = offsets[l] + j;
      const b = offsets[l] + ((j + 1) % n);
      tris.push(a, b, count + b, a, count + b, count + a);
    }
  });
  const { polygon, ids } = bridgeHoles(outer, holes, offsets);
  for (const [p, q, r] of triangulate(polygon)) {
    tris.push(ids[p], ids[r], ids[q]);
    tris.push(count + ids[p], count + ids[q], count + ids[r]);
  }
  return { positions, indices: Uint32Array.from(tris) };
}

/** Joins each hole into the outer loop through an edge to a vertex it can see, giving one simple (weakly) polygon. */
function bridgeHoles(outer: Loop, holes: Loop[], offsets: number[]): { polygon: Loop; ids: number[] } {
  let polygon: Loop = outer.slice();
  let ids = outer.map((_, j) => offsets[0] + j);
  const order = holes.map((_, h) => h).sort((a, b) => maxX(holes[b]) - maxX(holes[a]));
  for (const h of order) {
    const hole = holes[h];
    let m = 0;
    for (let j = 1; j < hole.length; j++) if (hole[j][0] > hole[m][0]) m = j;
    const from = hole[m];
    const others = order.filter((o) => o !== h).map((o) => holes[o]);
    // A vertex already used by a bridge appears twice; joining to the wrong copy would fold the outline, so skip those.
    const uses = new Map<string, number>();
    for (const q of polygon) uses.set(`${q[0]},${q[1]}`, (uses.get(`${q[0]},${q[1]}`) ?? 0) + 1);
    const candidates = polygon
      .map((_, i) => i)
      .filter((i) => uses.get(`${polygon[i][0]},${polygon[i][1]}`) === 1)
      .sort((a, b) => dist2(polygon[a], from) - dist2(polygon[b], from));
    const visible = candidates.find((i) => !crossesAny(from, polygon[i], [polygon, hole, ...others]));
    if (visible === undefined) throw new Error('prismWithHoles: a hole cannot be joined to the outline');
    const holeIds = hole.map((_, j) => offsets[1 + h] + j);
    const walk: Loop = [];
    const walkIds: number[] = [];
    for (let k = 0; k <= hole.length; k++) {
      const j = (m + k) % hole.length;
      walk.push(hole[j]);
      walkIds.push(holeIds[j]);
    }
    polygon = [...polygon.slice(0, visible + 1), ...walk, polygon[visible], ...polygon.slice(visible + 1)];
    ids = [...ids.slice(0, visible + 1), ...walkIds, ids[visible], ...ids.slice(visible + 1)];
  }
  return { polygon, ids };
}

function maxX(loop: Loop): number {
  return Math.max(...loop.map((p) => p[0]));
}

function dist2(a: [number, number], b: [number, number]): number {
  return (a[0] - b[0]) ** 2 + (a[1] - b[1]) ** 2;
}

function between(a: [number, number], b: [number, number], p: [number, number]): boolean {
  return Math.min(a[0], b[0]) <= p[0] && p[0] <= Math.max(a[0], b[0]) && Math.min(a[1], b[1]) <= p[1] && p[1] <= Math.max(a[1], b[1]);
}

/** True when segment a-b properly crosses an edge of any loop (shared endpoints do not count). */
function crossesAny(a: [number, number], b: [number, number], loops: Loop[]): boolean {
  const orient = (p: [number, number], q: [number, number], r: [number, number]) => Math.sign((q[0] - p[0]) * (r[1] - p[1]) - (q[1] - p[1]) * (r[0] - p[0]));
  const same = (p: [number, number], q: [number, number]) => p[0] === q[0] && p[1] === q[1];
  for (const loop of loops) {
    for (let i = 0; i < loop.length; i++) {
      const c = loop[i];
      const d = loop[(i + 1) % loop.length];
      // A vertex lying on the bridge would make it touch another loop.
      if (!same(c, a) && !same(c, b) && orient(a, b, c) === 0 && between(a, b, c)) return true;
      if (same(a, c) || same(a, d) || same(b, c) || same(b, d)) continue;
      if (orient(a, b, c) * orient(a, b, d) < 0 && orient(c, d, a) * orient(c, d, b) < 0) return true;
    }
  }
  return false;
}

function samePoint(p: [number, number], q: [number, number]): boolean {
  return p[0] === q[0] && p[1] === q[1];
}

function arc(cx: number, cy: number, r: number, from: number, to: number, segments: number): Loop {
  const out: Loop = [];
  for (let i = 0; i <= segments; i++) {
    const a = from + ((to - from) * i) / segments;
    out.push([cx + r * Math.cos(a), cy + r * Math.sin(a)]);
  }
  return out;
}

/** Points of a star-shaped outline around the origin at `segments` equal angles. */
function polar(radius: (angle: number) => number, segments: number): Loop {
  const out: Loop = [];
  for (let i = 0; i < segments; i++) {
    const a = (2 * Math.PI * i) / segments;
    const r = radius(a);
    out.push([r * Math.cos(a), r * Math.sin(a)]);
  }
  return out;
}

/** A solid with a through hole: outer and inner outlines share their angles, so the top and bottom strips never cross. */
function ringSolid(outer: Loop, inner: Loop, heightMm: number): MeshData {
  return loft(
    [
      { loop: outer, z: 0 },
      { loop: outer, z: heightMm },
      { loop: inner, z: heightMm },
      { loop: inner, z: 0 },
    ],
    true,
  );
}

export interface BracketParams {
  legAMm: number;
  legBMm: number;
  thicknessMm: number;
  widthMm: number;
  /** Size of the 45-degree fillet in the inner corner. */
  gussetMm: number;
}

/** An angle bracket: an L profile with a chamfered inner corner, extruded by its width. */
export function bracket(p: BracketParams): MeshData {
  const t = p.thicknessMm;
  const g = Math.min(p.gussetMm, p.legAMm - t - 0.5, p.legBMm - t - 0.5);
  const loop: Loop = [
    [0, 0],
    [p.legAMm, 0],
    [p.legAMm, t],
    [t + g, t],
    [t, t + g],
    [t, p.legBMm],
    [0, p.legBMm],
  ];
  return prism(loop, 0, p.widthMm);
}

function circleLoop(cx: number, cy: number, r: number, segments: number, clockwise: boolean): Loop {
  const out: Loop = [];
  for (let i = 0; i < segments; i++) {
    const a = ((clockwise ? -2 : 2) * Math.PI * i) / segments;
    out.push([cx + r * Math.cos(a), cy + r * Math.sin(a)]);
  }
  return out;
}

export interface CornerPlateParams {
  legMm: number;
  widthMm: number;
  thicknessMm: number;
  holeRadiusMm: number;
  holeSegments: number;
}

/** A flat corner plate: an L of two legs with a screw hole at each end and one in the corner. */
export function cornerPlate(p: CornerPlateParams): MeshData {
  const l = p.legMm;
  const w = p.widthMm;
  const outer: Loop = [[0, 0], [l, 0], [l, w], [w, w], [w, l], [0, l]];
  const centres: [number, number][] = [[l - w / 2, w / 2], [w / 2, l - w / 2], [w / 2, w / 2]];
  const holes = centres.map(([cx, cy]) => circleLoop(cx, cy, p.holeRadiusMm, p.holeSegments, true));
  return prismWithHoles(outer, holes, 0, p.thicknessMm);
}

export interface MountPlateParams {
  sizeMm: number;
  thicknessMm: number;
  cornerRadiusMm: number;
  /** Distance between the four screw holes' centres. */
  holeSpacingMm: number;
  holeRadiusMm: number;
  boreRadiusMm: number;
  segments: number;
}

/** A square motor mount plate: rounded corners, four screw holes and a central bore for the shaft. */
export function mountPlate(p: MountPlateParams): MeshData {
  const outer = roundedRect(p.sizeMm, p.sizeMm, p.cornerRadiusMm, Math.max(2, Math.round(p.segments / 4)));
  const h = p.holeSpacingMm / 2;
  const holes = [
    circleLoop(0, 0, p.boreRadiusMm, p.segments, true),
    ...([[h, h], [-h, h], [-h, -h], [h, -h]] as [number, number][]).map(([cx, cy]) => circleLoop(cx, cy, p.holeRadiusMm, p.segments / 2, true)),
  ];
  return prismWithHoles(outer, holes, 0, p.thicknessMm);
}

export interface ClipParams {
  innerRadiusMm: number;
  wallMm: number;
  /** Opening of the C, in degrees. */
  gapDeg: number;
  widthMm: number;
  segments: number;
}

/** A snap clip for a tube: a C-shaped ring sector, extruded. */
export function clip(p: ClipParams): MeshData {
  const half = ((360 - p.gapDeg) / 2) * (Math.PI / 180);
  const start = -Math.PI / 2 + (p.gapDeg / 2) * (Math.PI / 180) - Math.PI / 2;
  const outer = arc(0, 0, p.innerRadiusMm + p.wallMm, start, start + 2 * half, p.segments);
  const inner = arc(0, 0, p.innerRadiusMm, start + 2 * half, start, p.segments);
  return prism([...outer, ...inner], 0, p.widthMm);
}

export interface GearParams {
  teeth: number;
  rootRadiusMm: number;
  tipRadiusMm: number;
  boreRadiusMm: number;
  thicknessMm: number;
  /** Points along each tooth pitch. */
  samplesPerTooth: number;
}

/** A spur gear with trapezoidal teeth and a round bore. */
export function gear(p: GearParams): MeshData {
  const segments = p.teeth * p.samplesPerTooth;
  const pitch = (2 * Math.PI) / p.teeth;
  const radius = (a: number) => {
    const u = ((a % pitch) + pitch) % pitch / pitch; // 0..1 along one tooth pitch
    // Flank ramps over 15 % of the pitch, tip over 30 %, root over 40 %.
    if (u < 0.15) return p.rootRadiusMm + (p.tipRadiusMm - p.rootRadiusMm) * (u / 0.15);
    if (u < 0.45) return p.tipRadiusMm;
    if (u < 0.6) return p.tipRadiusMm - (p.tipRadiusMm - p.rootRadiusMm) * ((u - 0.45) / 0.15);
    return p.rootRadiusMm;
  };
  return ringSolid(polar(radius, segments), polar(() => p.boreRadiusMm, segments), p.thicknessMm);
}

export interface HousingParams {
  lengthMm: number;
  widthMm: number;
  heightMm: number;
  wallMm: number;
  floorMm: number;
  cornerRadiusMm: number;
  cornerSegments: number;
}

/** An open-topped electronics housing: a rounded rectangular cup. */
export function housing(p: HousingParams): MeshData {
  const outer = roundedRect(p.lengthMm, p.widthMm, p.cornerRadiusMm, p.cornerSegments);
  const inner = roundedRect(p.lengthMm - 2 * p.wallMm, p.widthMm - 2 * p.wallMm, Math.max(0.2, p.cornerRadiusMm - p.wallMm), p.cornerSegments);
  return loft(
    [
      { loop: outer, z: 0 },
      { loop: outer, z: p.heightMm },
      { loop: inner, z: p.heightMm },
      { loop: inner, z: p.floorMm },
    ],
    false,
  );
}

export interface TaperedCupParams {
  /** Outside radius at the foot and at the rim. */
  bottomRadiusMm: number;
  topRadiusMm: number;
  heightMm: number;
  /** Wall thickness measured across (horizontally): inside and outside lean alike. */
  wallMm: number;
  floorMm: number;
  segments: number;
}

/** A round cup wider at the rim than at the foot (a pot, a funnel's cone), its inside the outside moved in by the wall. */
export function taperedCup(p: TaperedCupParams): MeshData {
  const at = (z: number) => p.bottomRadiusMm + ((p.topRadiusMm - p.bottomRadiusMm) * z) / p.heightMm;
  const circle = (r: number) => polar(() => r, p.segments);
  return loft(
    [
      { loop: circle(at(0)), z: 0 },
      { loop: circle(at(p.heightMm)), z: p.heightMm },
      { loop: circle(at(p.heightMm) - p.wallMm), z: p.heightMm },
      { loop: circle(at(p.floorMm) - p.wallMm), z: p.floorMm },
    ],
    false,
  );
}

function roundedRect(l: number, w: number, r: number, segments: number): Loop {
  const hx = l / 2 - r;
  const hy = w / 2 - r;
  const out: Loop = [];
  const corners: [number, number, number][] = [
    [hx, -hy, -Math.PI / 2],
    [hx, hy, 0],
    [-hx, hy, Math.PI / 2],
    [-hx, -hy, Math.PI],
  ];
  for (const [cx, cy, a0] of corners) out.push(...arc(cx, cy, r, a0, a0 + Math.PI / 2, segments));
  return out;
}

export interface HingeParams {
  knuckleRadiusMm: number;
  pinRadiusMm: number;
  leafLengthMm: number;
  leafThicknessMm: number;
  widthMm: number;
  segments: number;
}

/**
 * A hinge leaf: a plate ending in a knuckle with a pin bore. The outline is the
 * union of a disc and a plate that both contain the knuckle's centre, so it is
 * star-shaped about that centre and each ray leaves it at the farther of the two.
 */
export function hingeLeaf(p: HingeParams): MeshData {
  const halfT = p.leafThicknessMm / 2;
  const reach = p.leafLengthMm;
  const plateExit = (a: number) => {
    const c = Math.cos(a);
    const s = Math.sin(a);
    // Plate: 0 <= x <= reach, |y| <= halfT (the knuckle centre at the origin lies on its edge x = 0).
    let t = Infinity;
    if (c > 1e-12) t = Math.min(t, reach / c);
    else if (c < -1e-12) t = 0;
    if (Math.abs(s) > 1e-12) t = Math.min(t, halfT / Math.abs(s));
    return t === Infinity ? 0 : t;
  };
  const outer = polar((a) => Math.max(p.knuckleRadiusMm, plateExit(a)), p.segments);
  const inner = polar(() => p.pinRadiusMm, p.segments);
  return ringSolid(outer, inner, p.widthMm);
}

export interface CableGuideParams {
  channelWidthMm: number;
  channelDepthMm: number;
  wallMm: number;
  flangeMm: number;
  lengthMm: number;
}

/** A cable guide: a U channel with screw-down flanges on both sides, extruded along its length. */
export function cableGuide(p: CableGuideParams): MeshData {
  const w = p.channelWidthMm;
  const d = p.channelDepthMm;
  const t = p.wallMm;
  const f = p.flangeMm;
  const loop: Loop = [
    [-(w / 2 + t + f), 0],
    [w / 2 + t + f, 0],
    [w / 2 + t + f, t],
    [w / 2 + t, t],
    [w / 2 + t, d + t],
    [w / 2, d + t],
    [w / 2, t],
    [-w / 2, t],
    [-w / 2, d + t],
    [-(w / 2 + t), d + t],
    [-(w / 2 + t), t],
    [-(w / 2 + t + f), t],
  ];
  return prism(loop, 0, p.lengthMm);
}

/** A UV torus: a closed, oriented genus-1 mesh of 2 x major x minor triangles (used by the benchmark). */
export function torus(majorRadiusMm: number, minorRadiusMm: number, majorSegments: number, minorSegments: number): MeshData {
  const positions = new Float64Array(majorSegments * minorSegments * 3);
  for (let i = 0; i < majorSegments; i++) {
    const u = (2 * Math.PI * i) / majorSegments;
    for (let j = 0; j < minorSegments; j++) {
      const v = (2 * Math.PI * j) / minorSegments;
      const r = majorRadiusMm + minorRadiusMm * Math.cos(v);
      const o = (i * minorSegments + j) * 3;
      positions[o] = r * Math.cos(u);
      positions[o + 1] = r * Math.sin(u);
      positions[o + 2] = minorRadiusMm * Math.sin(v);
    }
  }
  const indices = new Uint32Array(majorSegments * minorSegments * 6);
  let k = 0;
  for (let i = 0; i < majorSegments; i++) {
    const i1 = (i + 1) % majorSegments;
    for (let j = 0; j < minorSegments; j++) {
      const j1 = (j + 1) % minorSegments;
      const a = i * minorSegments + j;
      const b = i1 * minorSegments + j;
      const c = i1 * minorSegments + j1;
      const d = i * minorSegments + j1;
      indices[k++] = a;
      indices[k++] = b;
      indices[k++] = c;
      indices[k++] = a;
      indices[k++] = c;
      indices[k++] = d;
    }
  }
  return { positions, indices };
}

export type DemoPartKind = 'bracket' | 'clip' | 'gear' | 'housing' | 'hinge' | 'cable-guide' | 'cup';

export interface DemoPart {
  name: string;
  kind: DemoPartKind;
  /** Holes through the solid (its genus): V - E + F = 2 - 2 x holes. */
  throughHoles: number;
  mesh: MeshData;
}

/** The demo lab's library: a few sizes of each invented shape. */
export function demoLibrary(): DemoPart[] {
  return [
    { name: 'Motor bracket 40', kind: 'bracket', throughHoles: 0, mesh: bracket({ legAMm: 40, legBMm: 30, thicknessMm: 4, widthMm: 20, gussetMm: 6 }) },
    { name: 'Corner plate 50', kind: 'bracket', throughHoles: 3, mesh: cornerPlate({ legMm: 50, widthMm: 14, thicknessMm: 3, holeRadiusMm: 2.2, holeSegments: 24 }) },
    { name: 'Motor mount plate 42', kind: 'bracket', throughHoles: 5, mesh: mountPlate({ sizeMm: 42, thicknessMm: 4, cornerRadiusMm: 4, holeSpacingMm: 31, holeRadiusMm: 1.7, boreRadiusMm: 11, segments: 32 }) },
    { name: 'Sensor bracket 25', kind: 'bracket', throughHoles: 0, mesh: bracket({ legAMm: 25, legBMm: 25, thicknessMm: 3, widthMm: 12, gussetMm: 4 }) },
    { name: 'Tube clip 12', kind: 'clip', throughHoles: 0, mesh: clip({ innerRadiusMm: 6, wallMm: 2, gapDeg: 70, widthMm: 10, segments: 48 }) },
    { name: 'Tube clip 20', kind: 'clip', throughHoles: 0, mesh: clip({ innerRadiusMm: 10, wallMm: 2.5, gapDeg: 60, widthMm: 14, segments: 64 }) },
    { name: 'Drive gear 24T', kind: 'gear', throughHoles: 1, mesh: gear({ teeth: 24, rootRadiusMm: 22, tipRadiusMm: 25, boreRadiusMm: 4, thicknessMm: 8, samplesPerTooth: 8 }) },
    { name: 'Idler gear 16T', kind: 'gear', throughHoles: 1, mesh: gear({ teeth: 16, rootRadiusMm: 13, tipRadiusMm: 15.5, boreRadiusMm: 3, thicknessMm: 6, samplesPerTooth: 8 }) },
    { name: 'Controller housing', kind: 'housing', throughHoles: 0, mesh: housing({ lengthMm: 90, widthMm: 60, heightMm: 30, wallMm: 2.5, floorMm: 3, cornerRadiusMm: 6, cornerSegments: 8 }) },
    { name: 'Battery housing', kind: 'housing', throughHoles: 0, mesh: housing({ lengthMm: 120, widthMm: 45, heightMm: 40, wallMm: 3, floorMm: 3, cornerRadiusMm: 5, cornerSegments: 8 }) },
    { name: 'Lid hinge leaf', kind: 'hinge', throughHoles: 1, mesh: hingeLeaf({ knuckleRadiusMm: 4, pinRadiusMm: 1.6, leafLengthMm: 30, leafThicknessMm: 3, widthMm: 18, segments: 96 }) },
    { name: 'Arm hinge leaf', kind: 'hinge', throughHoles: 1, mesh: hingeLeaf({ knuckleRadiusMm: 6, pinRadiusMm: 2.5, leafLengthMm: 45, leafThicknessMm: 4, widthMm: 24, segments: 128 }) },
    { name: 'Cable guide 8', kind: 'cable-guide', throughHoles: 0, mesh: cableGuide({ channelWidthMm: 8, channelDepthMm: 6, wallMm: 2, flangeMm: 8, lengthMm: 30 }) },
    { name: 'Cable guide 16', kind: 'cable-guide', throughHoles: 0, mesh: cableGuide({ channelWidthMm: 16, channelDepthMm: 10, wallMm: 2.5, flangeMm: 10, lengthMm: 40 }) },
    // Its walls lean 26.6 degrees: copies sink into each other, about 10.7 mm apart (packing by shape stacks them).
    { name: 'Sorting cup 52', kind: 'cup', throughHoles: 0, mesh: taperedCup({ bottomRadiusMm: 16, topRadiusMm: 26, heightMm: 20, wallMm: 2, floorMm: 2.5, segments: 64 }) },
  ];
}
