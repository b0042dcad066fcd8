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

export type DemoPartKind = 'bracket' | 'clip' | 'gear' | 'housing' | 'hinge' | 'cable-guide';

export interface DemoPart {
  name: string;
  kind: DemoPartKind;
  mesh: MeshData;
}

/** The demo lab's library: a few sizes of each invented shape. */
export function demoLibrary(): DemoPart[] {
  return [
    { name: 'Motor bracket 40', kind: 'bracket', mesh: bracket({ legAMm: 40, legBMm: 30, thicknessMm: 4, widthMm: 20, gussetMm: 6 }) },
    { name: 'Sensor bracket 25', kind: 'bracket', mesh: bracket({ legAMm: 25, legBMm: 25, thicknessMm: 3, widthMm: 12, gussetMm: 4 }) },
    { name: 'Tube clip 12', kind: 'clip', mesh: clip({ innerRadiusMm: 6, wallMm: 2, gapDeg: 70, widthMm: 10, segments: 48 }) },
    { name: 'Tube clip 20', kind: 'clip', mesh: clip({ innerRadiusMm: 10, wallMm: 2.5, gapDeg: 60, widthMm: 14, segments: 64 }) },
    { name: 'Drive gear 24T', kind: 'gear', mesh: gear({ teeth: 24, rootRadiusMm: 22, tipRadiusMm: 25, boreRadiusMm: 4, thicknessMm: 8, samplesPerTooth: 8 }) },
    { name: 'Idler gear 16T', kind: 'gear', mesh: gear({ teeth: 16, rootRadiusMm: 13, tipRadiusMm: 15.5, boreRadiusMm: 3, thicknessMm: 6, samplesPerTooth: 8 }) },
    { name: 'Controller housing', kind: 'housing', mesh: housing({ lengthMm: 90, widthMm: 60, heightMm: 30, wallMm: 2.5, floorMm: 3, cornerRadiusMm: 6, cornerSegments: 8 }) },
    { name: 'Battery housing', kind: 'housing', mesh: housing({ lengthMm: 120, widthMm: 45, heightMm: 40, wallMm: 3, floorMm: 3, cornerRadiusMm: 5, cornerSegments: 8 }) },
    { name: 'Lid hinge leaf', kind: 'hinge', mesh: hingeLeaf({ knuckleRadiusMm: 4, pinRadiusMm: 1.6, leafLengthMm: 30, leafThicknessMm: 3, widthMm: 18, segments: 96 }) },
    { name: 'Arm hinge leaf', kind: 'hinge', mesh: hingeLeaf({ knuckleRadiusMm: 6, pinRadiusMm: 2.5, leafLengthMm: 45, leafThicknessMm: 4, widthMm: 24, segments: 128 }) },
    { name: 'Cable guide 8', kind: 'cable-guide', mesh: cableGuide({ channelWidthMm: 8, channelDepthMm: 6, wallMm: 2, flangeMm: 8, lengthMm: 30 }) },
    { name: 'Cable guide 16', kind: 'cable-guide', mesh: cableGuide({ channelWidthMm: 16, channelDepthMm: 10, wallMm: 2.5, flangeMm: 10, lengthMm: 40 }) },
  ];
}
