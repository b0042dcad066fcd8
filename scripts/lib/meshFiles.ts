/** Reading a "pack-instance/2"'s mesh files, for the command lines that take one (pack, check). */
import { readFileSync } from 'node:fs';
import { resolve } from 'node:path';
import { fail } from './cli';
import { measureMesh, mergeMeshes, parseMeshFile } from '../../shared/geometry';
import type { PackInstanceV2, PackWarning } from '../../shared/packing';

/** A size given beside a mesh may differ from the mesh's box by rounding: this much, or this share of it. */
const SIZE_TOLERANCE_MM = 0.05;
const SIZE_TOLERANCE_SHARE = 0.001;

/**
 * Reads every part's mesh file; the first one that cannot be used ends the run naming the part. A `size` given
 * beside a mesh that is not the mesh's bounding box (a unit mix-up, a stale file) is named in the warnings: the
 * mesh's own box is the one packed.
 */
export function loadMeshes(instance: PackInstanceV2, baseDir: string): PackWarning[] {
  const warnings: PackWarning[] = [];
  const mm = (v: readonly number[]) => v.map((x) => Number(x.toFixed(3))).join(' x ');
  instance.parts.forEach((part, i) => {
    if (part.meshPath === null || part.mesh) return;
    const field = `parts[${i}].mesh`;
    const path = resolve(baseDir, part.meshPath);
    let bytes: Uint8Array;
    try {
      bytes = readFileSync(path);
    } catch (e) {
      fail(`${field}: cannot read "${part.meshPath}" (${(e as NodeJS.ErrnoException).code ?? (e as Error).message})`);
    }
    const parsed = parseMeshFile(bytes, { filename: part.meshPath });
    if (!parsed.ok) fail(`${field}: ${parsed.problems[0].message}`);
    const mesh = parsed.parts.length === 1 ? parsed.parts[0] : mergeMeshes(parsed.parts);
    const m = measureMesh(mesh);
    const box = m.sizeMm[0] * m.sizeMm[1] * m.sizeMm[2];
    if (!(box > 0) || Math.abs(m.volumeMm3) <= 1e-9 * box) fail(`${field}: "${part.meshPath}" encloses no volume (it is flat or only a surface)`);
    part.mesh = { positions: mesh.positions, indices: mesh.indices };
    const given = part.size;
    if (given && given.some((v, a) => Math.abs(v - m.sizeMm[a]) > Math.max(SIZE_TOLERANCE_MM, SIZE_TOLERANCE_SHARE * m.sizeMm[a]))) {
      warnings.push({
        id: part.id,
        code: 'size-not-mesh',
        message: `"${part.id}": parts[${i}].size (${mm(given)} mm) is not the bounding box of its mesh "${part.meshPath}" (${mm(m.sizeMm)} mm), which was packed; check the mesh's units`,
      });
    }
    part.size = [m.sizeMm[0], m.sizeMm[1], m.sizeMm[2]];
  });
  return warnings;
}
