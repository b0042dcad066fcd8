/**
 * Measures a triangle mesh (lengths in mm):
 *
 * - volume = 1/6 Σ v0 · (v1 × v2) over the triangles (signed tetrahedra; Zhang &
 *   Chen, "Efficient feature extraction for 2D/3D objects in mesh
 *   representation", ICIP 2001), taken about the bounding box centre so that
 *   parts far from the origin keep their precision;
 * - area = 1/2 Σ |(v1 − v0) × (v2 − v0)|;
 * - watertight: every undirected edge lies in exactly two triangles; oriented:
 *   each directed edge (a, b) is met by its reverse (b, a) (3MF Core §4.1);
 * - shells: connected components of triangles sharing vertices (union-find).
 *
 * Edges are counted without hashing: every edge is listed under its lower
 * vertex (a compressed adjacency list built in two passes), each vertex's short
 * list is sorted, and runs of equal neighbours give the edge's use counts.
 */
import type { MeshData } from './types';

export interface MeshMetrics {
  bboxMinMm: [number, number, number];
  bboxMaxMm: [number, number, number];
  sizeMm: [number, number, number];
  /** Signed: negative when the triangles face inward. */
  volumeMm3: number;
  areaMm2: number;
  triangles: number;
  /** Vertices used by at least one triangle. */
  vertices: number;
  /** Distinct undirected edges. */
  edges: number;
  shells: number;
  /** Edges used by one triangle only. */
  openEdges: number;
  /** Edges used by more than two triangles. */
  nonManifoldEdges: number;
  /** Edges whose triangles run along them in the same direction (|uses a→b − uses b→a| > 1). */
  misorientedEdges: number;
  watertight: boolean;
  oriented: boolean;
  /** V − E + F: 2 per closed genus-0 shell (Euler's formula). */
  eulerCharacteristic: number;
}

export function measureMesh(mesh: MeshData): MeshMetrics {
  const { positions: p, indices: t } = mesh;
  const vertexCount = p.length / 3;
  const triangleCount = t.length / 3;

  const used = new Uint8Array(vertexCount);
  let minX = Infinity, minY = Infinity, minZ = Infinity;
  let maxX = -Infinity, maxY = -Infinity, maxZ = -Infinity;
  for (let i = 0; i < t.length; i++) {
    const v = t[i];
    if (used[v]) continue;
    used[v] = 1;
    const o = v * 3;
    const x = p[o], y = p[o + 1], z = p[o + 2];
    if (x < minX) minX = x;
    if (x > maxX) maxX = x;
    if (y < minY) minY = y;
    if (y > maxY) maxY = y;
    if (z < minZ) minZ = z;
    if (z > maxZ) maxZ = z;
  }
  let usedVertices = 0;
  for (let v = 0; v < vertexCount; v++) usedVertices += used[v];
  if (usedVertices === 0) {
    minX = minY = minZ = maxX = maxY = maxZ = 0;
  }
  const cx = (minX + maxX) / 2, cy = (minY + maxY) / 2, cz = (minZ + maxZ) / 2;

  let volume6 = 0;
  let area2 = 0;
  for (let f = 0; f < t.length; f += 3) {
    const a = t[f] * 3, b = t[f + 1] * 3, c = t[f + 2] * 3;
    const ax = p[a] - cx, ay = p[a + 1] - cy, az = p[a + 2] - cz;
    const bx = p[b] - cx, by = p[b + 1] - cy, bz = p[b + 2] - cz;
    const qx = p[c] - cx, qy = p[c + 1] - cy, qz = p[c + 2] - cz;
    volume6 += ax * (by * qz - bz * qy) + ay * (bz * qx - bx * qz) + az * (bx * qy - by * qx);
    const ux = bx - ax, uy = by - ay, uz = bz - az;
    const wx = qx - ax, wy = qy - ay, wz = qz - az;
    const nx = uy * wz - uz * wy, ny = uz * wx - ux * wz, nz = ux * wy - uy * wx;
    area2 += Math.sqrt(nx * nx + ny * ny + nz * nz);
  }

  // Compressed adjacency: for every triangle edge, the higher vertex and the direction, filed under the lower vertex.
  const start = new Uint32Array(vertexCount + 1);
  for (let f = 0; f < t.length; f += 3) {
    for (let k = 0; k < 3; k++) {
      const a = t[f + k], b = t[f + (k === 2 ? 0 : k + 1)];
      start[(a < b ? a : b) + 1]++;
    }
  }
  for (let v = 0; v < vertexCount; v++) start[v + 1] += start[v];
  const fill = start.slice(0, vertexCount);
  // Neighbour * 2 + direction (1 when the triangle runs from the lower vertex to the higher).
  const entry = new Float64Array(t.length);
  for (let f = 0; f < t.length; f += 3) {
    for (let k = 0; k < 3; k++) {
      const a = t[f + k], b = t[f + (k === 2 ? 0 : k + 1)];
      if (a < b) entry[fill[a]++] = b * 2 + 1;
      else entry[fill[b]++] = a * 2;
    }
  }

  let edges = 0, openEdges = 0, nonManifoldEdges = 0, misorientedEdges = 0;
  for (let v = 0; v < vertexCount; v++) {
    const s = start[v], e = start[v + 1];
    // Insertion sort: a vertex has few edges filed under it.
    for (let i = s + 1; i < e; i++) {
      const x = entry[i];
      let j = i - 1;
      while (j >= s && entry[j] > x) {
        entry[j + 1] = entry[j];
        j--;
      }
      entry[j + 1] = x;
    }
    let i = s;
    while (i < e) {
      const neighbour = Math.floor(entry[i] / 2);
      let forward = 0, backward = 0;
      while (i < e && Math.floor(entry[i] / 2) === neighbour) {
        if (entry[i] % 2 === 1) forward++;
        else backward++;
        i++;
      }
      edges++;
      const uses = forward + backward;
      if (uses === 1) openEdges++;
      else if (uses > 2) nonManifoldEdges++;
      if (Math.abs(forward - backward) > 1) misorientedEdges++;
    }
  }

  const shells = countShells(t, vertexCount, used);
  return {
    bboxMinMm: [minX, minY, minZ],
    bboxMaxMm: [maxX, maxY, maxZ],
    sizeMm: [maxX - minX, maxY - minY, maxZ - minZ],
    volumeMm3: volume6 / 6,
    areaMm2: area2 / 2,
    triangles: triangleCount,
    vertices: usedVertices,
    edges,
    shells,
    openEdges,
    nonManifoldEdges,
    misorientedEdges,
    watertight: triangleCount > 0 && openEdges === 0 && nonManifoldEdges === 0,
    oriented: misorientedEdges === 0,
    eulerCharacteristic: usedVertices - edges + triangleCount,
  };
}

function countShells(t: Uint32Array, vertexCount: number, used: Uint8Array): number {
  const parent = new Int32Array(vertexCount);
  for (let v = 0; v < vertexCount; v++) parent[v] = v;
  const find = (v: number): number => {
    while (parent[v] !== v) {
      parent[v] = parent[parent[v]];
      v = parent[v];
    }
    return v;
  };
  for (let f = 0; f < t.length; f += 3) {
    const a = find(t[f]);
    const b = find(t[f + 1]);
    const c = find(t[f + 2]);
    if (a !== b) parent[b] = a;
    const ac = find(c);
    if (ac !== a) parent[ac] = a;
  }
  let shells = 0;
  for (let v = 0; v < vertexCount; v++) if (used[v] && find(v) === v) shells++;
  return shells;
}

export type MeshWarningCode =
  | 'not-watertight'
  | 'inconsistent-orientation'
  | 'inside-out'
  | 'maybe-wrong-unit-small'
  | 'too-large-for-machines'
  | 'thin'
  | 'empty-facets';

export interface MeshWarning {
  code: MeshWarningCode;
  message: string;
}

export interface WarningOptions {
  /** Largest usable chamber of the lab's machines (mm); no size check above when absent. */
  largestChamberMm?: readonly [number, number, number];
  /** Below this every dimension suggests the file was drawn in another unit (common practice: 2 mm). */
  smallPartMm?: number;
  /** A mean wall below this is flagged as thin (common practice for nylon powder-bed parts: about 0.8 mm; a lab setting). */
  thinWallMm?: number;
}

/**
 * Warnings that do not stop an upload. The mean wall is estimated as 2 V / A,
 * which is the thickness of a plate (two faces of area A/2 each).
 */
export function meshWarnings(m: MeshMetrics, options: WarningOptions = {}): MeshWarning[] {
  const warnings: MeshWarning[] = [];
  const smallMm = options.smallPartMm ?? 2;
  const thinMm = options.thinWallMm ?? 0.8;
  if (!m.watertight) {
    const parts = [];
    if (m.openEdges > 0) parts.push(`${m.openEdges} open edge${m.openEdges === 1 ? '' : 's'}`);
    if (m.nonManifoldEdges > 0) parts.push(`${m.nonManifoldEdges} edge${m.nonManifoldEdges === 1 ? '' : 's'} shared by more than two triangles`);
    warnings.push({ code: 'not-watertight', message: `The mesh is not closed (${parts.join(', ')}); its volume may be wrong and it may not print as intended.` });
  }
  if (!m.oriented) {
    warnings.push({ code: 'inconsistent-orientation', message: `Some triangles face the wrong way (${m.misorientedEdges} edge${m.misorientedEdges === 1 ? '' : 's'} where neighbours disagree).` });
  }
  if (m.volumeMm3 < 0) {
    warnings.push({ code: 'inside-out', message: 'The triangles face inward (the volume comes out negative): the mesh is inside out.' });
  }
  const [x, y, z] = m.sizeMm;
  if (x < smallMm && y < smallMm && z < smallMm) {
    warnings.push({
      code: 'maybe-wrong-unit-small',
      message: `The part is only ${fmt(x)} x ${fmt(y)} x ${fmt(z)} mm: if it was drawn in centimetres or inches, upload it again with that unit.`,
    });
  }
  if (options.largestChamberMm) {
    const part = [x, y, z].sort((a, b) => a - b);
    const chamber = [...options.largestChamberMm].sort((a, b) => a - b);
    if (part.some((d, i) => d > chamber[i])) {
      warnings.push({
        code: 'too-large-for-machines',
        message: `The part (${fmt(x)} x ${fmt(y)} x ${fmt(z)} mm) does not fit the largest machine's chamber (${chamber.map(fmt).join(' x ')} mm) in any axis-aligned orientation; check the unit.`,
      });
    }
  }
  if (m.areaMm2 > 0 && m.volumeMm3 > 0) {
    const wallMm = (2 * m.volumeMm3) / m.areaMm2;
    if (wallMm < thinMm) {
      warnings.push({ code: 'thin', message: `The walls are thin: about ${fmt(wallMm)} mm on average, under ${fmt(thinMm)} mm.` });
    }
  }
  return warnings;
}

function fmt(n: number): string {
  return n >= 100 ? n.toFixed(0) : n >= 1 ? n.toFixed(1) : n.toPrecision(2);
}
