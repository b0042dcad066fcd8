/**
 * The floor the numbers show under a layout: worked by hand on small
 * instances, and checked against layouts the engines pack (none stands
 * under it). By box it is the continuous bound of Martello, Pisinger & Vigo
 * (Operations Research 48(2), 2000) on boxes grown by the spacing; by shape
 * the tallest part at its lowest, or the parts' own volume over the bed.
 */
import { packSync, parseInstance, type PackInstanceInput } from '../../../shared/packing';
import { floorNote, layoutFloor } from '../../../components/plans/floor';

const margin = { xy: 0, bottom: 5, top: 5 };
const names = new Map([
  ['pin', 'Locating pin'],
  ['cube', 'Test cube'],
]);
const nameOf = (id: string) => names.get(id);

describe('layoutFloor and floorNote', () => {
  test('a pin kept upright sets the floor at its length over the floor margin, and names it', () => {
    const input: PackInstanceInput = {
      format: 'pack-instance/1',
      chamber: [200, 200, 200],
      margin,
      spacing: 2,
      parts: [
        { id: 'pin', size: [10, 10, 50], quantity: 2, orientations: ['xyz', 'yxz'] },
        { id: 'cube', size: [10, 10, 10], quantity: 3 },
      ],
    };
    const floor = layoutFloor(input, false)!;
    expect(floor.tallest).toEqual({ id: 'pin', heightMm: 50 });
    expect(floor.heightMm).toBeCloseTo(55, 9);
    expect(floorNote(floor, { height: 60, unplaced: [] }, nameOf, false)).toBe(
      'No layout of these parts by their boxes can be lower than 55.0 mm: Locating pin stands 50.0 mm at its lowest that its orientation rule allows, over the 5.0 mm floor margin. This layout stands 5.0 mm over it.',
    );
    expect(floorNote(floor, { height: 55.02, unplaced: [] }, nameOf, false)).toMatch(/This layout is as low as any by boxes can be\.$/);
    expect(floorNote(floor, { height: 55.02, unplaced: [] }, nameOf, true)).toMatch(/^No layout of these parts can be lower .* This layout is as low as any can be\.$/);
    // With parts left out the floor says nothing about the layout.
    expect(floorNote(floor, { height: 30, unplaced: [{ id: 'pin', count: 1 }] }, nameOf, false)).toBeNull();
    // Allowed to lie down, the pin stands 10 mm: the floor is the 10 mm parts over the margin.
    const lying = layoutFloor({ ...input, parts: [{ ...input.parts[0], orientations: undefined }, input.parts[1]] }, false)!;
    expect(lying.heightMm).toBeCloseTo(15, 9);
  });

  test("by box the boxes' room with the spacing, by shape the parts' own volume, and the box engine's layout stands over its floor", () => {
    // 400 cubes of 10 mm on a 100 x 100 mm bed, 2 mm apart. By box: 400 x 12^3 / 102^2 - 2 = 64.436 mm (+5).
    // By shape, balls of 10 mm across in the same boxes (volume 4/3 pi 5^3 = 523.599 mm^3): 400 x 523.599 / 100^2 = 20.944 mm (+5).
    const input: PackInstanceInput = { format: 'pack-instance/1', chamber: [100, 100, 300], margin, spacing: 2, timeLimitMs: 300, parts: [{ id: 'cube', size: [10, 10, 10], quantity: 400 }] };
    const byBox = layoutFloor(input, false)!;
    expect(byBox.byVolume).toBe(true);
    expect(byBox.heightMm).toBeCloseTo(5 + (400 * 12 ** 3) / 102 ** 2 - 2, 9);
    expect(floorNote(byBox, { height: 90, unplaced: [] }, nameOf, false)).toContain("the parts' boxes with the spacing, spread over the bed, fill 64.4 mm");
    const ball = (4 / 3) * Math.PI * 125;
    const byShape = layoutFloor(input, true, () => ball)!;
    expect(byShape.heightMm).toBeCloseTo(5 + (400 * ball) / 1e4, 9);
    expect(floorNote(byShape, { height: 90, unplaced: [] }, nameOf, true)).toBe(
      "No layout of these parts can be lower than 25.9 mm: the parts' own volume alone, spread over the bed, fills 20.9 mm, over the 5.0 mm floor margin. This layout stands 64.1 mm over it.",
    );
    // A part whose volume is not known (an open mesh, packed as its box) counts as its box.
    expect(layoutFloor(input, true, () => undefined)!.heightMm).toBeCloseTo(5 + 40, 9);

    // 8 by 8 cubes a layer with 2 mm between (94 mm), 400 of them in 7 layers: 5 + 7 x 10 + 6 x 2 = 87 mm.
    const parsed = parseInstance(input);
    if (!parsed.ok) throw new Error('instance');
    const result = packSync(parsed.instance, { maxCompletions: 2 });
    expect(result.unplaced).toEqual([]);
    expect(result.height).toBeGreaterThanOrEqual(byBox.heightMm);
  });

  test('nothing to place, or an instance that does not read, has no floor', () => {
    expect(layoutFloor({ format: 'pack-instance/1', chamber: [100, 100, 100], parts: [] }, false)).toBeNull();
    expect(layoutFloor({ format: 'pack-instance/1', chamber: [100, 100, -1], parts: [{ id: 'a', size: [1, 1, 1], quantity: 1 }] }, false)).toBeNull();
  });
});
