import { readFileSync } from 'node:fs';
import path from 'node:path';
import type { MeshData } from '../../../shared/geometry';

export const FIXTURES = path.join(__dirname, '../../fixtures/meshes');

export function fixture(name: string): Uint8Array {
  return new Uint8Array(readFileSync(path.join(FIXTURES, name)));
}

/** The tetrahedron (0,0,0), (1,0,0), (0,1,0), (0,0,1) with outward, counter-clockwise faces. */
export function tetrahedron(): MeshData {
  return {
    positions: Float64Array.from([0, 0, 0, 1, 0, 0, 0, 1, 0, 0, 0, 1]),
    indices: Uint32Array.from([0, 2, 1, 0, 1, 3, 0, 3, 2, 1, 2, 3]),
  };
}

/** An axis-aligned box from the origin, twelve outward triangles. */
export function box(x = 1, y = 1, z = 1): MeshData {
  const positions = Float64Array.from([0, 0, 0, x, 0, 0, x, y, 0, 0, y, 0, 0, 0, z, x, 0, z, x, y, z, 0, y, z]);
  const quads = [
    [0, 3, 2, 1],
    [4, 5, 6, 7],
    [0, 1, 5, 4],
    [1, 2, 6, 5],
    [2, 3, 7, 6],
    [3, 0, 4, 7],
  ];
  const indices = Uint32Array.from(quads.flatMap(([a, b, c, d]) => [a, b, c, a, c, d]));
  return { positions, indices };
}

export function translate(mesh: MeshData, dx: number, dy: number, dz: number): MeshData {
  const positions = mesh.positions.slice();
  for (let i = 0; i < positions.length; i += 3) {
    positions[i] += dx;
    positions[i + 1] += dy;
    positions[i + 2] += dz;
  }
  return { positions, indices: mesh.indices.slice() };
}

export function flipAll(mesh: MeshData): MeshData {
  const indices = mesh.indices.slice();
  for (let f = 0; f < indices.length; f += 3) [indices[f + 1], indices[f + 2]] = [indices[f + 2], indices[f + 1]];
  return { positions: mesh.positions.slice(), indices };
}

/**
 * A binary STL written field by field after the StereoLithography Interface
 * Specification (1989): 80-byte header, uint32 count, then per facet a normal
 * and three vertices as little-endian float32 and a uint16 attribute count.
 */
export function handWrittenBinaryStl(mesh: MeshData, header = ''): Uint8Array {
  const count = mesh.indices.length / 3;
  const bytes = new Uint8Array(84 + 50 * count);
  const view = new DataView(bytes.buffer);
  for (let i = 0; i < Math.min(80, header.length); i++) bytes[i] = header.charCodeAt(i);
  view.setUint32(80, count, true);
  for (let f = 0; f < count; f++) {
    const o = 84 + 50 * f;
    // normal left at 0: readers must not depend on it
    for (let k = 0; k < 3; k++) {
      const v = mesh.indices[f * 3 + k] * 3;
      view.setFloat32(o + 12 + k * 12, mesh.positions[v], true);
      view.setFloat32(o + 16 + k * 12, mesh.positions[v + 1], true);
      view.setFloat32(o + 20 + k * 12, mesh.positions[v + 2], true);
    }
    view.setUint16(o + 48, 0, true);
  }
  return bytes;
}
