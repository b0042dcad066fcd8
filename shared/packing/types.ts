/**
 * Packing instance and result, as exchanged by the command line, the server,
 * the worker and the tests. Lengths in millimetres, times in milliseconds,
 * build direction +z with z = 0 on the chamber floor (ISO/ASTM 52921).
 */

import type { Transform12 } from '../geometry/rotations';

/** The 12 numbers of a 3MF transform (3MF Core §3.3, row vectors: p' = [x y z 1] M). */
export type { Transform12 };

export const INSTANCE_FORMAT = 'pack-instance/1' as const;
export const RESULT_FORMAT = 'pack-result/1' as const;

/**
 * A permutation of the part's own axes: the placed extent along chamber x, y, z
 * is the part's extent along the first, second and third letter.
 */
export type Orientation = 'xyz' | 'xzy' | 'yxz' | 'yzx' | 'zxy' | 'zyx';
export const ORIENTATIONS: readonly Orientation[] = ['xyz', 'xzy', 'yxz', 'yzx', 'zxy', 'zyx'];

export type Objective = 'min-height' | 'max-volume';
export const OBJECTIVES: readonly Objective[] = ['min-height', 'max-volume'];

export type Vec3 = [number, number, number];

export interface PackMargin {
  /** Keep-out from each side wall. */
  xy: number;
  /** Keep-out under the lowest part. */
  bottom: number;
  /** Keep-out over the highest part. */
  top: number;
}

export interface PackPart {
  /** Unique within the instance. */
  id: string;
  /** Bounding box in the part's own axes. */
  size: Vec3;
  quantity: number;
  /** Allowed orientations; every one of the six when absent from the input. */
  orientations: Orientation[];
}

/** An instance after parsing: every default applied. */
export interface PackInstance {
  format: typeof INSTANCE_FORMAT;
  /** Inner build volume x, y, z. */
  chamber: Vec3;
  margin: PackMargin;
  /** Minimum gap between any two parts. */
  spacing: number;
  layerHeight: number;
  objective: Objective;
  timeLimitMs: number;
  seed: number;
  parts: PackPart[];
}

/** What a caller may send: the optional fields of the instance may be left out. */
export interface PackInstanceInput {
  format: typeof INSTANCE_FORMAT;
  chamber: Vec3;
  margin?: Partial<PackMargin>;
  spacing?: number;
  layerHeight?: number;
  objective?: Objective;
  timeLimitMs?: number;
  seed?: number;
  parts: Array<{ id: string; size: Vec3; quantity: number; orientations?: Orientation[] }>;
}

export interface Placement {
  id: string;
  /** Minimum corner of the placed box. */
  position: Vec3;
  /** Placed extent along chamber x, y, z (after the orientation). */
  size: Vec3;
  orientation: Orientation;
  /**
   * Parts packed with their true shapes: the transform from the part's file
   * coordinates to the chamber. Its 3x3 block is one of the 24 quarter-turn
   * rotations (shared/geometry/rotations.ts), whose extents `orientation` names.
   */
  transform?: Transform12;
}

export interface Unplaced {
  id: string;
  count: number;
}

export interface PackResult {
  format: typeof RESULT_FORMAT;
  placements: Placement[];
  /** Only ids with count > 0. */
  unplaced: Unplaced[];
  /** Top of the highest placed part, from the floor (0 when nothing is placed). */
  height: number;
  /** ceil((height + margin.top) / layerHeight); 0 when nothing is placed. */
  layers: number;
  utilization: number;
  elapsedMs: number;
  /** Summed cross-section area (mm^2) of the placed parts at the middle of each layer from z = 0, when known from their shapes. */
  areaProfile?: number[];
  /** Summed contour length (mm) of the placed parts in each layer from z = 0, when known from their shapes. */
  contourProfile?: number[];
}

/** A problem found at a boundary, naming the field, e.g. `parts[3].size[1]`. */
export interface FieldProblem {
  field: string;
  message: string;
}

export function formatProblem(p: FieldProblem): string {
  return `${p.field} ${p.message}`;
}

// ---------------------------------------------------------------------------
// Parts with their true shapes: "pack-instance/2" and "pack-result/2".

export const INSTANCE_FORMAT_V2 = 'pack-instance/2' as const;
export const RESULT_FORMAT_V2 = 'pack-result/2' as const;

/** How every part of an instance is packed: by its bounding box, or by its shape. */
export type Fit = 'box' | 'shape';
export const FITS: readonly Fit[] = ['box', 'shape'];

/** A triangle mesh in millimetres, in the part's own (file) coordinates. */
export interface PartMesh {
  positions: Float64Array;
  indices: Uint32Array;
}

export interface PackPartV2 {
  id: string;
  /** Bounding box in the part's own axes (the mesh's, once the mesh is loaded). */
  size: Vec3 | null;
  quantity: number;
  /** Allowed quarter-turn rotations, as indices 0..23 of shared/geometry/rotations. */
  rotations: number[];
  /** The mesh file as given, relative to the instance file (or the current directory for standard input). */
  meshPath: string | null;
  /** The mesh itself, once loaded (or when sent inline, e.g. to the worker). */
  mesh: PartMesh | null;
}

/** A version 2 instance after parsing: every default applied; meshes possibly still to load. */
export interface PackInstanceV2 {
  format: typeof INSTANCE_FORMAT_V2;
  chamber: Vec3;
  margin: PackMargin;
  spacing: number;
  layerHeight: number;
  objective: Objective;
  timeLimitMs: number;
  seed: number;
  fit: Fit;
  parts: PackPartV2[];
}

export interface PlacementV2 {
  id: string;
  /** Minimum corner of the placed part's bounding box. */
  position: Vec3;
  /** Extent of the placed part's bounding box along chamber x, y, z. */
  size: Vec3;
  /** The signed rotation code ("-y+x+z") of the transform. */
  orientation: string;
  /** 3MF transform (row vectors, p' = [x y z 1] M) from the part's file coordinates to the chamber; mesh parts only. */
  transform?: number[];
}

/** A part packed otherwise than asked, and why (e.g. a mesh that is not watertight packed by its box). */
export interface PackWarning {
  id: string;
  code: string;
  message: string;
}

export interface PackResultV2 {
  format: typeof RESULT_FORMAT_V2;
  /** In lift-out order: in reverse, each can be lifted straight up clear of the ones listed before it. */
  placements: PlacementV2[];
  unplaced: Unplaced[];
  height: number;
  layers: number;
  /** Placed meshes' volume (boxes for parts without a mesh) over the denominators of version 1. */
  utilization: number;
  elapsedMs: number;
  /** mm^2 per layer from z = 0, ceil(height / layerHeight) numbers. */
  areaProfile: number[];
  /** mm of contour per layer, where known. */
  contourProfile?: number[];
  warnings?: PackWarning[];
}
