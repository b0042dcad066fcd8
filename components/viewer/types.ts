/**
 * Plain data the 3D views take. The mesh worker returns the same shapes
 * (components/ does not import workers/: the worker is started by URL, so its
 * answer is typed again here and checked when it arrives).
 */
import type { Vec3 } from './math';

/** A triangle mesh ready to draw: millimetres, z up (the build direction). */
export interface ViewMesh {
  positions: Float32Array;
  indices: Uint32Array;
  /** Bounding box extent; computed from the positions when left out. */
  sizeMm?: Vec3;
  bboxMinMm?: Vec3;
  bboxMaxMm?: Vec3;
  triangles?: number;
  partNames?: string[];
}

export interface MeshProblem {
  code: string;
  message: string;
  field?: string;
}

export type ParseMeshResult = { ok: true; mesh: Required<ViewMesh> } | { ok: false; problems: MeshProblem[] };

/** The comlink-exposed API of workers/mesh.worker.ts. */
export interface MeshWorkerApi {
  parseMesh(bytes: ArrayBuffer, filename: string, unit: 'mm' | 'cm' | 'inch', options?: { partName?: string }): Promise<ParseMeshResult>;
}

/**
 * A layout as the chamber view draws it: typed arrays, one entry (or triple)
 * per placement. `partIndex` names the part (an index into the plan's parts),
 * `lineIndex` the request line it fills.
 */
export interface ChamberPlacements {
  /** Minimum corner x, y, z of each placed box, mm. */
  positions: Float32Array | Float64Array;
  /** Placed extent x, y, z, mm. */
  sizes: Float32Array | Float64Array;
  partIndex: Uint32Array;
  lineIndex: Uint32Array;
  /** Orientation codes (xyz, xzy, yxz, yzx, zxy, zyx = 0..5); a mesh is drawn as placed. Boxes need none. */
  orientations?: Uint8Array;
}

/** A part's mesh for the chamber view, in the part's own axes. */
export interface PartMesh {
  positions: Float32Array;
  indices: Uint32Array;
  sizeMm: Vec3;
}
