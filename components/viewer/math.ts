/**
 * Pure numbers behind the 3D views: instance matrices from typed arrays,
 * the cross-section at a height, the line palette and the camera fit.
 * No three.js here, so the maths can be tested in node and reused anywhere.
 *
 * Conventions: millimetres, z up (the build direction, ISO/ASTM 52921), and
 * 4x4 matrices stored column-major in 16 floats, the layout three.js's
 * Matrix4.elements and InstancedMesh.instanceMatrix use (element [col * 4 + row]).
 */
import { ROTATION_COUNT, rotationMatrix } from '../../shared/geometry/rotations';

export type Vec3 = [number, number, number];

export interface Bounds {
  min: Vec3;
  max: Vec3;
}

/** Axis-aligned bounds of xyz triples; an empty array gives a zero box at the origin. */
export function boundsOf(positions: ArrayLike<number>): Bounds {
  const n = Math.floor(positions.length / 3);
  if (n === 0) return { min: [0, 0, 0], max: [0, 0, 0] };
  const min: Vec3 = [Infinity, Infinity, Infinity];
  const max: Vec3 = [-Infinity, -Infinity, -Infinity];
  for (let i = 0; i < n; i++) {
    for (let a = 0; a < 3; a++) {
      const v = positions[3 * i + a];
      if (v < min[a]) min[a] = v;
      if (v > max[a]) max[a] = v;
    }
  }
  return { min, max };
}

export function sizeOf(b: Bounds): Vec3 {
  return [b.max[0] - b.min[0], b.max[1] - b.min[1], b.max[2] - b.min[2]];
}

// ---------------------------------------------------------------------------
// Placing a part's mesh

/** The part's local bounds that each instance maps onto its placed box. */
export interface LocalBounds {
  min: ArrayLike<number>;
  max: ArrayLike<number>;
}

/** The unit cube [0, 1]^3: the shared box geometry drawn for a part whose mesh is not loaded. */
export const UNIT_CUBE: LocalBounds = { min: [0, 0, 0], max: [1, 1, 1] };

/**
 * Column-major matrices, one per listed placement, that carry the part's
 * local bounds exactly onto the placed box: rotate by the placement's
 * rotation (one of the 24 quarter turns of shared/geometry/rotations.ts, so a
 * part is turned, never mirrored), scale each chamber axis so the rotated
 * extent equals the placed extent (a rounding of 1e-6 mm in the layout would
 * otherwise show as a sliver), then move the rotated minimum corner onto the
 * placement's minimum corner.
 *
 *   chamber_i = scale_i * sign_i * local[axis_i] + t_i
 *
 * `order` lists which placements to build, in instance order; `rotations`
 * may be left out for boxes (a box looks the same either way).
 */
export function instanceMatrices(
  positions: ArrayLike<number>,
  sizes: ArrayLike<number>,
  order: ArrayLike<number>,
  local: LocalBounds = UNIT_CUBE,
  rotations?: ArrayLike<number>,
  out: Float32Array = new Float32Array(order.length * 16),
): Float32Array {
  for (let k = 0; k < order.length; k++) {
    const i = order[k];
    const code = rotations ? rotations[i] : 0;
    const m = rotationMatrix(code < ROTATION_COUNT ? code : 0);
    const o = 16 * k;
    out.fill(0, o, o + 16);
    for (let r = 0; r < 3; r++) {
      // Row r of the rotation picks the part's own axis a (with a sign) for chamber axis r.
      const a = m[3 * r] !== 0 ? 0 : m[3 * r + 1] !== 0 ? 1 : 2;
      const sign = m[3 * r + a];
      const extent = local.max[a] - local.min[a];
      const scale = extent > 0 ? sizes[3 * i + r] / extent : 1;
      const factor = scale * sign;
      // The rotated-and-scaled minimum along chamber axis r comes from the
      // local minimum, or from the local maximum when the axis is negated.
      const rotatedMin = sign > 0 ? factor * local.min[a] : factor * local.max[a];
      out[o + a * 4 + r] = factor;
      out[o + 12 + r] = positions[3 * i + r] - rotatedMin;
    }
    out[o + 15] = 1;
  }
  return out;
}

/** Applies a column-major 4x4 matrix (at `offset`) to a point: for tests and picking maths. */
export function transformPoint(m: ArrayLike<number>, offset: number, p: ArrayLike<number>): Vec3 {
  const o = offset;
  return [
    m[o] * p[0] + m[o + 4] * p[1] + m[o + 8] * p[2] + m[o + 12],
    m[o + 1] * p[0] + m[o + 5] * p[1] + m[o + 9] * p[2] + m[o + 13],
    m[o + 2] * p[0] + m[o + 6] * p[1] + m[o + 10] * p[2] + m[o + 14],
  ];
}

// ---------------------------------------------------------------------------
// Grouping placements by part (one instanced draw per part)

/**
 * Placements grouped by part, compressed-row style: the placements of
 * `parts[k]` are `order[offsets[k] .. offsets[k + 1])`, in ascending
 * placement order. Instance j of part k's instanced mesh is placement
 * `order[offsets[k] + j]`, which is how a pick maps back to a placement.
 */
export interface PartGroups {
  parts: Uint32Array;
  offsets: Uint32Array;
  order: Uint32Array;
}

export function groupByPart(partIndex: ArrayLike<number>): PartGroups {
  const n = partIndex.length;
  let maxPart = -1;
  for (let i = 0; i < n; i++) if (partIndex[i] > maxPart) maxPart = partIndex[i];
  const counts = new Uint32Array(maxPart + 1);
  for (let i = 0; i < n; i++) counts[partIndex[i]]++;
  let distinct = 0;
  for (let p = 0; p <= maxPart; p++) if (counts[p] > 0) distinct++;
  const parts = new Uint32Array(distinct);
  const offsets = new Uint32Array(distinct + 1);
  const slot = new Int32Array(maxPart + 1).fill(-1);
  for (let p = 0, k = 0; p <= maxPart; p++) {
    if (counts[p] === 0) continue;
    parts[k] = p;
    slot[p] = k;
    offsets[k + 1] = offsets[k] + counts[p];
    k++;
  }
  const cursor = offsets.slice(0, distinct);
  const order = new Uint32Array(n);
  for (let i = 0; i < n; i++) order[cursor[slot[partIndex[i]]]++] = i;
  return { parts, offsets, order };
}

// ---------------------------------------------------------------------------
// Cross-section at a height

/**
 * Placements whose box holds material in the layer just under `heightMm`:
 * z0 < h <= z1. A cut at the top of layer k therefore shows layer k, and a
 * cut on the floor (h = 0) shows nothing.
 */
export function spanningAt(positions: ArrayLike<number>, sizes: ArrayLike<number>, heightMm: number, toleranceMm = 1e-6): Uint32Array {
  const n = Math.floor(positions.length / 3);
  const hits: number[] = [];
  for (let i = 0; i < n; i++) {
    const z0 = positions[3 * i + 2];
    const z1 = z0 + sizes[3 * i + 2];
    if (z0 < heightMm - toleranceMm && heightMm <= z1 + toleranceMm) hits.push(i);
  }
  return Uint32Array.from(hits);
}

/** Summed footprint (mm^2) of the listed boxes: the cross-section area the boxes give at a cut. */
export function footprintAreaMm2(sizes: ArrayLike<number>, list: ArrayLike<number>): number {
  let area = 0;
  for (let k = 0; k < list.length; k++) area += sizes[3 * list[k]] * sizes[3 * list[k] + 1];
  return area;
}

/**
 * Matrices that lay the unit square [0, 1]^2 (z = 0) over each listed box's
 * footprint at `heightMm`: the flat rectangles of the cross-section.
 */
export function sectionMatrices(
  positions: ArrayLike<number>,
  sizes: ArrayLike<number>,
  list: ArrayLike<number>,
  heightMm: number,
  out: Float32Array = new Float32Array(list.length * 16),
): Float32Array {
  for (let k = 0; k < list.length; k++) {
    const i = list[k];
    const o = 16 * k;
    out.fill(0, o, o + 16);
    out[o] = sizes[3 * i];
    out[o + 5] = sizes[3 * i + 1];
    out[o + 10] = 1;
    out[o + 12] = positions[3 * i];
    out[o + 13] = positions[3 * i + 1];
    out[o + 14] = heightMm;
    out[o + 15] = 1;
  }
  return out;
}

/** Layer number (1-based) whose top is at or just above `heightMm`; 0 on the floor. */
export function layerAtHeight(heightMm: number, layerHeightMm: number): number {
  if (!(layerHeightMm > 0) || heightMm <= 0) return 0;
  // A height a hair over a layer top (float noise from k * layerHeight) still names layer k.
  return Math.ceil(heightMm / layerHeightMm - 1e-9);
}

// ---------------------------------------------------------------------------
// Colours

/**
 * Request-line colours. Chosen here for Sinterstack: saturated enough to read
 * on the warm powder ground, ordered so neighbouring lines differ in both hue
 * and lightness (lightness survives every colour-vision deficiency, hue does
 * not). The unit tests check every pair stays apart under simulated
 * protanopia, deuteranopia and tritanopia.
 */
export const LINE_PALETTE: readonly string[] = [
  '#1F5FA8', // cobalt
  '#E8A33D', // marigold
  '#0F8A6E', // verdigris
  '#D9719F', // rose
  '#8FC7E8', // ice
  '#6B3E1F', // walnut
  '#D9D46A', // pale citron
  '#3B3A7A', // ink violet
];

/** Colour of a request line; past the palette the colours repeat (the hover label names the line). */
export function lineColour(lineIndex: number): string {
  const n = LINE_PALETTE.length;
  return LINE_PALETTE[((lineIndex % n) + n) % n];
}

export function hexToRgb(hex: string): Vec3 {
  const h = hex.replace('#', '');
  return [parseInt(h.slice(0, 2), 16) / 255, parseInt(h.slice(2, 4), 16) / 255, parseInt(h.slice(4, 6), 16) / 255];
}

/** sRGB transfer function, decoded (IEC 61966-2-1). */
export function srgbToLinear(c: number): number {
  return c <= 0.04045 ? c / 12.92 : Math.pow((c + 0.055) / 1.055, 2.4);
}

/**
 * Linear-RGB colour triples, one per listed placement, by its line: what
 * InstancedMesh.instanceColor holds (three.js shades in linear light).
 */
export function instanceColours(lineIndex: ArrayLike<number>, list: ArrayLike<number>, palette: readonly string[] = LINE_PALETTE, out: Float32Array = new Float32Array(list.length * 3)): Float32Array {
  const linear = palette.map((hex) => hexToRgb(hex).map(srgbToLinear));
  const n = linear.length;
  for (let k = 0; k < list.length; k++) {
    const c = linear[((lineIndex[list[k]] % n) + n) % n];
    out[3 * k] = c[0];
    out[3 * k + 1] = c[1];
    out[3 * k + 2] = c[2];
  }
  return out;
}

// ---------------------------------------------------------------------------
// Camera

export type ViewName = 'fit' | 'top' | 'front' | 'side';

/** What the views frame: the placed parts (the default), or the whole chamber. */
export type FrameName = 'parts' | 'chamber';

/**
 * The box the camera views keep in sight: the placed parts' boxes (min corners to max corners) for 'parts', the
 * chamber from its floor corner for 'chamber' or when nothing is placed. A build of a few centimetres in a tall
 * chamber then fills the view instead of a corner of it.
 */
export function framedBounds(placements: { positions: ArrayLike<number>; sizes: ArrayLike<number> }, chamberMm: Vec3, frame: FrameName): Bounds {
  const n = Math.floor(placements.positions.length / 3);
  if (frame === 'chamber' || n === 0) return { min: [0, 0, 0], max: [chamberMm[0], chamberMm[1], chamberMm[2]] };
  const min: Vec3 = [Infinity, Infinity, Infinity];
  const max: Vec3 = [-Infinity, -Infinity, -Infinity];
  for (let i = 0; i < n; i++) {
    for (let a = 0; a < 3; a++) {
      const lo = placements.positions[3 * i + a];
      const hi = lo + placements.sizes[3 * i + a];
      if (lo < min[a]) min[a] = lo;
      if (hi > max[a]) max[a] = hi;
    }
  }
  return { min, max };
}

export interface CameraPose {
  position: Vec3;
  target: Vec3;
  up: Vec3;
  /** Distance from the target: useful for near/far planes. */
  distance: number;
}

/**
 * Where the camera looks from, relative to the target. Front looks along +y
 * (from the operator's side of the chamber), side along -x, top down with +y
 * up on screen; fit is a three-quarter view from the front right. Up stays +z
 * in every view: orbit controls are built around the up vector they start
 * with, so the top view leans a hair towards the front instead of looking
 * exactly along z (where "up" would be undefined).
 */
const VIEW_DIRECTIONS: Record<ViewName, { dir: Vec3; up: Vec3 }> = {
  fit: { dir: [0.62, -0.78, 0.55], up: [0, 0, 1] },
  top: { dir: [0, -1e-4, 1], up: [0, 0, 1] },
  front: { dir: [0, -1, 0], up: [0, 0, 1] },
  side: { dir: [1, 0, 0], up: [0, 0, 1] },
};

/** For the axis views: which box axes run across the screen, up the screen, and into it. */
const AXIS_VIEW_AXES: Record<Exclude<ViewName, 'fit'>, [number, number, number]> = {
  top: [0, 1, 2],
  front: [0, 2, 1],
  side: [1, 2, 0],
};

/**
 * Camera pose that keeps a box in view in a perspective camera.
 *
 * Fit (three-quarter view): the bounding sphere. A sphere of radius r seen
 * through a cone of half-angle a just touches it at distance r / sin(a); the
 * narrower of the vertical and horizontal half-angles decides
 * (tan(a_h) = aspect * tan(a_v)).
 *
 * Top, front, side: the sphere would leave a tall chamber small in the top
 * view, so the face towards the camera is fitted instead. The nearest face
 * is at d - depth / 2 and must hold half-width w and half-height h:
 * d = depth / 2 + max(w / tan(a_h), h / tan(a_v)).
 */
export function fitCamera(bounds: Bounds, view: ViewName, verticalFovDeg: number, aspect: number, padding = 1.1): CameraPose {
  const size = sizeOf(bounds);
  const target: Vec3 = [(bounds.min[0] + bounds.max[0]) / 2, (bounds.min[1] + bounds.max[1]) / 2, (bounds.min[2] + bounds.max[2]) / 2];
  const halfV = (verticalFovDeg * Math.PI) / 360;
  const halfH = Math.atan(Math.tan(halfV) * (aspect > 0 ? aspect : 1));
  let distance: number;
  if (view === 'fit') {
    const radius = Math.max(0.5 * Math.hypot(size[0], size[1], size[2]), 1e-3);
    distance = (padding * radius) / Math.sin(Math.min(halfV, halfH));
  } else {
    const [across, up, depth] = AXIS_VIEW_AXES[view];
    const w = Math.max((padding * size[across]) / 2, 1e-3);
    const h = Math.max((padding * size[up]) / 2, 1e-3);
    distance = size[depth] / 2 + Math.max(w / Math.tan(halfH), h / Math.tan(halfV));
  }
  const { dir, up } = VIEW_DIRECTIONS[view];
  const len = Math.hypot(dir[0], dir[1], dir[2]);
  const position: Vec3 = [target[0] + (dir[0] / len) * distance, target[1] + (dir[1] / len) * distance, target[2] + (dir[2] / len) * distance];
  return { position, target, up: [...up] as Vec3, distance };
}

// ---------------------------------------------------------------------------
// Labels

/** A length for a label: 0.1 mm under 100 mm, whole mm above (a bed is read in mm, not microns). */
export function formatMm(valueMm: number): string {
  if (!Number.isFinite(valueMm)) return '–';
  return Math.abs(valueMm) < 100 ? `${valueMm.toFixed(1)} mm` : `${Math.round(valueMm)} mm`;
}

// ---------------------------------------------------------------------------
// Labels over a view

/** A label on screen: its centre and its size, in pixels. */
export interface LabelBox {
  x: number;
  y: number;
  w: number;
  h: number;
  /** Where it must move up or down to clear another, it moves up (a label on an upright edge, whose edge goes up from there). */
  up?: boolean;
}

/**
 * Label centres pushed apart until no two boxes come closer than `gap` pixels: each overlapping pair is moved
 * apart along the axis where it overlaps least (the first label stays put and the other takes the whole move;
 * otherwise each moves half). Labels anchored on edges that meet near one corner of a flat part would otherwise
 * cover each other. A label marked `up` that must move up or down goes up, the other down.
 */
export function separateLabels(boxes: readonly LabelBox[], gap = 4, rounds = 20): Array<[number, number]> {
  const at = boxes.map((b) => [b.x, b.y] as [number, number]);
  for (let round = 0; round < rounds; round++) {
    let moved = false;
    for (let i = 0; i < boxes.length; i++) {
      for (let j = i + 1; j < boxes.length; j++) {
        const dx = at[j][0] - at[i][0];
        const dy = at[j][1] - at[i][1];
        const overX = (boxes[i].w + boxes[j].w) / 2 + gap - Math.abs(dx);
        const overY = (boxes[i].h + boxes[j].h) / 2 + gap - Math.abs(dy);
        if (overX <= 1e-9 || overY <= 1e-9) continue;
        moved = true;
        const axis = overY <= overX ? 1 : 0;
        const over = axis === 1 ? overY : overX;
        // +1: j goes right or down, i left or up.
        let sign = (axis === 1 ? dy : dx) >= 0 ? 1 : -1;
        if (axis === 1 && boxes[j].up && !boxes[i].up) sign = -1;
        else if (axis === 1 && boxes[i].up && !boxes[j].up) sign = 1;
        const mine = i === 0 ? 0 : over / 2;
        at[i][axis] -= sign * mine;
        at[j][axis] += sign * (over - mine);
      }
    }
    if (!moved) break;
  }
  return at;
}
