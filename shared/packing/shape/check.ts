/**
 * The server's re-check of a layout packed by shape, run where the parts'
 * meshes are already read (a mesh worker slicing the layout for its
 * estimate): the plan's build as a "pack-instance/2" whose parts are the
 * resting meshes, and the submitted result checked by validateShapeLayout
 * against them. The area profile checked is the one just sliced from the same
 * meshes, not the one the client sent.
 */
import type { FieldProblem, Objective, PackInstanceV2, PackMargin, PackResultV2, PartMesh, Vec3 } from '../types';
import { INSTANCE_FORMAT_V2 } from '../types';
import { validateShapeLayout } from './validate';

export interface ShapeCheck {
  chamber: Vec3;
  margin: PackMargin;
  spacing: number;
  layerHeight: number;
  objective: Objective;
  /** One a plan line: `source` is the index of its part's mesh among the meshes handed in. */
  parts: { id: string; quantity: number; rotations: number[]; size: Vec3; source: number }[];
  result: PackResultV2;
}

/**
 * Problems of the layout, in the result's own field names. A part whose mesh
 * is not at hand (not closed, or its file unreadable) is checked as its box,
 * which keeps apart from everything only when its box does.
 */
export function checkShapeLayout(check: ShapeCheck, meshes: readonly (PartMesh | null)[], slicedArea: ArrayLike<number>): FieldProblem[] {
  const instance: PackInstanceV2 = {
    format: INSTANCE_FORMAT_V2,
    chamber: check.chamber,
    margin: check.margin,
    spacing: check.spacing,
    layerHeight: check.layerHeight,
    objective: check.objective,
    timeLimitMs: 0,
    seed: 0,
    fit: 'shape',
    parts: check.parts.map((p) => {
      const mesh = meshes[p.source] ?? null;
      return { id: p.id, size: mesh ? null : p.size, quantity: p.quantity, rotations: [...p.rotations], meshPath: null, mesh };
    }),
  };
  const layers = check.result.placements.length > 0 ? Math.ceil(check.result.height / check.layerHeight - 1e-9) : 0;
  const area = Array.from({ length: Math.max(0, layers) }, (_, i) => slicedArea[i] ?? 0);
  return validateShapeLayout(instance, { ...check.result, areaProfile: area });
}
