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

/** A plan's part, read once from its stored file and turned by its stored rotation: the mesh its placements place. */
export interface PlanPartMesh {
  name: string;
  positions: Float64Array;
  indices: Uint32Array;
  extentMm: number[];
}

/**
 * The meshes of a plan's parts, by part id, and each request line's part id. A file that is missing or cannot be
 * read is a 409 naming the part and what it is needed for (`what`).
 */
export async function readPlanMeshes(plans: ReturnType<typeof plansRepository>, storage: FileStorage, planId: string, what: string): Promise<{ meshes: Map<string, PlanPartMesh>; partOfLine: Map<string, string> }> {
  const parts = await plans.partFiles(planId);
  const meshes = new Map<string, PlanPartMesh>();
  for (const part of parts) {
    if (meshes.has(part.partId)) continue;
    const bytes = await storage.get(part.fileKey);
    if (!bytes) throw conflict('part_file_missing', `The stored file of "${part.partName}" is missing, so ${what}.`);
    const parsed = parseMeshFile(new Uint8Array(bytes.buffer, bytes.byteOffset, bytes.byteLength), {
      filename: part.fileName,
      unit: part.fileUnit,
      splitObjects: part.fileSplit,
    });
    const mesh = parsed.ok ? parsed.parts[part.filePartIndex] : undefined;
    if (!mesh) throw conflict('part_file_unreadable', `The stored file of "${part.partName}" (${part.fileName}) cannot be read as a mesh, so ${what}.`);
    const resting = restingMesh(mesh, part.rotationDeg);
    meshes.set(part.partId, { name: part.partName, positions: resting.positions, indices: mesh.indices, extentMm: resting.extentMm });
  }
  return { meshes, partOfLine: new Map(parts.map((p) => [p.requestLineId, p.partId])) };
}

/** A placement's 3MF transform from its part's resting mesh: its own (a layout by shape), or from its box orientation and corner. */
export function placedTransform(p: Placement, mesh: PlanPartMesh): number[] {
  // The resting mesh fills [0, extent]; a layout packed by shape carries the transform itself (its rotation may be
  // any of the 24, not only a box orientation).
  return p.transform ?? placementTransform(rotationIndex(p.orientation), [0, 0, 0], mesh.extentMm, p.position);
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
      const { meshes, partOfLine } = await readPlanMeshes(plans, deps.storage, plan.id, 'the build cannot be exported');
      const objects: ThreeMfObjectInput[] = [];
      const objectOf = new Map<string, number>();
      for (const [partId, mesh] of meshes) {
        objectOf.set(partId, objects.length);
        objects.push({ name: mesh.name, positions: mesh.positions, indices: mesh.indices });
      }
      const items: ThreeMfItemInput[] = layout.result.placements.map((p: Placement, i: number) => {
        const partId = partOfLine.get(p.id);
        if (partId === undefined) throw new AppError(500, 'corrupt_layout', `Placement ${i} names a line that is not in the plan.`);
        return { objectIndex: objectOf.get(partId)!, transform: placedTransform(p, meshes.get(partId)!), partNumber: `${i + 1}` };
      });
      return { name: plan.name, bytes: write3mf(objects, items, 'millimeter') };
    },
  };
}
export type Export3mfService = ReturnType<typeof export3mfService>;
