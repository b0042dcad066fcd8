/**
 * A plan's packing instance made ready for packing by shape in the packing
 * worker: each line's part as its resting mesh (the stored file turned as the
 * part is stored, its box moved to the origin: the same mesh the server's
 * check and slices read), turned only as the line's rule allows. A part
 * without a closed mesh, or whose file cannot be had, is packed by its box,
 * and the outcome says so with the reason.
 */
import { readPartMeshes, type RestingMeshCache } from '../shared/geometry/layoutSlices';
import { ROTATION_COUNT } from '../shared/geometry/rotations';
import { INSTANCE_FORMAT_V2, type FieldProblem, type PackInstance, type PackInstanceV2, type PackWarning } from '../shared/packing';
import type { LayoutProfilePart } from './mesh.protocol';
import { partFiles, type FetchBytes } from './partMeshes';

/** Per part of the instance (by id): its stored file and the quarter-turn rotations (0..23) its rule allows. */
export interface ShapeFiles {
  parts: Array<{ id: string; file: LayoutProfilePart; rotations: number[] }>;
}

/**
 * `boxed`: one warning per part of the instance that goes to the engine by its box because its file gave no
 * closed mesh, with the reason (code "no-mesh"): the engine cannot tell such a part from one given by its size.
 */
export type ShapeInstanceOutcome = { ok: true; instance: PackInstanceV2; boxed: PackWarning[] } | { ok: false; problems: FieldProblem[] };

function problemsOf(instance: PackInstance, shapes: ShapeFiles): FieldProblem[] {
  if (!shapes || !Array.isArray(shapes.parts)) return [{ field: 'shapes.parts', message: 'must list the parts with their files' }];
  const problems: FieldProblem[] = [];
  const byId = new Map(shapes.parts.map((p) => [p?.id, p] as const));
  instance.parts.forEach((part, i) => {
    const s = byId.get(part.id);
    if (!s) return problems.push({ field: `parts[${i}]`, message: `"${part.id}" has no stored file to pack by shape` });
    const f = s.file;
    if (!f || typeof f.key !== 'string' || (f.url !== null && typeof f.url !== 'string') || typeof f.filename !== 'string') {
      return problems.push({ field: `shapes.parts[${i}].file`, message: 'must name the stored file (key, url, filename)' });
    }
    if (!Array.isArray(s.rotations) || s.rotations.length === 0 || !s.rotations.every((r) => Number.isInteger(r) && r >= 0 && r < ROTATION_COUNT)) {
      problems.push({ field: `shapes.parts[${i}].rotations`, message: `must list rotations 0 to ${ROTATION_COUNT - 1}` });
    }
  });
  return problems;
}

export async function shapeInstanceOf(instance: PackInstance, shapes: ShapeFiles, meshes: RestingMeshCache, fetchBytes: FetchBytes): Promise<ShapeInstanceOutcome> {
  const problems = problemsOf(instance, shapes);
  if (problems.length > 0) return { ok: false, problems };
  const byId = new Map(shapes.parts.map((p) => [p.id, p] as const));
  // Each distinct file once, however many lines share its part.
  const keys: string[] = [];
  const files: LayoutProfilePart[] = [];
  for (const part of instance.parts) {
    const f = byId.get(part.id)!.file;
    if (!keys.includes(f.key)) {
      keys.push(f.key);
      files.push(f);
    }
  }
  const { sources, boxReasons } = readPartMeshes(await partFiles(files, meshes, fetchBytes), meshes);
  const boxed: PackWarning[] = [];
  for (const part of instance.parts) {
    const file = byId.get(part.id)!.file;
    const why = boxReasons.find((b) => b.part === keys.indexOf(file.key));
    if (!why || part.quantity === 0) continue;
    // A mesh that is not closed has no inside to nest by; a file that cannot be had or read, its reason as given.
    const reason = file.watertight ? why.reason : `its mesh "${file.filename}" is not closed and consistently oriented, so it has no inside to nest by`;
    boxed.push({ id: part.id, code: 'no-mesh', message: `"${part.id}" was packed by its bounding box: ${reason}` });
  }
  return {
    ok: true,
    boxed,
    instance: {
      // The build as it is; only the parts change, to meshes and rotations.
      ...instance,
      format: INSTANCE_FORMAT_V2,
      fit: 'shape',
      parts: instance.parts.map((part) => {
        const s = byId.get(part.id)!;
        const mesh = sources[keys.indexOf(s.file.key)].mesh;
        return {
          id: part.id,
          size: mesh ? null : part.size,
          quantity: part.quantity,
          rotations: [...new Set(s.rotations)].sort((a, b) => a - b),
          meshPath: null,
          mesh: mesh ? { positions: mesh.positions, indices: mesh.indices } : null,
        };
      }),
    },
  };
}
