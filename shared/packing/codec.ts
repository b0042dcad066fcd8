/**
 * The one encoding of a layout's placements, used by the packing worker (typed
 * arrays sent as transferables), the database column (bytes) and the chamber
 * view (typed arrays it turns into instance matrices).
 *
 * A placement is its part (an index into a list of part ids), the minimum
 * corner of its placed bounding box, its placed extent and its rotation: an
 * index 0..23 into the quarter-turn rotations of shared/geometry/rotations.ts,
 * whose first six are the box orientations xyz, xzy, yxz, yzx, zxy, zyx. A
 * layout of parts with their true shapes also carries each placement's 3MF
 * transform; its 3x3 block is the rotation, so only the translation is kept.
 * A layout may carry per-layer area and contour profiles beside.
 */
import { extentCode, rotatedExtent, rotationIndex, rotationMatrix, rotationOfTransform, ROTATION_COUNT } from '../geometry/rotations';
import { RESULT_FORMAT, type FieldProblem, type PackResult, type Placement, type Transform12, type Vec3 } from './types';

/** Placements as parallel typed arrays; positions, sizes and translations stay 64-bit so a decoded layout still meets the 1e-6 mm tolerance of the layout rules. */
export interface PlacementArrays {
  /** Distinct part ids; `partIndex` points into it. */
  ids: string[];
  partIndex: Uint32Array;
  /** x, y, z of each placement's minimum corner (of its placed bounding box). */
  positions: Float64Array;
  /** Placed extent along x, y, z of each placement. */
  sizes: Float64Array;
  /** Rotation index 0..23 of each placement (0..5 are the box orientations). */
  rotations: Uint8Array;
  /** Translation (last row) of each placement's 3MF transform; present when the layout carries transforms. */
  translations?: Float64Array;
}

/** The rotation of a placement: its transform's when it has one, else its orientation code's (a v1 code or a signed one). */
export function placementRotation(p: Pick<Placement, 'orientation' | 'transform'>): number {
  if (p.transform) return rotationOfTransform(p.transform);
  return rotationIndex(p.orientation);
}

/**
 * Placements as typed arrays. `ids` fixes the part index of each id (a plan's
 * lines, a stored layout's part ids); an id not in it is appended, so
 * `result.ids` always names every part index.
 */
export function toPlacementArrays(placements: readonly Placement[], ids: readonly string[] = []): PlacementArrays {
  const n = placements.length;
  const out: string[] = [...ids];
  const index = new Map(out.map((id, k) => [id, k] as const));
  const partIndex = new Uint32Array(n);
  const positions = new Float64Array(3 * n);
  const sizes = new Float64Array(3 * n);
  const rotations = new Uint8Array(n);
  const withTransforms = placements.some((p) => p.transform);
  const translations = withTransforms ? new Float64Array(3 * n) : undefined;
  for (let i = 0; i < n; i++) {
    const p = placements[i];
    let k = index.get(p.id);
    if (k === undefined) {
      k = out.length;
      out.push(p.id);
      index.set(p.id, k);
    }
    partIndex[i] = k;
    positions[3 * i] = p.position[0];
    positions[3 * i + 1] = p.position[1];
    positions[3 * i + 2] = p.position[2];
    sizes[3 * i] = p.size[0];
    sizes[3 * i + 1] = p.size[1];
    sizes[3 * i + 2] = p.size[2];
    const r = placementRotation(p);
    // An unknown code becomes 255, which every reader refuses: nothing is silently turned.
    rotations[i] = r >= 0 ? r : 255;
    if (translations) {
      const t = p.transform ? p.transform.slice(9, 12) : boxTranslation(rotations[i] < ROTATION_COUNT ? rotations[i] : 0, p.position, p.size);
      translations[3 * i] = t[0];
      translations[3 * i + 1] = t[1];
      translations[3 * i + 2] = t[2];
    }
  }
  return { ids: out, partIndex, positions, sizes, rotations, translations };
}

/**
 * The translation that puts a part whose own bounding box starts at its origin
 * at `position` after rotation r: along a chamber axis the rotation reverses,
 * the part's far face lands on the minimum corner.
 */
function boxTranslation(r: number, position: readonly number[], size: readonly number[]): Vec3 {
  const m = rotationMatrix(r);
  const t: Vec3 = [0, 0, 0];
  for (let row = 0; row < 3; row++) {
    const sign = m[3 * row] + m[3 * row + 1] + m[3 * row + 2];
    t[row] = position[row] + (sign < 0 ? size[row] : 0);
  }
  return t;
}

/** The 3MF transform of placement i when the arrays carry translations. */
export function transformAt(a: Pick<PlacementArrays, 'rotations' | 'translations'>, i: number): Transform12 | undefined {
  if (!a.translations) return undefined;
  const m = rotationMatrix(a.rotations[i]);
  // Row vectors: the 3x3 block of a 3MF transform is R transposed.
  return [m[0], m[3], m[6], m[1], m[4], m[7], m[2], m[5], m[8], a.translations[3 * i], a.translations[3 * i + 1], a.translations[3 * i + 2]];
}

/** Rebuilds the placements; the orientation is the box orientation whose extents the rotation has. */
export function fromPlacementArrays(a: PlacementArrays): Placement[] {
  const n = a.partIndex.length;
  const out: Placement[] = new Array(n);
  for (let i = 0; i < n; i++) {
    const p: Placement = {
      id: a.ids[a.partIndex[i]],
      position: [a.positions[3 * i], a.positions[3 * i + 1], a.positions[3 * i + 2]],
      size: [a.sizes[3 * i], a.sizes[3 * i + 1], a.sizes[3 * i + 2]],
      orientation: extentCode(a.rotations[i]),
    };
    const t = transformAt(a, i);
    if (t) p.transform = t;
    out[i] = p;
  }
  return out;
}

/** Problems with arrays that came from elsewhere (another thread, the database): lengths, indices and rotation codes. */
export function placementArraysProblems(a: PlacementArrays): FieldProblem[] {
  const problems: FieldProblem[] = [];
  const n = a.partIndex.length;
  if (a.positions.length !== 3 * n) problems.push({ field: 'positions', message: 'must hold 3 numbers a placement' });
  if (a.sizes.length !== 3 * n) problems.push({ field: 'sizes', message: 'must hold 3 numbers a placement' });
  if (a.rotations.length !== n) problems.push({ field: 'rotations', message: 'must hold one code a placement' });
  if (a.translations && a.translations.length !== 3 * n) problems.push({ field: 'translations', message: 'must hold 3 numbers a placement' });
  if (problems.length > 0) return problems;
  for (let i = 0; i < n && problems.length < 50; i++) {
    if (a.partIndex[i] >= a.ids.length) problems.push({ field: `partIndex[${i}]`, message: 'points past ids' });
    if (a.rotations[i] >= ROTATION_COUNT) problems.push({ field: `rotations[${i}]`, message: 'must be a rotation 0 to 23' });
  }
  return problems;
}

// ---------------------------------------------------------------------------
// Bytes (the database column)

/**
 * Placement bytes, little-endian, n placements. The format number is stored
 * beside the bytes (the layout row's `placements_format`); a reader decodes
 * every format ever written.
 *
 * Format 1 (29 bytes a placement):
 *
 *   [ x0 y0 z0 x1 y1 z1 ... ]  Float64 x 3n   minimum corners
 *   [ k0 k1 ... ]              Uint32 x n     index into the layout's part ids
 *   [ o0 o1 ... ]              Uint8 x n      orientation, 0..5 = xyz xzy yxz yzx zxy zyx
 *
 * Format 2 (a 16-byte header, then 29 bytes a placement for boxes, 53 with transforms):
 *
 *   header   Uint8 2 | Uint8 flags | Uint16 0 | Uint32 n | Uint32 L | Uint32 0
 *            flags: 1 = translations, 2 = area profile, 4 = contour profile; L = profile layers
 *   [ x y z ... ]              Float64 x 3n   minimum corners of the placed bounding boxes
 *   [ tx ty tz ... ]           Float64 x 3n   3MF translations (flag 1)
 *   [ a0 a1 ... ]              Float64 x L    area per layer, mm^2 (flag 2)
 *   [ c0 c1 ... ]              Float64 x L    contour per layer, mm (flag 4)
 *   [ k0 k1 ... ]              Uint32 x n     index into the layout's part ids
 *   [ r0 r1 ... ]              Uint8 x n      rotation, 0..23 (0..5 as in format 1)
 *
 * Sizes are not stored: they follow from the part's size (its bounding box in
 * its own axes) and the rotation. The 64-bit sections come first so they
 * stay 8-byte aligned.
 */
export const PLACEMENTS_FORMAT = 2;
const HEADER_BYTES = 16;
const FLAG_TRANSLATIONS = 1;
const FLAG_AREA = 2;
const FLAG_CONTOUR = 4;

/** Per-layer profiles stored beside a layout's placements (from z = 0, one number a layer). */
export interface LayoutProfiles {
  areaProfile?: ArrayLike<number>;
  contourProfile?: ArrayLike<number>;
}

export class PlacementBytesError extends Error {
  constructor(
    readonly code: 'unknown_layout_format' | 'corrupt_layout',
    message: string,
  ) {
    super(message);
    this.name = 'PlacementBytesError';
  }
}

/** Format 2 bytes of the arrays (sizes are left out) and the optional profiles. */
export function encodePlacementBytes(a: Omit<PlacementArrays, 'sizes' | 'ids'>, profiles: LayoutProfiles = {}): Uint8Array {
  const n = a.partIndex.length;
  const area = profiles.areaProfile;
  const contour = profiles.contourProfile;
  if (area && contour && area.length !== contour.length) throw new RangeError('the area and contour profiles must have as many layers');
  const layers = area?.length ?? contour?.length ?? 0;
  const flags = (a.translations ? FLAG_TRANSLATIONS : 0) | (area ? FLAG_AREA : 0) | (contour ? FLAG_CONTOUR : 0);
  const floats = 3 * n + (a.translations ? 3 * n : 0) + (area ? layers : 0) + (contour ? layers : 0);
  const bytes = new Uint8Array(HEADER_BYTES + 8 * floats + 5 * n);
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  view.setUint8(0, 2);
  view.setUint8(1, flags);
  view.setUint32(4, n, true);
  view.setUint32(8, layers, true);
  let at = HEADER_BYTES;
  const floatsOut = (src: ArrayLike<number>, count: number) => {
    for (let i = 0; i < count; i++, at += 8) view.setFloat64(at, src[i], true);
  };
  floatsOut(a.positions, 3 * n);
  if (a.translations) floatsOut(a.translations, 3 * n);
  if (area) floatsOut(area, layers);
  if (contour) floatsOut(contour, layers);
  for (let i = 0; i < n; i++, at += 4) view.setUint32(at, a.partIndex[i], true);
  bytes.set(a.rotations.subarray(0, n), at);
  return bytes;
}

export interface DecodedPlacementBytes extends PlacementArrays {
  areaProfile?: Float64Array;
  contourProfile?: Float64Array;
}

/**
 * Reads stored placement bytes of any format. `sizeOf` gives a part's size in
 * its own axes (from the layout's instance); an unknown part gets size zero.
 * Throws PlacementBytesError for a format it does not know or bytes that do
 * not match the count.
 */
export function decodePlacementBytes(
  format: number,
  bytes: Uint8Array,
  count: number,
  ids: readonly string[],
  sizeOf: (id: string) => Vec3 | undefined,
): DecodedPlacementBytes {
  const corrupt = () => new PlacementBytesError('corrupt_layout', "This layout's stored placements are damaged.");
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  const n = count;
  let at: number;
  let flags = 0;
  let layers = 0;
  if (format === 1) {
    if (bytes.length !== 29 * n) throw corrupt();
    at = 0;
  } else if (format === 2) {
    if (bytes.length < HEADER_BYTES || view.getUint8(0) !== 2 || view.getUint32(4, true) !== n) throw corrupt();
    flags = view.getUint8(1);
    layers = view.getUint32(8, true);
    const floats = 3 * n + (flags & FLAG_TRANSLATIONS ? 3 * n : 0) + (flags & FLAG_AREA ? layers : 0) + (flags & FLAG_CONTOUR ? layers : 0);
    if (bytes.length !== HEADER_BYTES + 8 * floats + 5 * n) throw corrupt();
    at = HEADER_BYTES;
  } else {
    throw new PlacementBytesError('unknown_layout_format', `This layout was stored in placement format ${format}, which this server cannot read.`);
  }
  const floatsIn = (len: number) => {
    const out = new Float64Array(len);
    for (let i = 0; i < len; i++, at += 8) out[i] = view.getFloat64(at, true);
    return out;
  };
  const positions = floatsIn(3 * n);
  const translations = flags & FLAG_TRANSLATIONS ? floatsIn(3 * n) : undefined;
  const areaProfile = flags & FLAG_AREA ? floatsIn(layers) : undefined;
  const contourProfile = flags & FLAG_CONTOUR ? floatsIn(layers) : undefined;
  const partIndex = new Uint32Array(n);
  for (let i = 0; i < n; i++, at += 4) partIndex[i] = view.getUint32(at, true);
  const rotations = bytes.slice(at, at + n);
  const sizes = new Float64Array(3 * n);
  for (let i = 0; i < n; i++) {
    if (partIndex[i] >= ids.length) throw corrupt();
    // Format 1 wrote only the six box orientations; an unknown code read as the first, as it always was.
    if (rotations[i] >= (format === 1 ? 6 : ROTATION_COUNT)) {
      if (format !== 1) throw corrupt();
      rotations[i] = 0;
    }
    const size = sizeOf(ids[partIndex[i]]);
    if (size) sizes.set(rotatedExtent(rotations[i], size), 3 * i);
  }
  const out: DecodedPlacementBytes = { ids: [...ids], partIndex, positions, sizes, rotations };
  if (translations) out.translations = translations;
  if (areaProfile) out.areaProfile = areaProfile;
  if (contourProfile) out.contourProfile = contourProfile;
  return out;
}

// ---------------------------------------------------------------------------
// A whole layout across a thread boundary (the packing worker)

/** A packing result as typed arrays, to cross a thread boundary as transferables instead of an array of objects. */
export interface EncodedLayout extends PlacementArrays {
  format: PackResult['format'];
  unplacedIndex: Uint32Array;
  unplacedCounts: Uint32Array;
  height: number;
  layers: number;
  utilization: number;
  elapsedMs: number;
  areaProfile?: Float64Array;
  contourProfile?: Float64Array;
}

export function encodeLayout(r: PackResult): EncodedLayout {
  const arrays = toPlacementArrays(r.placements);
  const index = new Map(arrays.ids.map((id, k) => [id, k] as const));
  const unplacedIndex = Uint32Array.from(
    r.unplaced.map((u) => {
      let k = index.get(u.id);
      if (k === undefined) {
        k = arrays.ids.length;
        arrays.ids.push(u.id);
        index.set(u.id, k);
      }
      return k;
    }),
  );
  const out: EncodedLayout = {
    format: r.format,
    ...arrays,
    unplacedIndex,
    unplacedCounts: Uint32Array.from(r.unplaced.map((u) => u.count)),
    height: r.height,
    layers: r.layers,
    utilization: r.utilization,
    elapsedMs: r.elapsedMs,
  };
  if (!arrays.translations) delete out.translations;
  if (r.areaProfile) out.areaProfile = Float64Array.from(r.areaProfile);
  if (r.contourProfile) out.contourProfile = Float64Array.from(r.contourProfile);
  return out;
}

/** The buffers to hand to postMessage / Comlink.transfer; the layout is unusable on the sending side afterwards. */
export function layoutTransferables(e: EncodedLayout): ArrayBuffer[] {
  const arrays: ArrayBufferView[] = [e.partIndex, e.positions, e.sizes, e.rotations, e.unplacedIndex, e.unplacedCounts];
  for (const extra of [e.translations, e.areaProfile, e.contourProfile]) if (extra) arrays.push(extra);
  return arrays.map((a) => a.buffer as ArrayBuffer);
}

/** Realm-independent: arrays from another thread or context fail instanceof. */
function isTyped(v: unknown, name: string): boolean {
  return Object.prototype.toString.call(v) === `[object ${name}]`;
}

const RESULT_FORMATS: readonly string[] = [RESULT_FORMAT, 'pack-result/2'];

/** Checks a layout received from another thread and rebuilds the plain result. */
export function decodeLayout(e: EncodedLayout): { ok: true; result: PackResult } | { ok: false; problems: FieldProblem[] } {
  const problems: FieldProblem[] = [];
  if (!e || !RESULT_FORMATS.includes(e.format)) problems.push({ field: 'format', message: `must be one of ${RESULT_FORMATS.map((f) => `"${f}"`).join(', ')}` });
  else {
    if (!isTyped(e.partIndex, 'Uint32Array')) problems.push({ field: 'partIndex', message: 'must be a Uint32Array' });
    if (!isTyped(e.positions, 'Float64Array')) problems.push({ field: 'positions', message: 'must be a Float64Array of 3 numbers a placement' });
    if (!isTyped(e.sizes, 'Float64Array')) problems.push({ field: 'sizes', message: 'must be a Float64Array of 3 numbers a placement' });
    if (!isTyped(e.rotations, 'Uint8Array')) problems.push({ field: 'rotations', message: 'must be a Uint8Array of one code a placement' });
    if (e.translations !== undefined && !isTyped(e.translations, 'Float64Array')) problems.push({ field: 'translations', message: 'must be a Float64Array' });
    for (const f of ['areaProfile', 'contourProfile'] as const) {
      if (e[f] !== undefined && !isTyped(e[f], 'Float64Array')) problems.push({ field: f, message: 'must be a Float64Array' });
    }
    if (!isTyped(e.unplacedIndex, 'Uint32Array') || !isTyped(e.unplacedCounts, 'Uint32Array') || e.unplacedIndex.length !== e.unplacedCounts.length) {
      problems.push({ field: 'unplacedIndex', message: 'must pair with unplacedCounts' });
    }
    if (!Array.isArray(e.ids)) problems.push({ field: 'ids', message: 'must be an array of strings' });
    if (problems.length === 0) problems.push(...placementArraysProblems(e));
    if (problems.length === 0 && Array.from(e.unplacedIndex).some((k) => k >= e.ids.length)) problems.push({ field: 'unplacedIndex', message: 'points past ids' });
  }
  if (problems.length > 0) return { ok: false, problems };
  const result: PackResult = {
    format: e.format,
    placements: fromPlacementArrays(e),
    unplaced: Array.from(e.unplacedIndex, (k, i) => ({ id: e.ids[k], count: e.unplacedCounts[i] })),
    height: e.height,
    layers: e.layers,
    utilization: e.utilization,
    elapsedMs: e.elapsedMs,
  };
  if (e.areaProfile) result.areaProfile = Array.from(e.areaProfile);
  if (e.contourProfile) result.contourProfile = Array.from(e.contourProfile);
  return { ok: true, result };
}
