/**
 * Tessellated solids of revolution for the slicing tests, each a closed mesh
 * with outward, counter-clockwise faces, and the facts that bound how far the
 * tessellation is from the smooth solid.
 */
import type { MeshData } from '../../../shared/geometry';

/** A UV sphere of radius r about the origin: vertices on the sphere, `segments` around, `stacks` pole to pole. */
export function uvSphere(r: number, segments: number, stacks: number): MeshData {
  const pos: number[] = [0, 0, r]; // north pole, index 0
  for (let j = 1; j < stacks; j++) {
    const theta = (Math.PI * j) / stacks;
    for (let i = 0; i < segments; i++) {
      const phi = (2 * Math.PI * i) / segments;
      pos.push(r * Math.sin(theta) * Math.cos(phi), r * Math.sin(theta) * Math.sin(phi), r * Math.cos(theta));
    }
  }
  const south = pos.length / 3;
  pos.push(0, 0, -r);
  const ring = (j: number, i: number) => 1 + (j - 1) * segments + (i % segments);
  const tris: number[] = [];
  for (let i = 0; i < segments; i++) tris.push(0, ring(1, i), ring(1, i + 1));
  for (let j = 1; j < stacks - 1; j++) {
    for (let i = 0; i < segments; i++) {
      const a = ring(j, i);
      const b = ring(j + 1, i);
      const c = ring(j + 1, i + 1);
      const d = ring(j, i + 1);
      tris.push(a, b, c, a, c, d);
    }
  }
  for (let i = 0; i < segments; i++) tris.push(south, ring(stacks - 1, i + 1), ring(stacks - 1, i));
  return { positions: Float64Array.from(pos), indices: Uint32Array.from(tris) };
}

/** A right prism over the regular n-gon inscribed in the circle of radius r, from z = 0 to z = h (a tessellated cylinder). */
export function cylinder(r: number, h: number, n: number): MeshData {
  const pos: number[] = [];
  for (const z of [0, h]) for (let i = 0; i < n; i++) pos.push(r * Math.cos((2 * Math.PI * i) / n), r * Math.sin((2 * Math.PI * i) / n), z);
  pos.push(0, 0, 0, 0, 0, h);
  const bottom = 2 * n;
  const top = 2 * n + 1;
  const tris: number[] = [];
  for (let i = 0; i < n; i++) {
    const i1 = (i + 1) % n;
    tris.push(i, i1, n + i1, i, n + i1, n + i);
    tris.push(bottom, i1, i);
    tris.push(top, n + i, n + i1);
  }
  return { positions: Float64Array.from(pos), indices: Uint32Array.from(tris) };
}

/** A right pyramid over the regular n-gon inscribed in the circle of radius r at z = 0, apex at (0, 0, h) (a tessellated cone). */
export function cone(r: number, h: number, n: number): MeshData {
  const pos: number[] = [];
  for (let i = 0; i < n; i++) pos.push(r * Math.cos((2 * Math.PI * i) / n), r * Math.sin((2 * Math.PI * i) / n), 0);
  pos.push(0, 0, h, 0, 0, 0);
  const apex = n;
  const centre = n + 1;
  const tris: number[] = [];
  for (let i = 0; i < n; i++) {
    const i1 = (i + 1) % n;
    tris.push(i, i1, apex);
    tris.push(centre, i1, i);
  }
  return { positions: Float64Array.from(pos), indices: Uint32Array.from(tris) };
}

/** The regular octahedron with vertices at +-1 on each axis. */
export function octahedron(): MeshData {
  const positions = Float64Array.from([1, 0, 0, 0, 1, 0, -1, 0, 0, 0, -1, 0, 0, 0, 1, 0, 0, -1]);
  const tris: number[] = [];
  for (let i = 0; i < 4; i++) {
    const i1 = (i + 1) % 4;
    tris.push(i, i1, 4, i1, i, 5);
  }
  return { positions, indices: Uint32Array.from(tris) };
}

/** The smallest distance from the origin to the plane of any face: a convex mesh around the origin contains the ball of that radius. */
export function insideRadius(mesh: MeshData): number {
  const p = mesh.positions;
  let best = Infinity;
  for (let f = 0; f < mesh.indices.length; f += 3) {
    const [a, b, c] = [0, 1, 2].map((k) => 3 * mesh.indices[f + k]);
    const e1 = [p[b] - p[a], p[b + 1] - p[a + 1], p[b + 2] - p[a + 2]];
    const e2 = [p[c] - p[a], p[c + 1] - p[a + 1], p[c + 2] - p[a + 2]];
    const n = [e1[1] * e2[2] - e1[2] * e2[1], e1[2] * e2[0] - e1[0] * e2[2], e1[0] * e2[1] - e1[1] * e2[0]];
    const len = Math.hypot(n[0], n[1], n[2]);
    if (len === 0) continue; // a degenerate face at a pole bounds nothing
    best = Math.min(best, Math.abs(n[0] * p[a] + n[1] * p[a + 1] + n[2] * p[a + 2]) / len);
  }
  return best;
}

/** Applies a 3MF row-vector transform to every vertex (p' = [x y z 1] M). */
export function transformMesh(mesh: MeshData, t: readonly number[]): MeshData {
  const p = mesh.positions;
  const out = new Float64Array(p.length);
  for (let i = 0; i < p.length; i += 3) {
    out[i] = p[i] * t[0] + p[i + 1] * t[3] + p[i + 2] * t[6] + t[9];
    out[i + 1] = p[i] * t[1] + p[i + 1] * t[4] + p[i + 2] * t[7] + t[10];
    out[i + 2] = p[i] * t[2] + p[i + 1] * t[5] + p[i + 2] * t[8] + t[11];
  }
  return { positions: out, indices: mesh.indices };
}
