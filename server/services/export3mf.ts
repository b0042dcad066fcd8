import { QueryTypes } from 'sequelize';
import type { Database } from '../db';
import { AppError, conflict, notFound } from '../errors';
import type { FileStorage } from '../storage';
import type { LayoutsService } from './layouts';
import { checkPlanId } from './plans';
import { parseMeshFile, write3mf, type ThreeMfItemInput, type ThreeMfObjectInput } from '../../shared/geometry';
import type { Orientation, Placement } from '../../shared/packing';
import type { PlanStatus } from '../../shared/plans/status';

/** A build sheet or a build file makes sense once a lead has approved the plan; a record stays readable afterwards. */
export const EXPORTABLE_STATUSES: readonly PlanStatus[] = ['approved', 'queued', 'printing', 'cooling', 'breakout', 'finishing', 'done', 'aborted'];

export function checkExportable(status: PlanStatus, what: string) {
  if (!EXPORTABLE_STATUSES.includes(status)) {
    throw conflict('not_approved', `The ${what} is made for approved plans; this plan is ${status.replace('_', ' ')}.`, undefined, { status });
  }
}

type Mat3 = number[][];
const AXIS: Record<string, number> = { x: 0, y: 1, z: 2 };
/** Permutations that swap an odd number of axes would mirror the part: they get one axis turned back. */
const ODD: readonly Orientation[] = ['xzy', 'yxz', 'zyx'];

/** R = Rz · Ry · Rx for the part's stored quarter turns about x, then y, then z (fixed axes). */
export function partRotation(rotationDeg: readonly number[]): Mat3 {
  const q = (d: number) => (((Math.round(d / 90) % 4) + 4) % 4);
  const cos = (d: number) => [1, 0, -1, 0][q(d)];
  const sin = (d: number) => [0, 1, 0, -1][q(d)];
  const [ax, ay, az] = rotationDeg;
  const rx = [[1, 0, 0], [0, cos(ax), -sin(ax)], [0, sin(ax), cos(ax)]];
  const ry = [[cos(ay), 0, sin(ay)], [0, 1, 0], [-sin(ay), 0, cos(ay)]];
  const rz = [[cos(az), -sin(az), 0], [sin(az), cos(az), 0], [0, 0, 1]];
  const mul = (a: Mat3, b: Mat3) => a.map((row) => [0, 1, 2].map((j) => row.reduce((s, v, k) => s + v * b[k][j], 0)));
  return mul(rz, mul(ry, rx));
}

/**
 * The proper rotation that puts part axis `orientation[k]` along chamber axis k
 * (the packing's orientation codes), and the shift that keeps the turned box at
 * its minimum corner. For an odd permutation chamber x is reversed, which makes
 * it a quarter turn rather than a mirror image; the box it fills is the same.
 */
export function orientationTransform(orientation: Orientation, extentMm: readonly number[]): { rotation: Mat3; shift: number[] } {
  const rotation: Mat3 = [0, 1, 2].map((k) => [0, 1, 2].map((j) => (AXIS[orientation[k]] === j ? 1 : 0)));
  const shift = [0, 0, 0];
  if (ODD.includes(orientation)) {
    rotation[0] = rotation[0].map((v) => -v);
    shift[0] = extentMm[AXIS[orientation[0]]];
  }
  return { rotation, shift };
}

/**
 * A 3MF row-vector transform (3MF Core §3.3: p' = [x y z 1] M) for p' = R p + t:
 * M's first three rows are R's columns, the last row t.
 */
export function toTransform12(rotation: Mat3, t: readonly number[]): number[] {
  const out: number[] = [];
  for (let i = 0; i < 3; i++) for (let j = 0; j < 3; j++) out.push(rotation[j][i]);
  out.push(t[0], t[1], t[2]);
  return out;
}

/** The part's mesh turned by its stored rotation and moved so that its bounding box starts at the origin. */
export function restingMesh(positions: Float64Array, rotationDeg: readonly number[]): { positions: Float64Array; extentMm: number[] } {
  const r = partRotation(rotationDeg);
  const out = new Float64Array(positions.length);
  const min = [Infinity, Infinity, Infinity];
  const max = [-Infinity, -Infinity, -Infinity];
  for (let v = 0; v < positions.length; v += 3) {
    for (let k = 0; k < 3; k++) {
      const c = r[k][0] * positions[v] + r[k][1] * positions[v + 1] + r[k][2] * positions[v + 2];
      out[v + k] = c;
      if (c < min[k]) min[k] = c;
      if (c > max[k]) max[k] = c;
    }
  }
  for (let v = 0; v < out.length; v += 3) for (let k = 0; k < 3; k++) out[v + k] -= min[k];
  return { positions: out, extentMm: [0, 1, 2].map((k) => max[k] - min[k]) };
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
        const resting = restingMesh(mesh.positions, part.rotation_deg);
        objectOf.set(part.part_id, { index: objects.length, extentMm: resting.extentMm });
        objects.push({ name: part.part_name, positions: resting.positions, indices: mesh.indices });
      }
      const items: ThreeMfItemInput[] = layout.result.placements.map((p: Placement, i: number) => {
        const part = byLine.get(p.id);
        if (!part) throw new AppError(500, 'corrupt_layout', `Placement ${i} names a line that is not in the plan.`);
        const object = objectOf.get(part.part_id)!;
        const { rotation, shift } = orientationTransform(p.orientation, object.extentMm);
        const t = [p.position[0] + shift[0], p.position[1] + shift[1], p.position[2] + shift[2]];
        return { objectIndex: object.index, transform: toTransform12(rotation, t), partNumber: `${i + 1}` };
      });
      return { name: plan.name, bytes: write3mf(objects, items, 'millimeter') };
    },
  };
}
export type Export3mfService = ReturnType<typeof export3mfService>;
