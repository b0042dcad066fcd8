import fc from 'fast-check';
import { ORIENTATIONS, packSync, parseInstance, validateLayout, type Orientation } from '@/shared/packing';

const dim = fc.double({ min: 0.5, max: 120, noNaN: true, noDefaultInfinity: true });
const part = (i: number) =>
  fc.record({
    id: fc.constant(`p${i}`),
    size: fc.tuple(dim, dim, dim),
    quantity: fc.integer({ min: 0, max: 40 }),
    orientations: fc.option(fc.subarray([...ORIENTATIONS] as Orientation[], { minLength: 1 }), { nil: undefined }),
  });
const instance = fc
  .record({
    chamber: fc.tuple(fc.double({ min: 60, max: 400, noNaN: true }), fc.double({ min: 60, max: 400, noNaN: true }), fc.double({ min: 40, max: 400, noNaN: true })),
    margin: fc.record({ xy: fc.double({ min: 0, max: 20, noNaN: true }), bottom: fc.double({ min: 0, max: 10, noNaN: true }), top: fc.double({ min: 0, max: 10, noNaN: true }) }),
    spacing: fc.oneof(fc.constant(0), fc.double({ min: 0, max: 6, noNaN: true })),
    objective: fc.constantFrom('min-height', 'max-volume'),
    seed: fc.integer({ min: 1, max: 1000 }),
    count: fc.integer({ min: 0, max: 6 }),
  })
  .chain((base) =>
    fc.tuple(...Array.from({ length: base.count }, (_, i) => part(i))).map((parts) => ({
      format: 'pack-instance/1',
      chamber: base.chamber,
      margin: base.margin,
      spacing: base.spacing,
      objective: base.objective,
      seed: base.seed,
      timeLimitMs: 20,
      parts: parts.map((p) => (p.orientations ? p : { id: p.id, size: p.size, quantity: p.quantity })),
    })),
  );

describe('every layout the engine returns obeys the layout rules', () => {
  test('random instances with spacing, margins, orientations and both objectives', () => {
    fc.assert(
      fc.property(instance, (input) => {
        const parsed = parseInstance(input);
        if (!parsed.ok) return; // margins eating the chamber: refused at the boundary, covered elsewhere
        const result = packSync(parsed.instance, { maxCompletions: 30 });
        expect(validateLayout(parsed.instance, result)).toEqual([]);
        const wanted = parsed.instance.parts.reduce((s, p) => s + p.quantity, 0);
        const unplaced = result.unplaced.reduce((s, u) => s + u.count, 0);
        expect(result.placements.length + unplaced).toBe(wanted);
      }),
      { numRuns: 60, seed: 20261201 },
    );
  });
});
