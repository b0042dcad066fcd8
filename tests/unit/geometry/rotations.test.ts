import {
  ROTATION_CODES,
  UPRIGHT_ROTATIONS,
  applyTransform,
  composeRotations,
  extentCode,
  placementTransform,
  rotatePoint,
  rotatedBox,
  rotatedExtent,
  rotationIndex,
  rotationMatrix,
  rotationOfTransform,
  rotationsAllowed,
} from '../../../shared/geometry/rotations';
import { ORIENTATIONS, orientedSize, type Vec3 } from '../../../shared/packing';

type M = number[];
const mul = (a: M, b: M): M => [0, 1, 2].flatMap((i) => [0, 1, 2].map((j) => a[3 * i] * b[j] + a[3 * i + 1] * b[3 + j] + a[3 * i + 2] * b[6 + j]));
const transpose = (a: M): M => [a[0], a[3], a[6], a[1], a[4], a[7], a[2], a[5], a[8]];
const det = (m: M) => m[0] * (m[4] * m[8] - m[5] * m[7]) - m[1] * (m[3] * m[8] - m[5] * m[6]) + m[2] * (m[3] * m[7] - m[4] * m[6]);
const apply = (m: M, p: number[]) => [0, 1, 2].map((i) => m[3 * i] * p[0] + m[3 * i + 1] * p[1] + m[3 * i + 2] * p[2]);

describe('the 24 quarter-turn rotations', () => {
  // The rotation group of the cube (chiral octahedral group) has order 24:
  // every proper rotation mapping the axes onto signed axes (R R^T = I,
  // det R = +1: the definition of a proper rotation).
  it('are 24 distinct proper rotations (orthonormal, determinant +1)', () => {
    expect(ROTATION_CODES).toHaveLength(24);
    expect(new Set(ROTATION_CODES).size).toBe(24);
    for (let k = 0; k < 24; k++) {
      const m = rotationMatrix(k);
      expect(det(m)).toBe(1);
      expect(mul(m, transpose(m))).toEqual([1, 0, 0, 0, 1, 0, 0, 0, 1]);
    }
  });

  it('form a group: every composition is one of them', () => {
    for (let a = 0; a < 24; a++) for (let b = 0; b < 24; b++) expect(composeRotations(a, b)).toBeGreaterThanOrEqual(0);
  });

  it('keep the six box orientations of version 1 at indices 0..5 with the same extents', () => {
    const size: Vec3 = [3, 5, 7];
    ORIENTATIONS.forEach((o, k) => {
      expect(rotationIndex(o)).toBe(k);
      expect(rotatedExtent(k, size)).toEqual(orientedSize(size, o));
      expect(extentCode(k)).toBe(o);
    });
  });

  it('read "-y+x+z" as a quarter turn about +z (the elementary rotation R_z(90 deg))', () => {
    const k = rotationIndex('-y+x+z');
    const c = Math.cos(Math.PI / 2);
    const s = Math.sin(Math.PI / 2);
    const ref = [c, -s, 0, s, c, 0, 0, 0, 1];
    for (const p of [[1, 0, 0], [0, 1, 0], [2, 3, 4]]) {
      const v = apply(ref, p);
      const got = rotatePoint(k, p);
      for (let a = 0; a < 3; a++) expect(got[a]).toBeCloseTo(v[a], 12);
    }
    // "yxz" has the same extents and is this same proper rotation (chamber x reversed).
    expect(rotationIndex('yxz')).toBe(2);
    expect(ROTATION_CODES[2]).toBe('-y+x+z');
  });

  it('"upright" is the four turns that keep the part\'s own +z up', () => {
    expect(UPRIGHT_ROTATIONS).toHaveLength(4);
    for (const k of UPRIGHT_ROTATIONS) expect(rotatePoint(k, [0, 0, 1])).toEqual([0, 0, 1]);
    expect(rotationsAllowed(['upright', 'xyz'])).toEqual([...UPRIGHT_ROTATIONS].sort((a, b) => a - b));
    expect(rotationsAllowed(['+x+x+z'])).toBeNull();
  });

  it('a placement transform is a 3MF row-vector transform moving the rotated box to the position', () => {
    const min = [-5, 2, 1];
    const max = [15, 12, 31];
    const position = [40, 50, 6];
    for (let k = 0; k < 24; k++) {
      const t = placementTransform(k, min, max, position);
      // 3MF Core §3.3: p' = [x y z 1] M, written out as the row vector times the 4x3 matrix.
      const rowTimes = (p: number[]) => [0, 1, 2].map((j) => p[0] * t[j] + p[1] * t[3 + j] + p[2] * t[6 + j] + t[9 + j]);
      const corners = [0, 1, 2, 3, 4, 5, 6, 7].map((c) => [c & 1 ? max[0] : min[0], c & 2 ? max[1] : min[1], c & 4 ? max[2] : min[2]]);
      const moved = corners.map((p) => applyTransform(t, p));
      for (let i = 0; i < corners.length; i++) {
        const v = rowTimes(corners[i]);
        for (let a = 0; a < 3; a++) expect(moved[i][a]).toBeCloseTo(v[a], 9);
        // The same point through the rotation, then the translation that brings the box to `position`.
        const r = apply(rotationMatrix(k), corners[i]);
        const box0 = rotatedBox(k, min, max);
        for (let a = 0; a < 3; a++) expect(moved[i][a]).toBeCloseTo(r[a] - box0.min[a] + position[a], 9);
      }
      for (let a = 0; a < 3; a++) expect(Math.min(...moved.map((p) => p[a]))).toBeCloseTo(position[a], 9);
      const box = rotatedBox(k, min, max);
      expect(rotatedExtent(k, [20, 10, 30]).map((e, a) => e - (box.max[a] - box.min[a]))).toEqual([0, 0, 0]);
      expect(rotationOfTransform(t)).toBe(k);
    }
    expect(rotationOfTransform([2, 0, 0, 0, 1, 0, 0, 0, 1, 0, 0, 0])).toBe(-1);
  });
});
