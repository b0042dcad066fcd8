import { summariseLayout, validateLayout, type Placement } from '@/shared/packing';
import { instanceOf } from './helpers';

const inst = instanceOf({
  format: 'pack-instance/1',
  chamber: [100, 100, 100],
  margin: { xy: 5, bottom: 5, top: 5 },
  spacing: 2,
  parts: [
    { id: 'a', size: [10, 20, 30], quantity: 2, orientations: ['xyz', 'yxz'] },
    { id: 'b', size: [5, 5, 5], quantity: 1 },
  ],
});
const good: Placement[] = [
  { id: 'a', position: [5, 5, 5], size: [10, 20, 30], orientation: 'xyz' },
  { id: 'a', position: [17, 5, 5], size: [20, 10, 30], orientation: 'yxz' },
  { id: 'b', position: [5, 27, 5], size: [5, 5, 5], orientation: 'xyz' },
];
const fields = (ps: Placement[]) => validateLayout(inst, summariseLayout(inst, ps)).map((p) => p.field);

describe('layout validator', () => {
  test('accepts a layout with gaps exactly equal to the spacing', () => {
    expect(validateLayout(inst, summariseLayout(inst, good))).toEqual([]);
  });

  test('catches two boxes closer than the spacing', () => {
    const close = good.map((p, i) => (i === 1 ? { ...p, position: [16, 5, 5] as [number, number, number] } : p));
    expect(fields(close)).toContain('placements[1]');
  });

  test('catches overlapping boxes among many (the spatial grid still finds them)', () => {
    const many = instanceOf({ format: 'pack-instance/1', chamber: [1000, 1000, 10], parts: [{ id: 'p', size: [1, 1, 1], quantity: 10000 }] });
    const ps: Placement[] = [];
    for (let i = 0; i < 100; i++) for (let j = 0; j < 100; j++) ps.push({ id: 'p', position: [i * 10, j * 10, 0], size: [1, 1, 1], orientation: 'xyz' });
    expect(validateLayout(many, summariseLayout(many, ps))).toEqual([]);
    ps[9999] = { ...ps[9999], position: [0.5, 0.5, 0.5] };
    expect(validateLayout(many, summariseLayout(many, ps)).map((p) => p.field)).toContain('placements[9999]');
  });

  test('catches a box outside the usable region (inside the margin)', () => {
    const out = good.map((p, i) => (i === 2 ? { ...p, position: [5, 27, 91] as [number, number, number] } : p));
    expect(fields(out)).toContain('placements[2].position[2]');
  });

  test('catches an orientation the part does not allow and a size that does not match it', () => {
    const laid = good.map((p, i) => (i === 0 ? { ...p, orientation: 'zxy' as const, size: [30, 10, 20] as [number, number, number] } : p));
    expect(fields(laid)).toContain('placements[0].orientation');
    const wrongSize = good.map((p, i) => (i === 0 ? { ...p, size: [20, 10, 30] as [number, number, number] } : p));
    expect(fields(wrongSize)).toEqual(expect.arrayContaining(['placements[0].size[0]', 'placements[0].size[1]']));
  });

  test('catches counts that do not add up to the quantity', () => {
    const result = summariseLayout(inst, good.slice(0, 2));
    expect(validateLayout(inst, result)).toEqual([]);
    expect(validateLayout(inst, { ...result, unplaced: [] }).map((p) => p.field)).toContain('parts[1].quantity');
    expect(validateLayout(inst, { ...result, unplaced: [{ id: 'b', count: 2 }] }).map((p) => p.field)).toContain('parts[1].quantity');
  });

  test('catches a wrong height or layer count', () => {
    const result = summariseLayout(inst, good);
    expect(validateLayout(inst, { ...result, height: result.height - 1 }).map((p) => p.field)).toContain('height');
    expect(validateLayout(inst, { ...result, layers: result.layers + 1 }).map((p) => p.field)).toContain('layers');
  });
});

describe('layout validator on layouts made to cost it', () => {
  const big = (quantity: number, size: number, spacing: number) =>
    instanceOf({ format: 'pack-instance/1', chamber: [300, 300, 380], spacing, parts: [{ id: 's', size: [size, size, size], quantity }] });
  const at = (n: number, size: number, where: (i: number) => [number, number, number]): Placement[] =>
    Array.from({ length: n }, (_, i) => ({ id: 's', position: where(i), size: [size, size, size], orientation: 'xyz' }));

  test('copies more than the quantity: only the count is named, and no pair of them is looked at', () => {
    const inst2 = big(2, 10, 1);
    const heap = at(20_000, 10, () => [0, 0, 0]);
    expect(validateLayout(inst2, summariseLayout(inst2, heap))).toEqual([{ field: 'parts[0].quantity', message: 'is 2 but "s" has 20000 placed' }]);
  });

  test('20,000 copies heaped in one spot (the right count): the first 20 pairs named, then "at least" the rest up to 10,000', () => {
    const inst2 = big(20_000, 10, 1);
    const problems = validateLayout(inst2, summariseLayout(inst2, at(20_000, 10, () => [0, 0, 0])));
    expect(problems.filter((p) => /overlapping/.test(p.message))).toHaveLength(20);
    expect(problems).toContainEqual({ field: 'placements', message: 'at least 9980 more pairs are closer than the spacing' });
  });

  test('tens of thousands of specks crowded into a few cells, each clear of the others: refused as too crowded to check', () => {
    // 0.01 mm cubes 0.05 mm apart in a 5 mm square: all in one cell of the grid, 200 million pairs.
    const inst2 = big(20_000, 0.01, 0.01);
    const specks = at(20_000, 0.01, (i) => [(i % 100) * 0.05, Math.floor(i / 100) * 0.05, 0]);
    const problems = validateLayout(inst2, summariseLayout(inst2, specks));
    expect(problems).toEqual([{ field: 'placements', message: expect.stringMatching(/^crowd too many boxes together to be checked \(more than 20,000,000 pairs/) }]);
  });
});
