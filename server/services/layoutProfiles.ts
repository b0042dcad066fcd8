/**
 * Per-layer area and contour of a layout from its parts' real meshes, for the
 * estimates of a layout being kept. The slicing is a job on the mesh queue, in
 * the lab's turn like its uploads: a worker (in any process) reads the part
 * files and slices them. When a file is missing the part counts as its box;
 * when the job fails or no worker finishes it in time, the whole layout is
 * estimated by its boxes, and says so.
 */
import { QueryTypes, type Transaction } from 'sequelize';
import type { Database } from '../db';
import type { LayoutTask, SliceOutcome } from '../jobs/meshJobs';
import type { LengthUnit } from '../../shared/geometry';
import type { PackInstance, PackResult } from '../../shared/packing';

export interface MeshProfiles {
  areaPerLayerMm2: Float64Array;
  contourPerLayerMm: Float64Array;
  /** Placements counted by their sliced mesh and by their box. */
  meshPlacements: number;
  boxPlacements: number;
  /** Parts counted by their box, and why. */
  boxParts: { name: string; reason: string }[];
}

export type ProfilesLookup = (
  planId: string,
  instance: PackInstance,
  result: PackResult,
  layers: number,
  transaction?: Transaction,
  /** Who keeps the layout (recorded with the slicing job). */
  userId?: string | null,
) => Promise<MeshProfiles | null>;

type PartRow = {
  request_line_id: string;
  part_id: string;
  part_name: string;
  file_key: string;
  file_name: string;
  file_unit: LengthUnit;
  file_split: boolean;
  file_part_index: number;
  rotation_deg: number[];
  closed: boolean;
};

export function layoutProfilesService(
  db: Database,
  deps: {
    /** Slices on the job queue (the lab's turn), waiting a limited time. */
    slice: (labId: string, userId: string | null, task: LayoutTask) => Promise<SliceOutcome>;
  },
): ProfilesLookup {
  return async (planId, instance, result, layers, transaction, userId = null) => {
    if (result.placements.length === 0 || layers === 0) return null;
    const rows = await db.sequelize.query<PartRow>(
      `SELECT pl.request_line_id, p.id AS part_id, p.name AS part_name, p.file_key, p.file_name, p.file_unit, p.file_split,
              p.file_part_index, p.rotation_deg, (p.watertight AND COALESCE((p.metrics->>'oriented')::boolean, false)) AS closed
         FROM plan_lines pl JOIN request_lines rl ON rl.id = pl.request_line_id JOIN parts p ON p.id = rl.part_id
        WHERE pl.plan_id = $1 ORDER BY pl.position`,
      { bind: [planId], type: QueryTypes.SELECT, transaction },
    );
    const [plan] = await db.sequelize.query<{ lab_id: string }>('SELECT lab_id FROM plans WHERE id = $1', { bind: [planId], type: QueryTypes.SELECT, transaction });
    if (!plan) return null;
    const partOfLine = new Map<string, number>();
    const files: LayoutTask['parts'] = [];
    const names: string[] = [];
    const indexOfPart = new Map<string, number>();
    for (const row of rows) {
      let k = indexOfPart.get(row.part_id);
      if (k === undefined) {
        k = files.length;
        indexOfPart.set(row.part_id, k);
        files.push({
          key: `${row.file_key}|${row.file_split ? row.file_part_index : 'all'}|${row.rotation_deg.join(',')}`,
          // Read by the worker; a part without a closed mesh is counted by its box, so its file is not needed.
          fileKey: row.closed ? row.file_key : null,
          filename: row.file_name,
          unit: row.file_unit,
          split: row.file_split,
          partIndex: row.file_split ? row.file_part_index : 0,
          rotationDeg: row.rotation_deg,
          watertight: row.closed,
        });
        names.push(row.part_name);
      }
      partOfLine.set(row.request_line_id, k);
    }
    const placements: LayoutTask['placements'] = [];
    for (const p of result.placements) {
      const part = partOfLine.get(p.id);
      if (part === undefined) return null; // a line not in the plan: the layout checks refuse it anyway
      const transform = (p as { transform?: number[] }).transform;
      placements.push({ part, orientation: p.orientation, position: p.position, size: p.size, transform });
    }
    const outcome = await deps.slice(plan.lab_id, userId, { planId, parts: files, placements, layerHeightMm: instance.layerHeight, layers });
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
    };
  };
}
