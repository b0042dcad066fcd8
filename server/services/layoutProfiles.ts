/**
 * Per-layer area and contour of a layout from its parts' real meshes, for the
 * estimates of a layout being kept. The slicing is a job on the mesh queue, in
 * the lab's turn like its uploads: a worker (in any process) reads the part
 * files and slices them. When a file is missing the part counts as its box;
 * when the job fails or no worker finishes it in time, the whole layout is
 * estimated by its boxes, and says so.
 */
import type { Transaction } from 'sequelize';
import type { Database } from '../db';
import { plansRepository } from '../db/repositories/plans';
import type { LayoutTask, SliceOutcome } from '../jobs/meshJobs';
import type { FieldProblem, PackInstance, PackResult } from '../../shared/packing';
import type { ShapeCheck } from '../../shared/packing/shape/check';

/** A layout packed by shape to check against the meshes: its lines' parts without their place among the files (found here). */
export type ShapeCheckRequest = Omit<ShapeCheck, 'parts'> & { parts: Omit<ShapeCheck['parts'][number], 'source'>[] };

export interface MeshProfiles {
  areaPerLayerMm2: Float64Array;
  contourPerLayerMm: Float64Array;
  /** Placements counted by their sliced mesh and by their box. */
  meshPlacements: number;
  boxPlacements: number;
  /** Parts counted by their box, and why. */
  boxParts: { name: string; reason: string }[];
  /** When a check was asked for: what the meshes say is wrong with the layout (empty: nothing). */
  problems?: FieldProblem[];
}

export type ProfilesLookup = (
  planId: string,
  instance: PackInstance,
  result: PackResult,
  layers: number,
  transaction?: Transaction,
  /** Who keeps the layout (recorded with the slicing job). */
  userId?: string | null,
  /** A layout packed by shape: checked against the same meshes by the worker that slices it. */
  check?: ShapeCheckRequest,
) => Promise<MeshProfiles | null>;

export function layoutProfilesService(
  db: Database,
  deps: {
    /** Slices on the job queue (the lab's turn), waiting a limited time. */
    slice: (labId: string, userId: string | null, task: LayoutTask) => Promise<SliceOutcome>;
  },
): ProfilesLookup {
  const plans = plansRepository(db);
  return async (planId, instance, result, layers, transaction, userId = null, check) => {
    if (result.placements.length === 0 || layers === 0) return null;
    const rows = await plans.partFiles(planId, transaction);
    const plan = await plans.labOf(planId, transaction);
    if (!plan) return null;
    const partOfLine = new Map<string, number>();
    const files: LayoutTask['parts'] = [];
    const names: string[] = [];
    const indexOfPart = new Map<string, number>();
    for (const row of rows) {
      let k = indexOfPart.get(row.partId);
      if (k === undefined) {
        k = files.length;
        indexOfPart.set(row.partId, k);
        files.push({
          key: `${row.fileKey}|${row.fileSplit ? row.filePartIndex : 'all'}|${row.rotationDeg.join(',')}`,
          // Read by the worker; a part without a closed mesh is counted by its box, so its file is not needed.
          fileKey: row.closed ? row.fileKey : null,
          filename: row.fileName,
          unit: row.fileUnit,
          split: row.fileSplit,
          partIndex: row.fileSplit ? row.filePartIndex : 0,
          rotationDeg: row.rotationDeg,
          watertight: row.closed,
        });
        names.push(row.partName);
      }
      partOfLine.set(row.requestLineId, k);
    }
    const placements: LayoutTask['placements'] = [];
    for (const p of result.placements) {
      const part = partOfLine.get(p.id);
      if (part === undefined) return null; // a line not in the plan: the layout checks refuse it anyway
      const transform = (p as { transform?: number[] }).transform;
      placements.push({ part, orientation: p.orientation, position: p.position, size: p.size, transform });
    }
    let shapeCheck: ShapeCheck | undefined;
    if (check) {
      const parts: ShapeCheck['parts'] = [];
      for (const p of check.parts) {
        const source = partOfLine.get(p.id);
        if (source === undefined) return null;
        parts.push({ ...p, source });
      }
      shapeCheck = { ...check, parts };
    }
    const outcome = await deps.slice(plan.labId, userId, {
      planId,
      parts: files,
      placements,
      layerHeightMm: instance.layerHeight,
      layers,
      ...(shapeCheck ? { check: shapeCheck } : {}),
    });
    if (!outcome.ok) {
      console.warn(`layout profile of plan ${planId} fell back to boxes (job ${outcome.jobId}): ${outcome.reason}`);
      return null;
    }
    const out = outcome.result;
    return {
      areaPerLayerMm2: out.areaProfile,
      contourPerLayerMm: out.contourProfile,
      meshPlacements: out.meshPlacements,
      boxPlacements: out.boxPlacements,
      boxParts: out.boxReasons.map((r) => ({ name: names[r.part], reason: r.reason })),
      ...(out.problems ? { problems: out.problems } : {}),
    };
  };
}
