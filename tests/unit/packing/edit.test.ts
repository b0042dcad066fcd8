import {
  droppedPlacements,
  lowestFreeZ,
  movedPlacements,
  parseInstance,
  placementsAtFault,
  shapeEditFaults,
  inLiftOrder,
  summariseLayout,
  turnedPlacements,
  validateLayout,
  type PackInstance,
  type Placement,
} from '../../../shared/packing';

// An invented 100 x 100 x 100 mm chamber, 5 mm keep-out at the walls, floor and top, 2 mm between parts.
// A 20 x 10 x 10 mm bracket may lie any way up turned about z; a 10 mm cube must stay as stored.
const parsed = parseInstance({
  format: 'pack-instance/1',
  chamber: [100, 100, 100],
  margin: { xy: 5, bottom: 5, top: 5 },
  spacing: 2,
  layerHeight: 0.1,
  parts: [
    { id: 'bracket', size: [20, 10, 10], quantity: 2, orientations: ['xyz', 'yxz'] },
    { id: 'cube', size: [10, 10, 10], quantity: 1, orientations: ['xyz'] },
  ],
});
if (!parsed.ok) throw new Error('the test instance is invalid');
const instance: PackInstance = parsed.instance;

const place = (id: string, position: [number, number, number], size: [number, number, number], orientation: Placement['orientation'] = 'xyz'): Placement => ({
  id,
  position,
  size,
  orientation,
});
// Two brackets side by side on the floor keep-out, 2 mm apart, and the cube further along.
const start = [place('bracket', [5, 5, 5], [20, 10, 10]), place('bracket', [27, 5, 5], [20, 10, 10]), place('cube', [60, 60, 5], [10, 10, 10])];
const check = (ps: Placement[]) => validateLayout(instance, summariseLayout(instance, ps));

describe('moving placements by hand', () => {
  it('moves the chosen ones across the plate at their height and keeps them inside the usable region', () => {
    const moved = movedPlacements(instance, start, new Set([2]), 10, -3);
    expect(moved[2].position).toEqual([70, 57, 5]);
    expect(moved[0]).toBe(start[0]);
    // 100 mm to the right would take the cube past the wall keep-out (95 mm): it stops at it.
    expect(movedPlacements(instance, start, new Set([2]), 100, 0)[2].position).toEqual([85, 60, 5]);
    // A group moves together: the step is shortened for the one nearest the wall.
    const group = movedPlacements(instance, start, new Set([0, 1]), -10, 0);
    expect(group[0].position[0]).toBe(5);
    expect(group[1].position[0]).toBe(27);
  });

  it('a move that brings a part within the spacing is found by the layout check, naming both parts', () => {
    const tooClose = movedPlacements(instance, start, new Set([1]), -1, 0);
    const problems = check(tooClose);
    expect(problems.length).toBeGreaterThan(0);
    expect([...placementsAtFault(problems)].sort()).toEqual([0, 1]);
    expect(check(start)).toEqual([]);
  });
});

describe('turning placements by a quarter turn about z', () => {
  it('swaps the x and y extents around the centre of the footprint, and the orientation with them', () => {
    const turned = turnedPlacements(instance, start, new Set([1]));
    if (!turned.ok) throw new Error(turned.message);
    // Centre (37, 10): the 10 x 20 footprint runs from x 32 to 42 and y 0 to 20, pulled inside the 5 mm keep-out.
    expect(turned.placements[1]).toEqual(place('bracket', [32, 5, 5], [10, 20, 10], 'yxz'));
    expect(check(turned.placements)).toEqual([]);
  });

  it('refuses a part whose orientation rule keeps it as stored', () => {
    const turned = turnedPlacements(instance, start, new Set([2]));
    expect(turned.ok).toBe(false);
  });
});

describe('dropping to the lowest free height', () => {
  it('lands on the floor keep-out when nothing is under it, and just over a part (plus the spacing) when one is', () => {
    const lifted = start.map((p, i) => (i === 2 ? place('cube', [60, 60, 40], [10, 10, 10]) : p));
    expect(droppedPlacements(instance, lifted, new Set([2]))[2].position[2]).toBe(5);
    // The cube moved over the first bracket: it rests 2 mm over its top (5 + 10 + 2 = 17 mm).
    const over = start.map((p, i) => (i === 2 ? place('cube', [8, 5, 40], [10, 10, 10]) : p));
    expect(lowestFreeZ(instance, over, 2)).toBe(17);
    const dropped = droppedPlacements(instance, over, new Set([2]));
    expect(dropped[2].position).toEqual([8, 5, 17]);
    expect(check(dropped)).toEqual([]);
  });

  it('uses a gap under a part when the part fits in it with the spacing above and below', () => {
    // A bracket floating at 30 mm leaves 5..28 mm free under it: a 10 mm cube fits at the floor keep-out.
    const floating = [place('bracket', [5, 5, 30], [20, 10, 10]), start[1], place('cube', [8, 5, 60], [10, 10, 10])];
    expect(lowestFreeZ(instance, floating, 2)).toBe(5);
    // A bracket at 16 mm leaves no room (the cube's top 15 mm plus the 2 mm gap passes 16 mm): the cube goes over
    // it, at 16 + 10 + 2 = 28 mm.
    const low = [place('bracket', [5, 5, 16], [20, 10, 10]), start[1], place('cube', [8, 5, 60], [10, 10, 10])];
    expect(lowestFreeZ(instance, low, 2)).toBe(28);
  });
});

describe('parts of a layout packed by shape changed by hand', () => {
  // A 40 x 40 x 20 mm cup at the floor holding a 10 mm cube (their boxes overlap: the cube is in the hollow),
  // and a bracket standing free. Listed in the order they were placed: the cup before what it holds.
  const cup = place('bracket', [5, 5, 5], [40, 40, 20]);
  const held = place('cube', [20, 20, 8], [10, 10, 10]);
  const free = place('bracket', [60, 60, 5], [20, 10, 10]);
  const layout = [cup, held, free];

  it('leaves the nested parts alone when nothing was moved by hand, though their boxes overlap', () => {
    expect(shapeEditFaults(instance, layout, [])).toEqual(new Set());
    // The boxes' check would flag them.
    expect(validateLayout(instance, summariseLayout(instance, layout)).length).toBeGreaterThan(0);
  });

  it('lets a moved part stand where its box is clear of the others by the spacing', () => {
    const moved = movedPlacements(instance, layout, new Set([2]), -10, 0);
    expect(shapeEditFaults(instance, moved, [2])).toEqual(new Set());
  });

  it('flags a part moved closer than the spacing to another box, or into a hollow (its box meets the cup\'s)', () => {
    // The free bracket 14 mm to the left and 20 mm to the front: beside the cup, 1 mm from its box (which ends at
    // x = 45 mm), less than the 2 mm spacing.
    const near = movedPlacements(instance, layout, new Set([2]), -14, -20);
    expect(shapeEditFaults(instance, near, [2])).toEqual(new Set([2]));
    // The held cube moved 5 mm stays inside the cup's box: checked by boxes it is at fault (packing nests it).
    const inside = movedPlacements(instance, layout, new Set([1]), 5, 0);
    expect(shapeEditFaults(instance, inside, [1])).toEqual(new Set([1]));
  });

  it('flags a moved part that would be lifted out before a part above it, listed earlier', () => {
    // The free bracket dropped under a plate listed before it (the plate is lifted out after it: blocked).
    const plate = place('bracket', [55, 55, 40], [30, 20, 4]);
    const stacked = [plate, cup, free];
    expect(shapeEditFaults(instance, stacked, [2])).toEqual(new Set([2]));
    // Listed after the plate it sits under is fine the other way round: the bracket under, listed first.
    expect(shapeEditFaults(instance, [free, cup, plate], [0])).toEqual(new Set());
  });

  it('lists a moved part again where it can be lifted out in turn: before what is over it, after what is under it', () => {
    const plate = place('bracket', [55, 55, 40], [30, 20, 4]);
    const under = inLiftOrder([plate, cup, free], [2]);
    expect(under.placements).toEqual([free, plate, cup]);
    expect(under.indexOf).toEqual([1, 2, 0]);
    expect(shapeEditFaults(instance, under.placements, [0])).toEqual(new Set());
    // Dropped on top of the cup (listed last already, over it): it stays where it is.
    const onCup = place('cube', [20, 20, 27], [10, 10, 10]);
    expect(inLiftOrder([cup, free, onCup], [2]).indexOf).toEqual([0, 1, 2]);
    // Moved over the free bracket but listed first: it goes after it.
    const over = place('cube', [62, 60, 17], [10, 10, 10]);
    const after = inLiftOrder([over, cup, free], [0]);
    expect(after.placements).toEqual([cup, free, over]);
    // Caught between a part under it listed after one over it: no place for it, it stays (and is at fault).
    const low = place('cube', [62, 60, 5], [10, 10, 5]);
    const high = place('cube', [62, 60, 30], [10, 10, 5]);
    const mid = place('cube', [62, 60, 15], [10, 10, 5]);
    expect(inLiftOrder([high, mid, low], [1]).indexOf).toEqual([0, 1, 2]);
    expect(shapeEditFaults(instance, [high, mid, low], [1])).toEqual(new Set([1]));
  });
});
