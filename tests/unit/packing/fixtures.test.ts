import { generatePowderBed, lowerBound, packSync, validateLayout } from '@/shared/packing';
import { brProblems } from './helpers';

// A work cap instead of a clock keeps these checks independent of the machine's speed.
const WORK = { maxCompletions: 300 };

// Test data: Bischoff & Ratcliff, "Issues in the development of approaches to container
// loading", Omega 23(4), 1995 (OR-Library thpack1-3). Simple greedy wall-building reaches
// roughly 81-86 % on these sets and tree/beam searches 94-95 % (values from the literature,
// quoted from memory); the bounds below sit between the two.
describe.each([
  [1, 0.86],
  [2, 0.9],
  [3, 0.9],
] as const)('BR%i container loading, first three problems', (set, meanAtLeast) => {
  const problems = brProblems(set, 60_000).slice(0, 3);
  test(`fills at least ${meanAtLeast * 100} % of the container on average, with valid layouts`, () => {
    const utilisations = problems.map(({ instance }) => {
      const result = packSync(instance, WORK);
      expect(validateLayout(instance, result)).toEqual([]);
      return result.utilization;
    });
    const mean = utilisations.reduce((a, b) => a + b, 0) / utilisations.length;
    expect(mean).toBeGreaterThanOrEqual(meanAtLeast);
    for (const u of utilisations) expect(u).toBeGreaterThanOrEqual(0.82);
  });
});

describe('powder-bed builds, lowest height', () => {
  test.each([1, 2])('a 300-part build (seed %i) comes within 1.2 x the height lower bound', (seed) => {
    const instance = generatePowderBed({ parts: 300, seed, timeLimitMs: 60_000 });
    const result = packSync(instance, { maxCompletions: 40 });
    expect(validateLayout(instance, result)).toEqual([]);
    expect(result.unplaced).toEqual([]);
    // Bound: Martello, Pisinger & Vigo 2000 continuous bound on spacing-inflated boxes.
    expect(result.height / lowerBound(instance)).toBeLessThanOrEqual(1.2);
  });
});
