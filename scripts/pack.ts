/**
 * Packs one instance: `npm run --silent pack -- INSTANCE.json` (or `-` for
 * standard input). Prints the result as JSON and exits 0; bad input exits 2
 * with one line on standard error naming the field.
 *
 * "pack-instance/1" packs boxes; "pack-instance/2" may name a mesh file per
 * part (relative to the instance file, or to the current directory for
 * standard input: the folder the command was called from), read here and handed to the engine as plain arrays.
 */
import { fail, failProblems, inputDir, readJsonInput } from './lib/cli';
import { loadMeshes } from './lib/meshFiles';
import { packSync, packV2Sync, parseInstance, parseInstanceV2, INSTANCE_FORMAT_V2 } from '../shared/packing';

function main(): void {
  const args = process.argv.slice(2).filter((a) => a !== '--');
  if (args.length !== 1) fail('usage: pack INSTANCE.json (or - for standard input)');
  const file = args[0];
  const json = readJsonInput(file, 'instance', 'pack');
  if (typeof json === 'object' && json !== null && (json as { format?: unknown }).format === INSTANCE_FORMAT_V2) {
    const parsed = parseInstanceV2(json);
    if (!parsed.ok) failProblems(parsed.problems);
    const sizeWarnings = loadMeshes(parsed.instance, inputDir(file, 'pack'));
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
