/**
 * Packs one instance: `npm run --silent pack -- INSTANCE.json` (or `-` for
 * standard input). Prints the result as JSON and exits 0; bad input exits 2
 * with one line on standard error naming the field.
 *
 * "pack-instance/1" packs boxes; "pack-instance/2" may name a mesh file per
 * part (relative to the instance file, or to the current directory for
 * standard input), read here and handed to the engine as plain arrays.
 */
import { readFileSync } from 'node:fs';
import { fail, readJsonInput } from './lib/cli';
import { dirname, resolve } from 'node:path';
import { measureMesh, mergeMeshes, parseMeshFile } from '../shared/geometry';
import { formatProblem, packSync, packV2Sync, parseInstance, parseInstanceV2, INSTANCE_FORMAT_V2, type PackInstanceV2, type PackWarning } from '../shared/packing';

/** A size given beside a mesh may differ from the mesh's box by rounding: this much, or this share of it. */
const SIZE_TOLERANCE_MM = 0.05;
const SIZE_TOLERANCE_SHARE = 0.001;

function failProblems(problems: { field: string; message: string }[]): never {
  const [first, ...rest] = problems;
  fail(formatProblem(first) + (rest.length > 0 ? ` (and ${rest.length} more problem${rest.length > 1 ? 's' : ''})` : ''));
}

/**
 * Reads every part's mesh file; the first one that cannot be used ends the run naming the part. A `size` given
 * beside a mesh that is not the mesh's bounding box (a unit mix-up, a stale file) is named in the warnings: the
 * mesh's own box is the one packed.
 */
function loadMeshes(instance: PackInstanceV2, baseDir: string): PackWarning[] {
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

function main(): void {
  const args = process.argv.slice(2).filter((a) => a !== '--');
  if (args.length !== 1) fail('usage: pack INSTANCE.json (or - for standard input)');
  const file = args[0];
  const json = readJsonInput(file, 'instance');
  if (typeof json === 'object' && json !== null && (json as { format?: unknown }).format === INSTANCE_FORMAT_V2) {
    const parsed = parseInstanceV2(json);
    if (!parsed.ok) failProblems(parsed.problems);
    const sizeWarnings = loadMeshes(parsed.instance, file === '-' ? process.cwd() : dirname(resolve(file)));
    const packed = packV2Sync(parsed.instance);
    const warnings = [...sizeWarnings, ...(packed.warnings ?? [])];
    const result = warnings.length > 0 ? { ...packed, warnings } : packed;
    for (const w of result.warnings ?? []) process.stderr.write(`warning: ${w.message}\n`);
    process.stdout.write(`${JSON.stringify(result)}\n`);
    return;
  }
  const parsed = parseInstance(json);
  if (!parsed.ok) failProblems(parsed.problems);
  const result = packSync(parsed.instance);
  process.stdout.write(`${JSON.stringify(result)}\n`);
}

main();
