/**
 * Layouts packed by the parts' shapes in the editor: what the packing worker
 * needs to pack by shape (each line's stored file and the rotations its rule
 * allows) and the "pack-result/2" it is kept as (editorModel.isByShape
 * tells such a layout apart).
 */
import { placementRotation, RESULT_FORMAT_V2, type PackInstanceInput, type PackResult } from '../../shared/packing';
import { ROTATION_CODES } from '../../shared/geometry/rotations';
import { RULE_ROTATIONS, ruleOfOrientations } from '../../shared/plans/instance';
import type { PackResultV2Input } from '../../shared/schemas/plans';
import type { PartView } from '../../shared/schemas/parts';
import type { ShapeFiles } from '../../workers/protocol';
import { profilePartOf } from './useWorkingProfile';

/** The packing worker's shape files for the instance's parts; null when a line's part record is missing. */
export function shapeFilesOf(labId: string, instance: Pick<PackInstanceInput, 'parts'>, partOfLine: (requestLineId: string) => PartView | undefined): ShapeFiles | null {
  const parts: ShapeFiles['parts'] = [];
  for (const p of instance.parts) {
    const part = partOfLine(p.id);
    if (!part) return null;
    parts.push({ id: p.id, file: profilePartOf(labId, part), rotations: [...RULE_ROTATIONS[ruleOfOrientations(p.orientations)]] });
  }
  return { parts };
}

/**
 * The layout as the server keeps a packing by shape: signed rotation codes
 * and the transforms. The server checks it against the meshes and stores the
 * sections it slices itself, so no area profile is sent.
 */
export function shapeResultOf(result: PackResult): PackResultV2Input {
  return {
    format: RESULT_FORMAT_V2,
    placements: result.placements.map((p) => ({
      id: p.id,
      position: [...p.position],
      size: [...p.size],
      // A part packed by its box (no closed mesh) keeps its box code, as the shape engine writes it.
      orientation: p.transform ? ROTATION_CODES[placementRotation(p)] : p.orientation,
      ...(p.transform ? { transform: [...p.transform] } : {}),
    })),
    unplaced: result.unplaced.map((u) => ({ ...u })),
    height: result.height,
    layers: result.layers,
    utilization: result.utilization,
    elapsedMs: result.elapsedMs,
  };
}
