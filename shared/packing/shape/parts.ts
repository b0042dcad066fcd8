/**
 * The parts of a "pack-instance/2" with their shapes ready for packing and
 * checking: the mesh (or, for a part given by its size only, its box as a
 * mesh), bounding box, enclosed volume, watertightness and a tree for exact
 * distance queries.
 */
import { measureMesh } from '../../geometry/metrics';
import type { PackInstanceV2, PartMesh, Vec3 } from '../types';
import { buildBvh, type Bvh } from './bvh';

export interface ShapePart {
  id: string;
  /** Index in instance.parts. */
  index: number;
  quantity: number;
  rotations: number[];
  /** True when the part came with a mesh (its placements carry a transform). */
  hasMesh: boolean;
  mesh: PartMesh;
  /** Bounding box in the part's own coordinates. */
  min: Vec3;
  max: Vec3;
  size: Vec3;
  /** Enclosed volume (mm^3); the box's for a part without a mesh. */
  volume: number;
  watertight: boolean;
  /** What the area profile slices: the mesh, or its bounding box when the mesh is not watertight (it has no inside). */
  sliceMesh: PartMesh;
  /** 1 when the triangles face outwards (positive signed volume), -1 when inward. */
  facing: 1 | -1;
  bvh(): Bvh;
}

/** A closed box [0, size] as 12 outward-facing triangles. */
export function boxMesh(size: readonly number[]): PartMesh {
  const [x, y, z] = size;
  const positions = Float64Array.from([0, 0, 0, x, 0, 0, x, y, 0, 0, y, 0, 0, 0, z, x, 0, z, x, y, z, 0, y, z]);
  const indices = Uint32Array.from([0, 2, 1, 0, 3, 2, 4, 5, 6, 4, 6, 7, 0, 1, 5, 0, 5, 4, 1, 2, 6, 1, 6, 5, 2, 3, 7, 2, 7, 6, 3, 0, 4, 3, 4, 7]);
  return { positions, indices };
}

/**
 * Prepares every part. Throws when a mesh part's mesh has not been attached:
 * the caller (command line, worker) loads the files first.
 */
export function shapeParts(instance: PackInstanceV2): ShapePart[] {
  return instance.parts.map((p, index) => {
    let mesh = p.mesh;
    const hasMesh = mesh !== null;
    if (!mesh) {
      if (p.meshPath !== null) throw new Error(`parts[${index}].mesh "${p.meshPath}" has not been loaded`);
      mesh = boxMesh(p.size!);
    }
    const m = measureMesh(mesh);
    let tree: Bvh | null = null;
    const size: Vec3 = [m.sizeMm[0], m.sizeMm[1], m.sizeMm[2]];
    // An open mesh encloses no definite volume: it counts as its bounding box.
    const boxed = boxMesh(size);
    for (let i = 0; i < boxed.positions.length; i++) boxed.positions[i] += m.bboxMinMm[i % 3];
    return {
      id: p.id,
      index,
      quantity: p.quantity,
      rotations: p.rotations,
      hasMesh,
      mesh,
      min: m.bboxMinMm,
      max: m.bboxMaxMm,
      size,
      volume: m.watertight ? Math.abs(m.volumeMm3) : size[0] * size[1] * size[2],
      watertight: m.watertight,
      sliceMesh: m.watertight ? mesh : boxed,
      facing: m.watertight && m.volumeMm3 < 0 ? -1 : 1,
      bvh() {
        tree ??= buildBvh(mesh);
        return tree;
      },
    };
  });
}
