/**
 * Checks a packing result against its instance: `npm run --silent check:layout -- INSTANCE.json RESULT.json`
 * (either may be `-` for standard input, not both). For a lab that takes layouts from elsewhere, or keeps them
 * and wants to know they still hold for the files it has now.
 *
 * "pack-instance/1": the box rules of the packing contract (`validateLayout`). "pack-instance/2": its mesh files
 * are read as the pack command reads them, and the layout is checked twice: by the project's check against the
 * meshes (`validateShapeLayout`: usable region, surface gaps, containment, rotations, counts, the lift-out order)
 * and by manifold-3d, a general-purpose solid modelling library that shares no code with it (./lib/manifold-check.ts;
 * `--no-manifold` leaves it out, it takes seconds for thousands of parts).
 *
 * Prints one JSON object, `{ valid, problems, manifold }`, and exits 0 when the layout is valid by every check run,
 * 1 when it is not; input that cannot be read or is not an instance exits 2 with one line naming the field.
 */
import { dirname, resolve } from 'node:path';
import { fail, failProblems, readJsonInput } from './lib/cli';
import { reference, referenceFaults } from './lib/manifold-check';
import { loadMeshes } from './lib/meshFiles';
import { parseInstance, parseInstanceV2, shapeParts, validateLayout, validateShapeLayout, INSTANCE_FORMAT_V2, type FieldProblem, type PackResult, type PackResultV2 } from '../shared/packing';

interface ManifoldReport {
  faults: string[];
  /** Pairs of placed meshes within the spacing's reach of each other, and the smallest surface gap among them. */
  pairs: number;
  smallestGapMm: number | null;
  /** Pairs the lift-out check followed up. */
  liftPairs: number;
}

function main(): void {
  const args = process.argv.slice(2).filter((a) => a !== '--');
  const withManifold = !args.includes('--no-manifold');
  const files = args.filter((a) => a !== '--no-manifold');
  if (files.length !== 2 || (files[0] === '-' && files[1] === '-')) fail('usage: check:layout INSTANCE.json RESULT.json [--no-manifold] (one of them may be - for standard input)');
  const [instanceFile, resultFile] = files;
  const json = readJsonInput(instanceFile, 'instance');
  const result = readJsonInput(resultFile, 'result');
  if (typeof result !== 'object' || result === null || Array.isArray(result)) fail('result: must be a JSON object (a pack-result)');
  let problems: FieldProblem[];
  let manifold: ManifoldReport | null = null;
  if (typeof json === 'object' && json !== null && (json as { format?: unknown }).format === INSTANCE_FORMAT_V2) {
    const parsed = parseInstanceV2(json);
    if (!parsed.ok) failProblems(parsed.problems);
    const instance = parsed.instance;
    loadMeshes(instance, instanceFile === '-' ? process.cwd() : dirname(resolve(instanceFile)));
    const parts = shapeParts(instance);
    const layout = result as PackResultV2;
    problems = validateShapeLayout(instance, layout, parts);
    // The second check needs every placement to name a part and carry a transform; the first names what does not.
    const ids = new Set(parts.map((p) => p.id));
    const readable =
      Array.isArray(layout.placements) &&
      layout.placements.every((p) => p && ids.has(p.id) && Array.isArray(p.transform) && p.transform.length === 12 && p.transform.every((v) => typeof v === 'number' && Number.isFinite(v)));
    if (withManifold && readable) {
      const ref = reference(instance, layout);
      const gaps = ref.pairs.map((p) => p.gap);
      manifold = { faults: referenceFaults(instance, ref), pairs: ref.pairs.length, smallestGapMm: gaps.length > 0 ? Math.min(...gaps) : null, liftPairs: ref.liftPairs };
    }
  } else {
    const parsed = parseInstance(json);
    if (!parsed.ok) failProblems(parsed.problems);
    problems = validateLayout(parsed.instance, result as PackResult);
  }
  const valid = problems.length === 0 && (manifold === null || manifold.faults.length === 0);
  process.stdout.write(`${JSON.stringify({ valid, problems, manifold })}\n`);
  process.exit(valid ? 0 : 1);
}

main();
