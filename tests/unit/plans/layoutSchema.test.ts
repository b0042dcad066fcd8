/**
 * The body of a layout to keep, as the server reads it before anything else: a section profile longer than any
 * build the packing takes (its 100,000 layers at most) is refused naming the field, before its numbers are read.
 */
import { MAX_LAYERS } from '@/shared/packing/parse';
import { layoutCreateSchema } from '@/shared/schemas/plans';

const body = (layers: number) => ({
  instance: {},
  result: {
    format: 'pack-result/2',
    placements: [],
    unplaced: [],
    height: 0,
    layers: 0,
    utilization: 0,
    elapsedMs: 0,
    areaProfile: new Array<number>(layers).fill(1.5),
    contourProfile: new Array<number>(layers).fill(2.5),
  },
});

test('a profile of as many layers as the packing allows is read; one more layer is refused naming the field', () => {
  expect(MAX_LAYERS).toBe(100_000);
  expect(layoutCreateSchema.safeParse(body(MAX_LAYERS)).success).toBe(true);
  const long = layoutCreateSchema.safeParse(body(MAX_LAYERS + 1));
  expect(long.success).toBe(false);
  expect(long.error!.issues.map((i) => [i.path.join('.'), i.message])).toEqual([
    ['result.areaProfile', 'must be at most 100,000 layers'],
    ['result.contourProfile', 'must be at most 100,000 layers'],
  ]);
});
