/**
 * Exact distances between triangles in space, for checking gaps against the
 * meshes. Closest points follow Ericson, "Real-Time Collision Detection"
 * (Morgan Kaufmann, 2005): §5.1.5 (point–triangle), §5.1.9 (segment–segment);
 * two triangles that do not cross are closest at a vertex of one against the
 * other or at a pair of edges, and two that cross are at distance 0 (an edge of
 * one then passes through the other, §5.3.6 segment–triangle).
 *
 * Triangles are passed as 9 numbers (ax ay az bx by bz cx cy cz) in a
 * Float64Array with an offset, so the hot loops allocate nothing.
 */

const EPS = 1e-12;

/** Squared distance from point p to the triangle (a, b, c). */
export function pointTriangleDist2(
  px: number, py: number, pz: number,
  ax: number, ay: number, az: number,
  bx: number, by: number, bz: number,
  cx: number, cy: number, cz: number,
): number {
  const abx = bx - ax, aby = by - ay, abz = bz - az;
  const acx = cx - ax, acy = cy - ay, acz = cz - az;
  const apx = px - ax, apy = py - ay, apz = pz - az;
  const d1 = abx * apx + aby * apy + abz * apz;
  const d2 = acx * apx + acy * apy + acz * apz;
  let qx: number, qy: number, qz: number;
  if (d1 <= 0 && d2 <= 0) {
    qx = ax; qy = ay; qz = az;
  } else {
    const bpx = px - bx, bpy = py - by, bpz = pz - bz;
    const d3 = abx * bpx + aby * bpy + abz * bpz;
    const d4 = acx * bpx + acy * bpy + acz * bpz;
    if (d3 >= 0 && d4 <= d3) {
      qx = bx; qy = by; qz = bz;
    } else {
      const vc = d1 * d4 - d3 * d2;
      if (vc <= 0 && d1 >= 0 && d3 <= 0) {
        const v = d1 / (d1 - d3);
        qx = ax + v * abx; qy = ay + v * aby; qz = az + v * abz;
      } else {
        const cpx = px - cx, cpy = py - cy, cpz = pz - cz;
        const d5 = abx * cpx + aby * cpy + abz * cpz;
        const d6 = acx * cpx + acy * cpy + acz * cpz;
        if (d6 >= 0 && d5 <= d6) {
          qx = cx; qy = cy; qz = cz;
        } else {
          const vb = d5 * d2 - d1 * d6;
          if (vb <= 0 && d2 >= 0 && d6 <= 0) {
            const w = d2 / (d2 - d6);
            qx = ax + w * acx; qy = ay + w * acy; qz = az + w * acz;
          } else {
            const va = d3 * d6 - d5 * d4;
            if (va <= 0 && d4 - d3 >= 0 && d5 - d6 >= 0) {
              const w = (d4 - d3) / (d4 - d3 + (d5 - d6));
              qx = bx + w * (cx - bx); qy = by + w * (cy - by); qz = bz + w * (cz - bz);
            } else {
              const denom = va + vb + vc;
              if (Math.abs(denom) < EPS) {
                // Degenerate (flat) triangle: the nearest of its three edges.
                return Math.min(
                  segmentSegmentDist2(px, py, pz, px, py, pz, ax, ay, az, bx, by, bz),
                  segmentSegmentDist2(px, py, pz, px, py, pz, bx, by, bz, cx, cy, cz),
                  segmentSegmentDist2(px, py, pz, px, py, pz, cx, cy, cz, ax, ay, az),
                );
              }
              const v = vb / denom;
              const w = vc / denom;
              qx = ax + abx * v + acx * w; qy = ay + aby * v + acy * w; qz = az + abz * v + acz * w;
            }
          }
        }
      }
    }
  }
  const dx = px - qx, dy = py - qy, dz = pz - qz;
  return dx * dx + dy * dy + dz * dz;
}

const clamp01 = (v: number) => (v < 0 ? 0 : v > 1 ? 1 : v);

/** Squared distance between segments p1q1 and p2q2. */
export function segmentSegmentDist2(
  p1x: number, p1y: number, p1z: number, q1x: number, q1y: number, q1z: number,
  p2x: number, p2y: number, p2z: number, q2x: number, q2y: number, q2z: number,
): number {
  const d1x = q1x - p1x, d1y = q1y - p1y, d1z = q1z - p1z;
  const d2x = q2x - p2x, d2y = q2y - p2y, d2z = q2z - p2z;
  const rx = p1x - p2x, ry = p1y - p2y, rz = p1z - p2z;
  const a = d1x * d1x + d1y * d1y + d1z * d1z;
  const e = d2x * d2x + d2y * d2y + d2z * d2z;
  const f = d2x * rx + d2y * ry + d2z * rz;
  let s: number, t: number;
  if (a <= EPS && e <= EPS) {
    s = 0; t = 0;
  } else if (a <= EPS) {
    s = 0; t = clamp01(f / e);
  } else {
    const c = d1x * rx + d1y * ry + d1z * rz;
    if (e <= EPS) {
      t = 0; s = clamp01(-c / a);
    } else {
      const b = d1x * d2x + d1y * d2y + d1z * d2z;
      const denom = a * e - b * b;
      s = denom > EPS * a * e ? clamp01((b * f - c * e) / denom) : 0;
      t = (b * s + f) / e;
      if (t < 0) {
        t = 0; s = clamp01(-c / a);
      } else if (t > 1) {
        t = 1; s = clamp01((b - c) / a);
      }
    }
  }
  const dx = p1x + d1x * s - (p2x + d2x * t);
  const dy = p1y + d1y * s - (p2y + d2y * t);
  const dz = p1z + d1z * s - (p2z + d2z * t);
  return dx * dx + dy * dy + dz * dz;
}

/** Six times the signed volume of the tetrahedron (u, v, w, o). */
function vol(
  ux: number, uy: number, uz: number, vx: number, vy: number, vz: number, wx: number, wy: number, wz: number, ox: number, oy: number, oz: number,
): number {
  const x1 = ux - ox, y1 = uy - oy, z1 = uz - oz;
  const x2 = vx - ox, y2 = vy - oy, z2 = vz - oz;
  const x3 = wx - ox, y3 = wy - oy, z3 = wz - oz;
  return x1 * (y2 * z3 - z2 * y3) - y1 * (x2 * z3 - z2 * x3) + z1 * (x2 * y3 - y2 * x3);
}

/** Does segment pq cross (or touch) triangle abc? Signed volumes, so no division and no tolerance on a ray. */
export function segmentCrossesTriangle(
  px: number, py: number, pz: number, qx: number, qy: number, qz: number,
  ax: number, ay: number, az: number, bx: number, by: number, bz: number, cx: number, cy: number, cz: number,
): boolean {
  const sp = vol(ax, ay, az, bx, by, bz, cx, cy, cz, px, py, pz);
  const sq = vol(ax, ay, az, bx, by, bz, cx, cy, cz, qx, qy, qz);
  if ((sp > 0 && sq > 0) || (sp < 0 && sq < 0)) return false;
  if (sp === 0 && sq === 0) return false; // coplanar: the edge–edge distances cover it
  const s1 = vol(px, py, pz, qx, qy, qz, ax, ay, az, bx, by, bz);
  const s2 = vol(px, py, pz, qx, qy, qz, bx, by, bz, cx, cy, cz);
  const s3 = vol(px, py, pz, qx, qy, qz, cx, cy, cz, ax, ay, az);
  return (s1 >= 0 && s2 >= 0 && s3 >= 0) || (s1 <= 0 && s2 <= 0 && s3 <= 0);
}

/** Distance between triangle T (9 numbers of a at ia) and U (9 numbers of b at ib). */
export function triangleDistance(a: Float64Array, ia: number, b: Float64Array, ib: number): number {
  const a0x = a[ia], a0y = a[ia + 1], a0z = a[ia + 2], a1x = a[ia + 3], a1y = a[ia + 4], a1z = a[ia + 5], a2x = a[ia + 6], a2y = a[ia + 7], a2z = a[ia + 8];
  const b0x = b[ib], b0y = b[ib + 1], b0z = b[ib + 2], b1x = b[ib + 3], b1y = b[ib + 4], b1z = b[ib + 5], b2x = b[ib + 6], b2y = b[ib + 7], b2z = b[ib + 8];
  // Crossing: an edge of one through the other.
  if (
    segmentCrossesTriangle(a0x, a0y, a0z, a1x, a1y, a1z, b0x, b0y, b0z, b1x, b1y, b1z, b2x, b2y, b2z) ||
    segmentCrossesTriangle(a1x, a1y, a1z, a2x, a2y, a2z, b0x, b0y, b0z, b1x, b1y, b1z, b2x, b2y, b2z) ||
    segmentCrossesTriangle(a2x, a2y, a2z, a0x, a0y, a0z, b0x, b0y, b0z, b1x, b1y, b1z, b2x, b2y, b2z) ||
    segmentCrossesTriangle(b0x, b0y, b0z, b1x, b1y, b1z, a0x, a0y, a0z, a1x, a1y, a1z, a2x, a2y, a2z) ||
    segmentCrossesTriangle(b1x, b1y, b1z, b2x, b2y, b2z, a0x, a0y, a0z, a1x, a1y, a1z, a2x, a2y, a2z) ||
    segmentCrossesTriangle(b2x, b2y, b2z, b0x, b0y, b0z, a0x, a0y, a0z, a1x, a1y, a1z, a2x, a2y, a2z)
  ) {
    return 0;
  }
  let d = pointTriangleDist2(a0x, a0y, a0z, b0x, b0y, b0z, b1x, b1y, b1z, b2x, b2y, b2z);
  d = Math.min(d, pointTriangleDist2(a1x, a1y, a1z, b0x, b0y, b0z, b1x, b1y, b1z, b2x, b2y, b2z));
  d = Math.min(d, pointTriangleDist2(a2x, a2y, a2z, b0x, b0y, b0z, b1x, b1y, b1z, b2x, b2y, b2z));
  d = Math.min(d, pointTriangleDist2(b0x, b0y, b0z, a0x, a0y, a0z, a1x, a1y, a1z, a2x, a2y, a2z));
  d = Math.min(d, pointTriangleDist2(b1x, b1y, b1z, a0x, a0y, a0z, a1x, a1y, a1z, a2x, a2y, a2z));
  d = Math.min(d, pointTriangleDist2(b2x, b2y, b2z, a0x, a0y, a0z, a1x, a1y, a1z, a2x, a2y, a2z));
  // The nine edge pairs: edge e of a runs from vertex e to vertex (e + 1) % 3.
  for (let e = 0; e < 3; e++) {
    const i0 = ia + 3 * e, i1 = ia + 3 * ((e + 1) % 3);
    for (let f = 0; f < 3; f++) {
      const j0 = ib + 3 * f, j1 = ib + 3 * ((f + 1) % 3);
      const s2 = segmentSegmentDist2(a[i0], a[i0 + 1], a[i0 + 2], a[i1], a[i1 + 1], a[i1 + 2], b[j0], b[j0 + 1], b[j0 + 2], b[j1], b[j1 + 1], b[j1 + 2]);
      if (s2 < d) d = s2;
    }
  }
  return Math.sqrt(d);
}
