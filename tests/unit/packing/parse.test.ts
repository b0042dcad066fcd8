import { parseInstance } from '@/shared/packing';

const minimal = { format: 'pack-instance/1', chamber: [300, 300, 380], parts: [{ id: 'clip-a', size: [24, 12, 8], quantity: 40 }] };

describe('reading an instance', () => {
  test('defaults fill in margin, spacing, layer height, objective, time limit, seed and all six orientations', () => {
    const parsed = parseInstance(minimal);
    expect(parsed.ok).toBe(true);
    if (!parsed.ok) return;
    expect(parsed.instance).toMatchObject({
      margin: { xy: 0, bottom: 0, top: 0 },
      spacing: 0,
      layerHeight: 0.1,
      objective: 'min-height',
      timeLimitMs: 2000,
      seed: 1,
    });
    expect(parsed.instance.parts[0].orientations).toEqual(['xyz', 'xzy', 'yxz', 'yzx', 'zxy', 'zyx']);
  });

  test('a negative size is reported with the exact field', () => {
    const parsed = parseInstance({ ...minimal, parts: [minimal.parts[0], minimal.parts[0], minimal.parts[0], { id: 'd', size: [1, -2, 3], quantity: 1 }] });
    expect(parsed.ok).toBe(false);
    if (parsed.ok) return;
    expect(parsed.problems).toContainEqual({ field: 'parts[3].size[1]', message: 'must be a positive number' });
    // The repeated id is reported too: every problem, not just the first.
    expect(parsed.problems.some((p) => p.field === 'parts[1].id')).toBe(true);
  });

  test.each([
    [{ ...minimal, objective: 'min-cost' }, 'objective'],
    [{ ...minimal, parts: [{ ...minimal.parts[0], orientations: ['xyz', 'xxz'] }] }, 'parts[0].orientations[1]'],
    [{ ...minimal, parts: [{ id: 'a', quantity: 1 }] }, 'parts[0].size'],
    [{ ...minimal, parts: [{ id: 'a', size: [1, 2, 3], quantity: 1.5 }] }, 'parts[0].quantity'],
    [{ ...minimal, chamber: [300, 300] }, 'chamber'],
    [{ ...minimal, spacing: -1 }, 'spacing'],
    [{ ...minimal, margin: { xy: 150 } }, 'margin.xy'],
    [{ ...minimal, format: 'other/2' }, 'format'],
    [{ ...minimal, parts: 'none' }, 'parts'],
  ])('bad input %# names its field', (input, field) => {
    const parsed = parseInstance(input);
    expect(parsed.ok).toBe(false);
    if (parsed.ok) return;
    expect(parsed.problems.map((p) => p.field)).toContain(field);
  });

  test('a layer height that would make more than 100,000 layers of the chamber is refused before any packing', () => {
    // 10^-6 mm: 380 million layers, and a layout by shape carries a number a layer (10^7 of them took 450 MB).
    const parsed = parseInstance({ ...minimal, layerHeight: 1e-6 });
    expect(parsed.ok).toBe(false);
    if (parsed.ok) return;
    expect(parsed.problems).toEqual([{ field: 'layerHeight', message: "must leave at most 100000 layers in the chamber's 380 mm (a layer of 0.0038 mm or more), not 0.000001" }]);
    // Machines' layers (0.01 mm and up) stay well within it.
    expect(parseInstance({ ...minimal, layerHeight: 0.01 }).ok).toBe(true);
  });

  test('a part larger than the chamber is not bad input (it will be reported unplaced)', () => {
    expect(parseInstance({ ...minimal, parts: [{ id: 'big', size: [900, 900, 900], quantity: 1 }] }).ok).toBe(true);
  });
});
