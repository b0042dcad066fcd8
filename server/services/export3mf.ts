import { QueryTypes } from 'sequelize';
import type { Database } from '../db';
import { AppError, conflict, notFound } from '../errors';
import type { FileStorage } from '../storage';
import type { LayoutsService } from './layouts';
import { checkPlanId } from './planCommon';
import { parseMeshFile, placementTransform, rotationIndex, write3mf, type ThreeMfItemInput, type ThreeMfObjectInput } from '../../shared/geometry';
import { restingMesh } from '../../shared/geometry/layoutSlices';
import type { Placement } from '../../shared/packing';
import type { PlanStatus } from '../../shared/plans/status';

/** A build sheet or a build file makes sense once a lead has approved the plan; a record stays readable afterwards. */
export const EXPORTABLE_STATUSES: readonly PlanStatus[] = ['approved', 'queued', 'printing', 'cooling', 'breakout', 'finishing', 'done', 'aborted'];

export function checkExportable(status: PlanStatus, what: string) {
  if (!EXPORTABLE_STATUSES.includes(status)) {
    throw conflict('not_approved', `The ${what} is made for approved plans; this plan is ${status.replace('_', ' ')}.`, undefined, { status });
  }
}

type PartFileRow = {
  request_line_id: string;
  part_id: string;
  part_name: string;
  file_key: string;
  file_name: string;
  file_unit: 'mm' | 'cm' | 'inch';
  file_split: boolean;
  file_part_index: number;
  rotation_deg: number[];
};

/**
 * The packed build as one 3MF package: each part's mesh once (read from its
 * stored file, turned by its stored rotation) and one build item per placement
 * with the placement's orientation and position as its transform.
 */
export function export3mfService(db: Database, deps: { storage: FileStorage; layouts: LayoutsService }) {
  const { sequelize } = db;

  return {
    async build(labId: string, planId: string): Promise<{ name: string; bytes: Uint8Array }> {
      const [plan] = await sequelize.query<{ id: string; name: string; status: PlanStatus; chosen_layout_id: string | null }>(
        'SELECT id, name, status, chosen_layout_id FROM plans WHERE id = $1 AND lab_id = $2',
        { bind: [checkPlanId(planId), labId], type: QueryTypes.SELECT },
      );
      if (!plan) throw notFound('That plan');
      checkExportable(plan.status, 'build file');
      if (!plan.chosen_layout_id) throw conflict('no_chosen_layout', 'This plan has no chosen layout to export.');
      const layout = await deps.layouts.get(labId, plan.id, plan.chosen_layout_id);
      const parts = await sequelize.query<PartFileRow>(
        `SELECT pl.request_line_id, p.id AS part_id, p.name AS part_name, p.file_key, p.file_name, p.file_unit, p.file_split,
                p.file_part_index, p.rotation_deg
           FROM plan_lines pl JOIN request_lines rl ON rl.id = pl.request_line_id JOIN parts p ON p.id = rl.part_id
          WHERE pl.plan_id = $1 ORDER BY pl.position`,
        { bind: [plan.id], type: QueryTypes.SELECT },
      );
      const byLine = new Map(parts.map((p) => [p.request_line_id, p]));
      const objects: ThreeMfObjectInput[] = [];
      const objectOf = new Map<string, { index: number; extentMm: number[] }>();
      for (const part of parts) {
        if (objectOf.has(part.part_id)) continue;
        const bytes = await deps.storage.get(part.file_key);
        if (!bytes) throw conflict('part_file_missing', `The stored file of "${part.part_name}" is missing, so the build cannot be exported.`);
        const parsed = parseMeshFile(new Uint8Array(bytes.buffer, bytes.byteOffset, bytes.byteLength), {
          filename: part.file_name,
          unit: part.file_unit,
          splitObjects: part.file_split,
        });
        const mesh = parsed.ok ? parsed.parts[part.file_part_index] : undefined;
        if (!mesh) {
          throw conflict('part_file_unreadable', `The stored file of "${part.part_name}" (${part.file_name}) cannot be read as a mesh, so the build cannot be exported.`);
        }
        const resting = restingMesh(mesh, part.rotation_deg);
        objectOf.set(part.part_id, { index: objects.length, extentMm: resting.extentMm });
        objects.push({ name: part.part_name, positions: resting.positions, indices: mesh.indices });
      }
      const items: ThreeMfItemInput[] = layout.result.placements.map((p: Placement, i: number) => {
        const part = byLine.get(p.id);
        if (!part) throw new AppError(500, 'corrupt_layout', `Placement ${i} names a line that is not in the plan.`);
        const object = objectOf.get(part.part_id)!;
        // The resting mesh fills [0, extent]; the placement's rotation and corner give its 3MF transform.
        const transform = placementTransform(rotationIndex(p.orientation), [0, 0, 0], object.extentMm, p.position);
        return { objectIndex: object.index, transform, partNumber: `${i + 1}` };
      });
      return { name: plan.name, bytes: write3mf(objects, items, 'millimeter') };
    },
  };
}
export type Export3mfService = ReturnType<typeof export3mfService>;
