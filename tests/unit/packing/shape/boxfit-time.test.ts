/**
 * The time limit of a packing by box whose parts carry meshes. Its result's
 * area profile is sliced from the meshes when a layout is turned into version
 * 2, and the last layout is turned over after the search: the search has to
 * end early by as long as that takes, also when no one asks for progress (the
 * packing command).
 *
 * Made heavy by the clock running 10 times fast, as in heavy.test.ts: every
 * millisecond of slicing reads as 10.
 */
import { torus } from '@/shared/geometry';
import { createBoxFitPacking, parseInstanceV2, type PackInstanceV2 } from '@/shared/packing';

// Rings 50 mm across and 10 mm thick, 24,000 triangles each.
const ring = torus(20, 5, 200, 60);

function instance(timeLimitMs: number): PackInstanceV2 {
  const parsed = parseInstanceV2({
    format: 'pack-instance/2',
    chamber: [200, 200, 200],
    spacing: 3,
    layerHeight: 0.1,
    fit: 'box',
    timeLimitMs,
    parts: [{ id: 'ring', mesh: { positions: ring.positions, indices: ring.indices }, quantity: 24 }],
  });
  if (!parsed.ok) throw new Error(JSON.stringify(parsed.problems));
  return parsed.instance;
}

test('with no one watching its progress, the run ends within its limit, area profile and all', () => {
  expect(ring.indices.length / 3).toBe(24_000);
  const clock = () => 10 * performance.now();
  // On this clock, slicing the 24 rings for the area profile takes a good share of the limit.
  const inst = instance(2000);
  const start = clock();
  const result = createBoxFitPacking(inst, { now: clock }).runSync();
  const took = clock() - start;
  expect(result.placements).toHaveLength(24);
  expect(result.areaProfile.length).toBe(Math.ceil(result.height / 0.1 - 1e-9));
  // Within the limit (and a tenth for what the clock misses); the code before went past it by the whole slicing of
  // the last layout.
  expect(took).toBeLessThanOrEqual(2000 * 1.1);
});
