/**
 * The mesh worker's API as seen through comlink (workers/mesh.worker.ts is
 * the worker; components/viewer starts it by URL and imports only these
 * types). Meshes cross the thread boundary as transferred typed arrays.
 */
import type { LengthUnit, ProblemCode } from '../shared/geometry';
import type { ProfileLayoutPlacement } from '../shared/geometry/layoutSlices';

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

/** One distinct part of a layout on screen and where its stored file is (as the server slices a kept layout). */
export interface LayoutProfilePart {
  /** Names the turned mesh for the worker's caches: file hash, part in the file, stored turns (the server's key). */
  key: string;
  /** The stored file's download address; null when the part has no closed mesh (it counts as its box). */
  url: string | null;
  filename: string;
  unit: LengthUnit;
  split: boolean;
  partIndex: number;
  rotationDeg: [number, number, number];
  /** Closed and consistently oriented: only such a mesh has sections. */
  watertight: boolean;
}

export interface LayoutProfileJob {
  parts: LayoutProfilePart[];
  placements: ProfileLayoutPlacement[];
  layerHeightMm: number;
  layers: number;
}

export type LayoutProfileAnswer =
  | {
      ok: true;
      /** Summed section area (mm^2) and contour (mm) at the middle of each layer. */
      areaProfile: Float64Array;
      contourProfile: Float64Array;
      meshPlacements: number;
      boxPlacements: number;
      /** Parts (by index in the job) counted as their box, and why. */
      boxReasons: { part: number; reason: string }[];
    }
  | { ok: false; message: string };

export interface MeshWorkerApi {
  parseMesh(bytes: ArrayBuffer, filename: string, unit: LengthUnit, options?: ParseMeshOptions): Promise<ParseMeshResult>;
  /** Slices a layout's parts from their stored files (downloaded and cached by the worker) for the editor's estimates. */
  profileLayout(job: LayoutProfileJob): Promise<LayoutProfileAnswer>;
}
