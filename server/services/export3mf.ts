import type { Database } from '../db';
import { plansRepository } from '../db/repositories/plans';
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

/**
 * The packed build as one 3MF package: each part's mesh once (read from its
 * stored file, turned by its stored rotation) and one build item per placement
 * with the placement's orientation and position as its transform.
 */
export function export3mfService(db: Database, deps: { storage: FileStorage; layouts: LayoutsService }) {
  const plans = plansRepository(db);

  return {
    async build(labId: string, planId: string): Promise<{ name: string; bytes: Uint8Array }> {
      const plan = await plans.head(labId, checkPlanId(planId));
      if (!plan) throw notFound('That plan');
      checkExportable(plan.status, 'build file');
      if (!plan.chosenLayoutId) throw conflict('no_chosen_layout', 'This plan has no chosen layout to export.');
      const layout = await deps.layouts.get(labId, plan.id, plan.chosenLayoutId);
      const parts = await plans.partFiles(plan.id);
      const byLine = new Map(parts.map((p) => [p.requestLineId, p]));
      const objects: ThreeMfObjectInput[] = [];
      const objectOf = new Map<string, { index: number; extentMm: number[] }>();
      for (const part of parts) {
        if (objectOf.has(part.partId)) continue;
        const bytes = await deps.storage.get(part.fileKey);
        if (!bytes) throw conflict('part_file_missing', `The stored file of "${part.partName}" is missing, so the build cannot be exported.`);
        const parsed = parseMeshFile(new Uint8Array(bytes.buffer, bytes.byteOffset, bytes.byteLength), {
          filename: part.fileName,
          unit: part.fileUnit,
          splitObjects: part.fileSplit,
        });
        const mesh = parsed.ok ? parsed.parts[part.filePartIndex] : undefined;
        if (!mesh) {
          throw conflict('part_file_unreadable', `The stored file of "${part.partName}" (${part.fileName}) cannot be read as a mesh, so the build cannot be exported.`);
        }
        const resting = restingMesh(mesh, part.rotationDeg);
        objectOf.set(part.partId, { index: objects.length, extentMm: resting.extentMm });
        objects.push({ name: part.partName, positions: resting.positions, indices: mesh.indices });
      }
      const items: ThreeMfItemInput[] = layout.result.placements.map((p: Placement, i: number) => {
        const part = byLine.get(p.id);
        if (!part) throw new AppError(500, 'corrupt_layout', `Placement ${i} names a line that is not in the plan.`);
        const object = objectOf.get(part.partId)!;
        // The resting mesh fills [0, extent]; the placement's rotation and corner give its 3MF transform.
        // A layout packed by shape carries the transform itself (its rotation may be any of the 24, not only a box orientation).
        const transform = p.transform ?? placementTransform(rotationIndex(p.orientation), [0, 0, 0], object.extentMm, p.position);
        return { objectIndex: object.index, transform, partNumber: `${i + 1}` };
      });
      return { name: plan.name, bytes: write3mf(objects, items, 'millimeter') };
    },
  };
}
export type Export3mfService = ReturnType<typeof export3mfService>;
