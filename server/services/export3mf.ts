import type { Database } from '../db';
import { plansRepository } from '../db/repositories/plans';
import { AppError, conflict, notFound } from '../errors';
import type { FileStorage } from '../storage';
import type { LayoutsService } from './layouts';
import { checkPlanId } from './planCommon';
import { MeshWorkFailed } from '../mesh/pool';
import { UnreadablePartFile, type BuildFileJob, type PlanMeshFile, type PlanMeshItem } from '../mesh/planFiles';
import type { Placement } from '../../shared/packing';
import type { PlanStatus } from '../../shared/plans/status';

/** A build sheet or a build file makes sense once a lead has approved the plan; a record stays readable afterwards. */
export const EXPORTABLE_STATUSES: readonly PlanStatus[] = ['approved', 'queued', 'printing', 'cooling', 'breakout', 'finishing', 'done', 'aborted'];

export function checkExportable(status: PlanStatus, what: string) {
  if (!EXPORTABLE_STATUSES.includes(status)) {
    throw conflict('not_approved', `The ${what} is made for approved plans; this plan is ${status.replace('_', ' ')}.`, undefined, { status });
  }
}

/** What the build file and the sheet's views are made with in a mesh worker (../mesh/planFiles.ts). */
export type WriteBuildFile = (job: BuildFileJob) => Promise<Uint8Array>;

/**
 * A plan's placements as items of its parts' stored files (each file read from the store once), for a mesh worker.
 * A file that is missing is a 409 naming the part and what it is needed for (`what`); so is a placement of a line
 * that is not in the plan.
 */
export async function planMeshJob(
  plans: ReturnType<typeof plansRepository>,
  storage: FileStorage,
  planId: string,
  placements: readonly Placement[],
  what: string,
): Promise<{ files: PlanMeshFile[]; items: PlanMeshItem[] }> {
  const parts = await plans.partFiles(planId);
  const files: PlanMeshFile[] = [];
  const fileOfPart = new Map<string, number>();
  for (const part of parts) {
    if (fileOfPart.has(part.partId)) continue;
    const bytes = await storage.get(part.fileKey);
    if (!bytes) throw conflict('part_file_missing', `The stored file of "${part.partName}" is missing, so ${what}.`);
    fileOfPart.set(part.partId, files.length);
    files.push({
      name: part.partName,
      bytes: new Uint8Array(bytes.buffer, bytes.byteOffset, bytes.byteLength),
      filename: part.fileName,
      unit: part.fileUnit,
      split: part.fileSplit,
      partIndex: part.filePartIndex,
      rotationDeg: part.rotationDeg,
    });
  }
  const fileOfLine = new Map(parts.map((p) => [p.requestLineId, fileOfPart.get(p.partId)!]));
  const items = placements.map((p, i): PlanMeshItem => {
    const file = fileOfLine.get(p.id);
    if (file === undefined) throw conflict('corrupt_layout', `Placement ${i + 1} names a line that is not in the plan, so ${what}.`);
    return { file, orientation: p.orientation, position: p.position, transform: p.transform ?? null };
  });
  return { files, items };
}

/** A mesh worker's failure to make a plan's file as an answer: a part's unreadable file (409) or a worker out of time (503). */
export function planFilesError(e: unknown, what: string): unknown {
  if (e instanceof UnreadablePartFile) return conflict('part_file_unreadable', `${e.message}, so ${what}.`);
  if (e instanceof MeshWorkFailed) return new AppError(503, 'mesh_work_failed', `${e.message} Try again in a while; if it keeps failing, a part's file may be damaged.`);
  return e;
}

/**
 * The packed build as one 3MF package: each part's mesh once (read from its
 * stored file, turned by its stored rotation) and one build item per placement
 * with the placement's orientation and position as its transform, written in
 * a mesh worker (large meshes take seconds to write and compress).
 */
export function export3mfService(db: Database, deps: { storage: FileStorage; layouts: LayoutsService; write: WriteBuildFile; cacheBytes?: number }) {
  const plans = plansRepository(db);
  // Build files lately made, by what they are made of: the chosen layout (kept layouts do not change) and its parts'
  // stored files as they are now. An approved plan's file is asked for again and again (the lead, the operator at the
  // machine), and 300 copies of a part of a million triangles took a mesh worker 13-17 s each time, four asks at once
  // 41 s; asks of the same file while it is being made wait for that one. Oldest out past `cacheBytes`.
  const budget = deps.cacheBytes ?? 128 * 1024 * 1024;
  const made = new Map<string, { bytes: Promise<Uint8Array>; size: number }>();
  let held = 0;
  const keep = (key: string, size: number) => {
    const entry = made.get(key);
    if (!entry) return;
    entry.size = size;
    held += size;
    for (const [k, e] of made) {
      if (held <= budget || k === key) break;
      made.delete(k);
      held -= e.size;
    }
  };

  return {
    async build(labId: string, planId: string): Promise<{ name: string; bytes: Uint8Array }> {
      const plan = await plans.head(labId, checkPlanId(planId));
      if (!plan) throw notFound('That plan');
      checkExportable(plan.status, 'build file');
      if (!plan.chosenLayoutId) throw conflict('no_chosen_layout', 'This plan has no chosen layout to export.');
      const layoutId = plan.chosenLayoutId;
      const files = await plans.partFiles(plan.id);
      const key = JSON.stringify([layoutId, files.map((f) => [f.requestLineId, f.partId, f.fileKey, f.fileUnit, f.fileSplit, f.filePartIndex, f.rotationDeg])]);
      const cached = made.get(key);
      if (cached) {
        // Most lately asked last: the oldest asked goes first.
        made.delete(key);
        made.set(key, cached);
        return { name: plan.name, bytes: await cached.bytes };
      }
      const what = 'the build cannot be exported';
      const making = (async () => {
        const layout = await deps.layouts.get(labId, plan.id, layoutId);
        const job = await planMeshJob(plans, deps.storage, plan.id, layout.result.placements as Placement[], what);
        try {
          return await deps.write(job);
        } catch (e) {
          throw planFilesError(e, what);
        }
      })();
      made.set(key, { bytes: making, size: 0 });
      try {
        const bytes = await making;
        keep(key, bytes.byteLength);
        return { name: plan.name, bytes };
      } catch (e) {
        if (made.get(key)?.bytes === making) made.delete(key);
        throw e;
      }
    },
  };
}
export type Export3mfService = ReturnType<typeof export3mfService>;
