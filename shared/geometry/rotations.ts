/**
 * The 24 quarter-turn rotations of a part (the rotation group of the cube,
 * no mirror images), as used by the packing, the slicer, the stored layouts
 * and the viewer: one table for all of them.
 *
 * A rotation is named by a signed code of three letters: the part's own axis
 * that each chamber axis takes, in the order x, y, z. "-y+x+z" means
 *
 *   chamber x = -(part y),  chamber y = +(part x),  chamber z = +(part z)
 *
 * i.e. p' = R p with R's rows picking the part's axes:
 *
 *        [ 0 -1  0 ]
 *   R =  [ 1  0  0 ]      (a quarter turn about +z)
 *        [ 0  0  1 ]
 *
 * Indices 0..5 are the six box orientations of `pack-instance/1`, in their
 * order xyz, xzy, yxz, yzx, zxy, zyx. Their extents are the permutation the
 * letters name; an odd permutation alone would be a mirror image, so for
 * those chamber x is reversed, which makes each one a proper rotation.
 * Indices 6..23 follow in a fixed order; 0, and the three turns about +z,
 * are the "upright" set that keeps the part's own +z up.
 *
 * 3MF transforms (3MF Core §3.3) use row vectors, p' = [x y z 1] M, so the
 * upper 3x3 of M is R transposed and the last row is the translation.
 */

export type Vec3r = [number, number, number];
/** Row-major 3x3 rotation matrix, entries in {-1, 0, 1}. */
export type Mat3 = [number, number, number, number, number, number, number, number, number];
/** The 12 numbers of a 3MF transform: m00 m01 m02 m10 m11 m12 m20 m21 m22 m30 m31 m32. */
export type Transform12 = [number, number, number, number, number, number, number, number, number, number, number, number];

const AXES = ['x', 'y', 'z'] as const;
const V1_CODES = ['xyz', 'xzy', 'yxz', 'yzx', 'zxy', 'zyx'] as const;

/** Permutation parity: true when even. */
function evenPermutation(p: readonly number[]): boolean {
  let inversions = 0;
  for (let i = 0; i < 3; i++) for (let j = i + 1; j < 3; j++) if (p[i] > p[j]) inversions++;
  return inversions % 2 === 0;
}

function det(m: Mat3): number {
  return m[0] * (m[4] * m[8] - m[5] * m[7]) - m[1] * (m[3] * m[8] - m[5] * m[6]) + m[2] * (m[3] * m[7] - m[4] * m[6]);
}

function matrixOf(perm: readonly number[], signs: readonly number[]): Mat3 {
  const m: number[] = new Array(9).fill(0);
  for (let row = 0; row < 3; row++) m[3 * row + perm[row]] = signs[row];
  return m as Mat3;
}

function codeOf(perm: readonly number[], signs: readonly number[]): string {
  return perm.map((a, i) => (signs[i] < 0 ? '-' : '+') + AXES[a]).join('');
}

function buildTable(): { codes: string[]; matrices: Mat3[] } {
  const codes: string[] = [];
  const matrices: Mat3[] = [];
  const seen = new Set<string>();
  const add = (perm: number[], signs: number[]) => {
    const code = codeOf(perm, signs);
    if (seen.has(code)) return;
    seen.add(code);
    codes.push(code);
    matrices.push(matrixOf(perm, signs));
  };
  // The six box orientations first, so that index = v1 orientation index.
  for (const v1 of V1_CODES) {
    const perm = [...v1].map((c) => AXES.indexOf(c as 'x'));
    add(perm, [evenPermutation(perm) ? 1 : -1, 1, 1]);
  }
  // Then every other proper rotation, in a fixed order: permutations in the
  // v1 order, sign patterns in binary order of (sx, sy, sz) with + first.
  for (const v1 of V1_CODES) {
    const perm = [...v1].map((c) => AXES.indexOf(c as 'x'));
    for (let bits = 0; bits < 8; bits++) {
      const signs = [bits & 4 ? -1 : 1, bits & 2 ? -1 : 1, bits & 1 ? -1 : 1];
      if (det(matrixOf(perm, signs)) === 1) add(perm, signs);
    }
  }
  return { codes, matrices };
}

const TABLE = buildTable();

/** The 24 signed codes; index 0..5 are the box orientations xyz, xzy, yxz, yzx, zxy, zyx. */
export const ROTATION_CODES: readonly string[] = TABLE.codes;
export const ROTATION_COUNT = 24;

/** The four rotations that keep the part's own +z up: indices of +x+y+z, -y+x+z, -x-y+z, +y-x+z. */
export const UPRIGHT_ROTATIONS: readonly number[] = ['+x+y+z', '-y+x+z', '-x-y+z', '+y-x+z'].map((c) => TABLE.codes.indexOf(c));

/** Index of a signed code ("-y+x+z") or of a v1 orientation code ("yxz"); -1 when it is neither. */
export function rotationIndex(code: string): number {
  const v1 = (V1_CODES as readonly string[]).indexOf(code);
  if (v1 >= 0) return v1;
  return TABLE.codes.indexOf(code);
}

/** Every rotation an orientation list allows: signed codes, v1 codes or "upright". Null when one is unknown. */
export function rotationsAllowed(codes: readonly string[]): number[] | null {
  const out = new Set<number>();
  for (const c of codes) {
    if (c === 'upright') {
      for (const k of UPRIGHT_ROTATIONS) out.add(k);
      continue;
    }
    const k = rotationIndex(c);
    if (k < 0) return null;
    out.add(k);
  }
  return [...out].sort((a, b) => a - b);
}

export function rotationMatrix(index: number): Mat3 {
  const m = TABLE.matrices[index];
  if (!m) throw new RangeError(`rotation index ${index} is not 0..23`);
  return m;
}

/** p' = R p. */
export function rotatePoint(index: number, p: readonly number[]): Vec3r {
  const m = rotationMatrix(index);
  return [
    m[0] * p[0] + m[1] * p[1] + m[2] * p[2],
    m[3] * p[0] + m[4] * p[1] + m[5] * p[2],
    m[6] * p[0] + m[7] * p[1] + m[8] * p[2],
  ];
}

/** Extent along chamber x, y, z of a part whose own extent is `size`. */
export function rotatedExtent(index: number, size: readonly number[]): Vec3r {
  const m = rotationMatrix(index);
  const out: Vec3r = [0, 0, 0];
  for (let row = 0; row < 3; row++) {
    for (let col = 0; col < 3; col++) if (m[3 * row + col] !== 0) out[row] = size[col];
  }
  return out;
}

/** The box orientation (v1 letters) whose extents this rotation has. */
export function extentCode(index: number): (typeof V1_CODES)[number] {
  const m = rotationMatrix(index);
  const letters = [0, 1, 2].map((row) => AXES[[0, 1, 2].find((col) => m[3 * row + col] !== 0)!]).join('');
  return letters as (typeof V1_CODES)[number];
}

/** The rotated bounding box of an axis-aligned box [min, max] (part coordinates). */
export function rotatedBox(index: number, min: readonly number[], max: readonly number[]): { min: Vec3r; max: Vec3r } {
  const a = rotatePoint(index, min);
  const b = rotatePoint(index, max);
  return {
    min: [Math.min(a[0], b[0]), Math.min(a[1], b[1]), Math.min(a[2], b[2])],
    max: [Math.max(a[0], b[0]), Math.max(a[1], b[1]), Math.max(a[2], b[2])],
  };
}

/**
 * The 3MF transform that turns the part (file coordinates, bounding box
 * [meshMin, meshMax]) by rotation `index` and moves its rotated bounding box's
 * minimum corner to `position`.
 */
export function placementTransform(index: number, meshMin: readonly number[], meshMax: readonly number[], position: readonly number[]): Transform12 {
  const m = rotationMatrix(index);
  const box = rotatedBox(index, meshMin, meshMax);
  const t = [position[0] - box.min[0], position[1] - box.min[1], position[2] - box.min[2]];
  // Row vectors: M[i][j] = R[j][i] for the 3x3 block.
  return [m[0], m[3], m[6], m[1], m[4], m[7], m[2], m[5], m[8], t[0], t[1], t[2]];
}

/** p' = [x y z 1] M for a 3MF transform. */
export function applyTransform(t: readonly number[], p: readonly number[]): Vec3r {
  return [
    p[0] * t[0] + p[1] * t[3] + p[2] * t[6] + t[9],
    p[0] * t[1] + p[1] * t[4] + p[2] * t[7] + t[10],
    p[0] * t[2] + p[1] * t[5] + p[2] * t[8] + t[11],
  ];
}

/** The rotation index of a 3MF transform's 3x3 block, or -1 when it is not one of the 24 (within 1e-9). */
export function rotationOfTransform(t: readonly number[]): number {
  const r: number[] = [t[0], t[3], t[6], t[1], t[4], t[7], t[2], t[5], t[8]];
  for (let k = 0; k < ROTATION_COUNT; k++) {
    const m = TABLE.matrices[k];
    if (m.every((v, i) => Math.abs(v - r[i]) < 1e-9)) return k;
  }
  return -1;
}

/** Index of the composition "first a, then b" (R_b R_a). */
export function composeRotations(a: number, b: number): number {
  const ma = rotationMatrix(a);
  const mb = rotationMatrix(b);
  const c: number[] = new Array(9).fill(0);
  for (let i = 0; i < 3; i++) for (let j = 0; j < 3; j++) for (let k = 0; k < 3; k++) c[3 * i + j] += mb[3 * i + k] * ma[3 * k + j];
  const k = TABLE.matrices.findIndex((m) => m.every((v, i) => v === c[i]));
  return k;
}
