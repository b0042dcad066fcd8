import {
  createPacking,
  decodeLayout,
  encodeLayout,
  generatePowderBed,
  lowerBound,
  packSync,
  packV2Sync,
  parseInstanceV2,
  validateLayout,
  type PackResult,
} from '@/shared/packing';
import { instanceOf } from './helpers';

const chamber = { format: 'pack-instance/1', chamber: [300, 300, 380], margin: { xy: 8, bottom: 5, top: 5 }, spacing: 3, timeLimitMs: 200 };

describe('odd but valid input never throws and gives a valid layout', () => {
  test.each([
    ['zero parts', []],
    ['a part too large for the chamber in every orientation', [{ id: 'big', size: [500, 290, 290], quantity: 2 }]],
    ['quantity 10,000', [{ id: 'tiny', size: [2, 2, 1], quantity: 10000 }]],
    ['0.01 mm parts', [{ id: 'speck', size: [0.01, 0.01, 0.01], quantity: 500 }]],
    ['a part exactly as large as the usable region', [{ id: 'whole', size: [284, 284, 370], quantity: 1 }]],
    ['zero quantity', [{ id: 'none', size: [10, 10, 10], quantity: 0 }]],
  ])('%s', (_name, parts) => {
    for (const objective of ['min-height', 'max-volume']) {
      const inst = instanceOf({ ...chamber, objective, parts });
      const result = packSync(inst);
      expect(validateLayout(inst, result)).toEqual([]);
    }
  });

  test("a layout with nothing placed counts its top margin's layers, by the contract's ceil((height + margin.top) / layerHeight)", () => {
    // 5 mm of top margin at 0.11 mm: ceil(45.45) = 46 layers, whatever the version or fit (the estimate command counts the same).
    for (const parts of [[], [{ id: 'none', size: [10, 10, 10], quantity: 0 }]]) {
      const inst = instanceOf({ ...chamber, layerHeight: 0.11, parts });
      const result = packSync(inst);
      expect([result.height, result.layers]).toEqual([0, 46]);
      expect(validateLayout(inst, result)).toEqual([]);
      for (const fit of ['box', 'shape'] as const) {
        const v2 = parseInstanceV2({ ...chamber, format: 'pack-instance/2', layerHeight: 0.11, fit, parts });
        if (!v2.ok) throw new Error(JSON.stringify(v2.problems));
        const r2 = packV2Sync(v2.instance);
        expect([r2.height, r2.layers, r2.areaProfile]).toEqual([0, 46, []]);
      }
    }
  });

  test('a part that fits in no allowed orientation is reported unplaced and the rest is packed', () => {
    const inst = instanceOf({
      ...chamber,
      parts: [
        { id: 'pole', size: [10, 10, 372], quantity: 1, orientations: ['xyz'] },
        { id: 'clip', size: [20, 10, 5], quantity: 5 },
      ],
    });
    const result = packSync(inst);
    expect(result.unplaced).toEqual([{ id: 'pole', count: 1 }]);
    expect(result.placements).toHaveLength(5);
  });

  test('when the chamber cannot hold everything, min-height fills it and lists the rest unplaced', () => {
    const inst = instanceOf({ ...chamber, parts: [{ id: 'block', size: [100, 100, 100], quantity: 40 }] });
    const result = packSync(inst);
    expect(validateLayout(inst, result)).toEqual([]);
    // 284 / 103 -> 2 per axis in plan, 370 / 103 -> 3 high: 12 fit (gaps of 3 mm, common practice spacing).
    expect(result.placements).toHaveLength(12);
    expect(result.unplaced).toEqual([{ id: 'block', count: 28 }]);
  });

  test('the whole-chamber part sits exactly in the usable region', () => {
    const inst = instanceOf({ ...chamber, parts: [{ id: 'whole', size: [284, 284, 370], quantity: 1 }] });
    const result = packSync(inst);
    expect(result.placements).toEqual([{ id: 'whole', position: [8, 8, 5], size: [284, 284, 370], orientation: 'xyz' }]);
    expect(result.height).toBe(375);
    // ceil((375 + 5) / 0.1)
    expect(result.layers).toBe(3800);
  });
});

describe('results', () => {
  test('the same instance and seed give the same layout', () => {
    const inst = generatePowderBed({ parts: 120, seed: 5, timeLimitMs: 60_000 });
    const a = packSync(inst, { maxCompletions: 25 });
    const b = packSync(inst, { maxCompletions: 25 });
    expect(b.placements).toEqual(a.placements);
    expect(b.height).toBe(a.height);
  });

  test('min-height layouts are much lower than the chamber and not below the lower bound', () => {
    const inst = generatePowderBed({ parts: 150, seed: 3, timeLimitMs: 60_000 });
    const result = packSync(inst, { maxCompletions: 30 });
    expect(result.unplaced).toEqual([]);
    expect(result.height).toBeGreaterThanOrEqual(lowerBound(inst) - 1e-9);
    expect(result.height).toBeLessThan(inst.chamber[2] / 2);
  });

  test('an asynchronous run reports progress with a valid best layout and can be stopped', async () => {
    const inst = generatePowderBed({ parts: 400, seed: 2, timeLimitMs: 20_000 });
    const seen: Array<{ phase: string; share: number; best: PackResult | null }> = [];
    let stop = false;
    setTimeout(() => (stop = true), 300);
    const started = Date.now();
    const result = await createPacking({ ...inst, objective: 'max-volume' }, { yieldMs: 20 }).run({
      onProgress: (phase, share, best) => seen.push({ phase, share, best }),
      shouldStop: () => stop,
    });
    expect(Date.now() - started).toBeLessThan(5000);
    expect(seen.at(-1)?.phase).toBe('done');
    expect(seen.some((s) => s.best !== null)).toBe(true);
    expect(validateLayout({ ...inst, objective: 'max-volume' }, result)).toEqual([]);
  });

  test('a layout survives the typed-array encoding unchanged', () => {
    const inst = generatePowderBed({ parts: 80, seed: 9, timeLimitMs: 50 });
    const result = packSync(inst, { maxCompletions: 5 });
    const decoded = decodeLayout(encodeLayout(result));
    expect(decoded.ok && decoded.result).toEqual(result);
  });
});

describe('generated powder-bed builds', () => {
  test.each([0, 1, 3, 200])('hold exactly the %i parts asked for', (parts) => {
    const inst = generatePowderBed({ parts, seed: 1 });
    expect(inst.parts.reduce((s, p) => s + p.quantity, 0)).toBe(parts);
  });
});
