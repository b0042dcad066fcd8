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
import { placementTransform, rotationIndex } from '../shared/geometry/rotations';
import { fail, failProblems, inputDir, readJsonInput } from './lib/cli';
import { reference, referenceFaults } from './lib/manifold-check';
import { loadMeshes } from './lib/meshFiles';
import { parseInstance, parseInstanceV2, shapeParts, validateLayout, validateShapeLayout, INSTANCE_FORMAT_V2, type FieldProblem, type PackResult, type PackResultV2, type PlacementV2 } from '../shared/packing';

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
  const json = readJsonInput(instanceFile, 'instance', 'check:layout');
  const result = readJsonInput(resultFile, 'result', 'check:layout');
  if (typeof result !== 'object' || result === null || Array.isArray(result)) fail('result: must be a JSON object (a pack-result)');
  let problems: FieldProblem[];
  let manifold: ManifoldReport | null = null;
  if (typeof json === 'object' && json !== null && (json as { format?: unknown }).format === INSTANCE_FORMAT_V2) {
    const parsed = parseInstanceV2(json);
    if (!parsed.ok) failProblems(parsed.problems);
    const instance = parsed.instance;
    loadMeshes(instance, inputDir(instanceFile, 'check:layout'));
    const parts = shapeParts(instance);
    const layout = result as PackResultV2;
    problems = validateShapeLayout(instance, layout, parts);
    // The second check places each part by its 3MF transform; a part given by its size alone (no mesh) carries none,
    // so its transform is made from its orientation and position, as the contract's check places it. A placement
    // that names no part, or cannot be placed, is named by the first check, and the second is not run.
    const byId = new Map(parts.map((p) => [p.id, p] as const));
    const numbers = (v: unknown, n: number): v is number[] => Array.isArray(v) && v.length === n && v.every((x) => typeof x === 'number' && Number.isFinite(x));
    const placed = Array.isArray(layout.placements)
      ? layout.placements.map((p) => {
          const part = p ? byId.get(p.id) : undefined;
          if (!part) return null;
          if (part.hasMesh) return numbers(p.transform, 12) ? p : null;
          const turn = typeof p.orientation === 'string' ? rotationIndex(p.orientation) : -1;
          return turn >= 0 && numbers(p.position, 3) ? { ...p, transform: placementTransform(turn, part.min, part.max, p.position) } : null;
        })
      : [null];
    if (withManifold && placed.every((p) => p !== null)) {
      const ref = reference(instance, { ...layout, placements: placed as PlacementV2[] });
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
