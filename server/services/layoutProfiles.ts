/**
 * Per-layer area and contour of a layout from its parts' real meshes, for the
 * estimates of a layout being kept. The part files are read here (I/O only);
 * parsing and slicing run in the mesh worker pool, so a large mesh never holds
 * up other requests. When a file is missing or a worker fails, the layout is
 * estimated by its boxes, and says so.
 */
import { QueryTypes, type Transaction } from 'sequelize';
import type { Database } from '../db';
import type { FileStorage } from '../storage';
import { profileLayout } from '../mesh';
import type { ProfileLayoutJob, ProfileLayoutResult, ProfilePartFile } from '../../shared/geometry/layoutSlices';
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

export type ProfilesLookup = (planId: string, instance: PackInstance, result: PackResult, layers: number, transaction?: Transaction) => Promise<MeshProfiles | null>;

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
  deps: { storage: FileStorage; profile?: (job: ProfileLayoutJob) => Promise<ProfileLayoutResult> },
): ProfilesLookup {
  const run = deps.profile ?? profileLayout;
  return async (planId, instance, result, layers, transaction) => {
    if (result.placements.length === 0 || layers === 0) return null;
    const rows = await db.sequelize.query<PartRow>(
      `SELECT pl.request_line_id, p.id AS part_id, p.name AS part_name, p.file_key, p.file_name, p.file_unit, p.file_split,
              p.file_part_index, p.rotation_deg, (p.watertight AND COALESCE((p.metrics->>'oriented')::boolean, false)) AS closed
         FROM plan_lines pl JOIN request_lines rl ON rl.id = pl.request_line_id JOIN parts p ON p.id = rl.part_id
        WHERE pl.plan_id = $1 ORDER BY pl.position`,
      { bind: [planId], type: QueryTypes.SELECT, transaction },
    );
    const partOfLine = new Map<string, number>();
    const files: ProfilePartFile[] = [];
    const names: string[] = [];
    const indexOfPart = new Map<string, number>();
    for (const row of rows) {
      let k = indexOfPart.get(row.part_id);
      if (k === undefined) {
        k = files.length;
        indexOfPart.set(row.part_id, k);
        const bytes = row.closed ? await deps.storage.get(row.file_key) : null;
        files.push({
          key: `${row.file_key}|${row.file_split ? row.file_part_index : 'all'}|${row.rotation_deg.join(',')}`,
          bytes: bytes ? new Uint8Array(bytes.buffer, bytes.byteOffset, bytes.byteLength) : null,
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
    const placements: ProfileLayoutJob['placements'] = [];
    for (const p of result.placements) {
      const part = partOfLine.get(p.id);
      if (part === undefined) return null; // a line not in the plan: the layout checks refuse it anyway
      const transform = (p as { transform?: number[] }).transform;
      placements.push({ part, orientation: p.orientation, position: p.position, size: p.size, transform });
    }
    try {
      const out = await run({ parts: files, placements, layerHeightMm: instance.layerHeight, layers });
      return {
        areaPerLayerMm2: out.areaProfile,
        contourPerLayerMm: out.contourProfile,
        meshPlacements: out.meshPlacements,
        boxPlacements: out.boxPlacements,
        boxParts: out.boxReasons.map((r) => ({ name: names[r.part], reason: r.reason })),
      };
    } catch (err) {
      console.warn(`layout profile of plan ${planId} fell back to boxes: ${err instanceof Error ? err.message : String(err)}`);
      return null;
    }
  };
}
