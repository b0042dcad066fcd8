/**
 * The mesh worker's API as seen through comlink (workers/mesh.worker.ts is
 * the worker; components/viewer starts it by URL and imports only these
 * types). Meshes cross the thread boundary as transferred typed arrays.
 */
import type { LengthUnit, ProblemCode } from '../shared/geometry';

export interface ViewMesh {
  /** xyz triples in millimetres, in the file's own coordinates (z is the build direction). */
  positions: Float32Array;
  /** Three vertex indices a triangle. */
  indices: Uint32Array;
  bboxMinMm: [number, number, number];
  bboxMaxMm: [number, number, number];
  sizeMm: [number, number, number];
  triangles: number;
  /** Parts found in the file (a 3MF may hold several); the mesh holds them all unless one was asked for. */
  partNames: string[];
}

export interface MeshProblem {
  code: ProblemCode | 'bad-request' | 'part-not-found';
  message: string;
  /** The argument at fault, for a malformed request. */
  field?: string;
}

export type ParseMeshResult = { ok: true; mesh: ViewMesh } | { ok: false; problems: MeshProblem[] };

export interface ParseMeshOptions {
  /** Draw only the part of this name (a 3MF with several objects). */
  partName?: string;
}

export interface MeshWorkerApi {
  parseMesh(bytes: ArrayBuffer, filename: string, unit: LengthUnit, options?: ParseMeshOptions): Promise<ParseMeshResult>;
}
