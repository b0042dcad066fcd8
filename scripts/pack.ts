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
import { formatProblem, packSync, packV2Sync, parseInstance, parseInstanceV2, INSTANCE_FORMAT_V2, type PackInstanceV2 } from '../shared/packing';

function failProblems(problems: { field: string; message: string }[]): never {
  const [first, ...rest] = problems;
  fail(formatProblem(first) + (rest.length > 0 ? ` (and ${rest.length} more problem${rest.length > 1 ? 's' : ''})` : ''));
}

/** Reads every part's mesh file; the first one that cannot be used ends the run naming the part. */
function loadMeshes(instance: PackInstanceV2, baseDir: string): void {
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
    part.size = [m.sizeMm[0], m.sizeMm[1], m.sizeMm[2]];
  });
}

function main(): void {
  const args = process.argv.slice(2).filter((a) => a !== '--');
  if (args.length !== 1) fail('usage: pack INSTANCE.json (or - for standard input)');
  const file = args[0];
  const json = readJsonInput(file, 'instance');
  if (typeof json === 'object' && json !== null && (json as { format?: unknown }).format === INSTANCE_FORMAT_V2) {
    const parsed = parseInstanceV2(json);
    if (!parsed.ok) failProblems(parsed.problems);
    loadMeshes(parsed.instance, file === '-' ? process.cwd() : dirname(resolve(file)));
    const result = packV2Sync(parsed.instance);
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
