/**
 * Filling the chamber (`max-volume`) with meshes: the placed volume the contract maximises, and reports as
 * `utilization`, is the meshes' (packing.md, version 2). A U channel's box is more than three times its volume; four
 * solid cubes hold more in all. Before, both fits weighed boxes and placed the channel alone (utilization 0.24 here).
 */
import { prism } from '@/shared/geometry';
import { createBoxFitPacking, createShapePacking, validateShapeLayout } from '@/shared/packing';
import { box } from '../../geometry/helpers';
import { shapeInstance } from './instance';

// A U channel 40 x 40 x 30 mm, walls 4 mm: (40 x 40 - 32 x 36) x 30 = 13,440 mm^3 in a 48,000 mm^3 box.
const channel = prism([[0, 0], [40, 0], [40, 40], [36, 40], [36, 4], [4, 4], [4, 40], [0, 40]], 0, 30);
const CHANNEL_VOLUME = (40 * 40 - 32 * 36) * 30;
// 20 mm cubes, 8,000 mm^3 each: four fit side by side, 1 mm apart, in the 42 x 42 mm plate; none beside the channel.
const CUBE_VOLUME = 20 ** 3;
const cubes = (fit: 'box' | 'shape') => {
  const inst = shapeInstance(
    [
      { id: 'channel', mesh: channel, quantity: 1 },
      { id: 'cube', mesh: box(20, 20, 20), quantity: 4 },
    ],
    1,
    { chamber: [42, 42, 32], timeLimitMs: 1500 },
  );
  return { ...inst, objective: 'max-volume' as const, fit };
};
const USABLE = 42 * 42 * 32;

test.each(['box', 'shape'] as const)("by %s, the four cubes are placed, not the channel: the meshes' volume is what is filled", (fit) => {
  const inst = cubes(fit);
  const result = fit === 'box' ? createBoxFitPacking(inst, { maxCompletions: 20 }).runSync() : createShapePacking(inst, { maxRuns: 3 }).runSync();
  expect(validateShapeLayout(inst, result)).toEqual([]);
  const placedVolume = result.utilization * USABLE;
  // At least the four cubes' volume (the channel with two cubes in its slot would hold 29,440 mm^3).
  expect(placedVolume).toBeGreaterThanOrEqual(4 * CUBE_VOLUME - 1);
  expect(placedVolume).toBeGreaterThan(CHANNEL_VOLUME + 2 * CUBE_VOLUME);
  expect(result.placements.filter((p) => p.id === 'cube')).toHaveLength(4);
});
