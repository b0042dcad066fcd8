/**
 * Filling hollows before packing: an open housing on a plate just its size
 * holds six small blocks. Packed by boxes the blocks have to lie above it
 * (30 + 3 + 8 mm: the cup, the spacing, a block); packed by shape they stand
 * on its floor inside its walls, so the build is only as tall as the housing.
 * Each layout is checked exactly against the meshes by the validator
 * (triangle-to-triangle gaps, containment, lift-out order).
 */
import { bracket, housing, type MeshData } from '@/shared/geometry';
import { createShapePacking, createBoxFitPacking, parseInstanceV2, validateShapeLayout, type PackInstanceV2 } from '@/shared/packing';
import { columnProfile, shapeParts, defaultCell } from '@/shared/packing/shape';
import { bestPair, buildNests } from '@/shared/packing/shape/nest';
import { composeRotations, ROTATION_CODES } from '@/shared/geometry/rotations';
import { box } from '../../geometry/helpers';

// 80 x 50 x 30 mm outside, walls and floor 2.5 mm: inside 75 x 45 mm, 27.5 mm deep.
const cup = housing({ lengthMm: 80, widthMm: 50, heightMm: 30, wallMm: 2.5, floorMm: 2.5, cornerRadiusMm: 5, cornerSegments: 6 });
const block = box(10, 10, 8);

/** Parts on an 82 x 52 mm plate, no margins, 3 mm spacing: the usable plate is a 80 x 50 mm holder's footprint plus 2 mm. */
function onSmallPlate(fit: 'box' | 'shape', parts: Array<{ id: string; mesh: MeshData; quantity: number; upright?: boolean }>): PackInstanceV2 {
  const parsed = parseInstanceV2({
    format: 'pack-instance/2',
    chamber: [82, 52, 200],
    margin: { xy: 0, bottom: 0, top: 0 },
    spacing: 3,
    layerHeight: 0.1,
    timeLimitMs: 400,
    fit,
    parts: parts.map((p) => ({ id: p.id, mesh: { positions: p.mesh.positions, indices: p.mesh.indices }, quantity: p.quantity, ...(p.upright ? { orientations: ['upright'] } : {}) })),
  });
  if (!parsed.ok) throw new Error(JSON.stringify(parsed.problems));
  return parsed.instance;
}

// Nothing fits beside the cup on this plate.
function plateOfTheCup(fit: 'box' | 'shape'): PackInstanceV2 {
  return onSmallPlate(fit, [
    { id: 'cup', mesh: cup, quantity: 1, upright: true },
    { id: 'block', mesh: block, quantity: 6, upright: true },
  ]);
}

test('the cup holds the six blocks: the nest uses every copy and lists the cup before what it holds', () => {
  const inst = plateOfTheCup('shape');
  const parts = shapeParts(inst);
  const cell = defaultCell(inst);
  const kinds = parts.map((p) => ({ quantity: p.quantity, profiles: p.rotations.map((r) => columnProfile(p, r, cell, inst.spacing)).sort((a, b) => a.cost - b.cost) }));
  const { nests, used } = buildNests(kinds, cell, inst.spacing);
  expect(nests).toHaveLength(1);
  expect(used).toEqual([1, 6]);
  const members = nests[0].members;
  expect(members.map((m) => m.kind)).toEqual([0, 1, 1, 1, 1, 1, 1]);
  // Every block stands on the cup's floor (2.5 mm) plus the spacing, under the rim (30 mm).
  for (const m of members.slice(1)) {
    expect(m.dz).toBeGreaterThanOrEqual(2.5 + 3 - 1e-9);
    expect(m.dz + m.profile.extent[2]).toBeLessThanOrEqual(30 + 1e-9);
  }
});

test('packed by shape the build is as tall as the cup; packed by boxes the blocks lie above it', () => {
  const byShape = createShapePacking(plateOfTheCup('shape'), { maxRuns: 2 }).runSync();
  expect(byShape.unplaced).toEqual([]);
  expect(byShape.height).toBeCloseTo(30, 6);
  expect(validateShapeLayout(plateOfTheCup('shape'), byShape)).toEqual([]);

  const byBox = createBoxFitPacking(plateOfTheCup('box')).runSync();
  // 30 mm cup, 3 mm spacing, 8 mm blocks.
  expect(byBox.height).toBeCloseTo(41, 6);
});

test('without nesting first, the same packing by shape still keeps every part apart (the option only changes the order)', () => {
  const inst = plateOfTheCup('shape');
  const result = createShapePacking(inst, { maxRuns: 2, nest: false, boxShare: 0 }).runSync();
  expect(validateShapeLayout(inst, result)).toEqual([]);
});

// A shallow tray, 80 x 50 x 15 mm outside, walls and floor 2.5 mm (12.5 mm deep inside), and thin plates 40 x 20 x 3 mm.
// On the open plate a plate costs least on end (its footprint 3 mm wide); on end it stands 20 or 40 mm tall, over
// the tray's rim. Lying flat it is 3 mm tall: on the tray's floor (2.5 mm) plus the spacing (3 mm) its top is at
// 8.5 mm, under the 15 mm rim. Inside a holder every allowed turn counts, not only the cheapest on the plate.
const tray = housing({ lengthMm: 80, widthMm: 50, heightMm: 15, wallMm: 2.5, floorMm: 2.5, cornerRadiusMm: 5, cornerSegments: 6 });
const plate = box(40, 20, 3);

// Nothing fits beside the tray on this plate.
function trayAndPlates(plates: number): PackInstanceV2 {
  return onSmallPlate('shape', [
    { id: 'tray', mesh: tray, quantity: 1, upright: true },
    { id: 'plate', mesh: plate, quantity: plates },
  ]);
}

test('a thin plate that packs best on end lies flat in a shallow tray: the turns a holder may take count, not only the cheapest', () => {
  const inst = trayAndPlates(1);
  const parts = shapeParts(inst);
  const cell = defaultCell(inst);
  const all = parts.map((p) => p.rotations.map((r) => columnProfile(p, r, cell, inst.spacing)).sort((a, b) => a.cost - b.cost));
  // The plate's cheapest turns on the plate stand it on end.
  const onEnd = all[1].filter((p) => p.extent[2] >= 20 - 1e-9);
  expect(onEnd[0]).toBe(all[1][0]);
  const only = buildNests([{ quantity: 1, profiles: all[0] }, { quantity: 1, profiles: onEnd }], cell, inst.spacing);
  expect(only.nests).toHaveLength(0);
  const { nests, used } = buildNests([{ quantity: 1, profiles: all[0] }, { quantity: 1, profiles: onEnd, inside: all[1] }], cell, inst.spacing);
  expect(used).toEqual([1, 1]);
  const held = nests[0].members[1];
  expect(held.profile.extent[2]).toBeCloseTo(3, 9);
  expect(held.dz).toBeGreaterThanOrEqual(2.5 + 3 - 1e-9);
  expect(held.dz + held.profile.extent[2]).toBeLessThanOrEqual(15 + 1e-9);
});

test('a holder filled in another of its turns when that one holds more: a 60 mm bar fits along the cup, not across it', () => {
  // Inside 75 x 45 mm less the spacing on each side: 69 x 39 mm. A 60 x 8 x 8 mm bar fits only along the long side.
  const bar = box(60, 8, 8);
  const inst = plateOfTheCup('shape');
  const cell = defaultCell(inst);
  const [cupPart] = shapeParts(inst);
  const barPart = shapeParts({ ...inst, parts: [{ ...inst.parts[1], id: 'bar', mesh: { positions: bar.positions, indices: bar.indices } }] })[0];
  // Upright, long side along x (rotation 0) and along y (a quarter turn about z).
  const upright = columnProfile(cupPart, 0, cell, inst.spacing);
  const across = cupPart.rotations.map((r) => columnProfile(cupPart, r, cell, inst.spacing)).find((p) => p.extent[0] < p.extent[1] && p.extent[2] === upright.extent[2])!;
  expect(across.extent[1]).toBeCloseTo(80, 6);
  const barAlongX = columnProfile(barPart, 0, cell, inst.spacing);
  expect(barAlongX.extent).toEqual([60, 8, 8].map((v) => expect.closeTo(v, 6)));
  const kinds = [
    { quantity: 1, profiles: [across, upright] },
    { quantity: 1, profiles: [barAlongX] },
  ];
  // Only its first turn: the bar does not fit across, nothing is held.
  expect(buildNests(kinds, cell, inst.spacing, 0.35, undefined, 1).nests).toHaveLength(0);
  const { nests, used } = buildNests(kinds, cell, inst.spacing, 0.35, undefined, 2);
  expect(used).toEqual([1, 1]);
  expect(nests[0].members[0].profile).toBe(upright);
});

test('packed by shape, the tray and the plate it holds are as tall as the tray, checked against the meshes', () => {
  const inst = trayAndPlates(1);
  const result = createShapePacking(inst, { maxRuns: 2 }).runSync();
  expect(result.unplaced).toEqual([]);
  expect(result.height).toBeCloseTo(15, 6);
  expect(validateShapeLayout(inst, result)).toEqual([]);
});

// Two L brackets, legs 40 and 30 mm long and 4 mm thick, 15 mm wide, lying flat. Corner to corner, the second
// turned a half turn about z and moved along the long leg by a leg's thickness and the spacing, each leg of one
// runs 3 mm clear of the other's: they take 40 + 4 + 3 by 30 mm (47 x 30), where their two boxes side by side
// take 83 x 30 or 40 x 63 (elementary geometry, worked by hand).
const ell = bracket({ legAMm: 40, legBMm: 30, thicknessMm: 4, widthMm: 15, gussetMm: 0 });

function plateOfTwoBrackets(fit: 'box' | 'shape', plate: [number, number]): PackInstanceV2 {
  const parsed = parseInstanceV2({
    format: 'pack-instance/2',
    chamber: [plate[0], plate[1], 200],
    margin: { xy: 0, bottom: 0, top: 0 },
    spacing: 3,
    layerHeight: 0.1,
    timeLimitMs: 400,
    fit,
    parts: [{ id: 'bracket', mesh: { positions: ell.positions, indices: ell.indices }, quantity: 2, orientations: ['upright'] }],
  });
  if (!parsed.ok) throw new Error(JSON.stringify(parsed.problems));
  return parsed.instance;
}

test('two L brackets pair corner to corner in one box little larger than a bracket\'s, the second turned a half turn', () => {
  const inst = plateOfTwoBrackets('shape', [100, 100]);
  const [part] = shapeParts(inst);
  const cell = defaultCell(inst);
  const profiles = part.rotations.map((r) => columnProfile(part, r, cell, inst.spacing)).sort((a, b) => a.cost - b.cost);
  const pair = bestPair(0, profiles.slice(0, 3), profiles, cell, inst.spacing, [100, 100]);
  expect(pair).not.toBeNull();
  const [x, y, z] = pair!.profile.extent;
  // Lying flat (15 mm), 47 x 30 mm either way round, the 47 within a cell (the plan grid rounds the gap up).
  expect(z).toBeCloseTo(15, 6);
  expect(Math.max(x, y)).toBeGreaterThanOrEqual(47 - 1e-9);
  expect(Math.max(x, y)).toBeLessThanOrEqual(47 + cell + 1e-9);
  expect(Math.min(x, y)).toBeCloseTo(30, 6);
  expect(pair!.members.map((m) => m.kind)).toEqual([0, 0]);
  expect(pair!.members[0].profile.rotation).not.toBe(pair!.members[1].profile.rotation);
  // Moved along the short leg instead they take 40 by 30 + 4 + 3 mm: a plate of 46 x 36 mm holds neither way.
  expect(bestPair(0, profiles.slice(0, 3), profiles, cell, inst.spacing, [46, 36])).toBeNull();
});

test('on a plate of 48 x 31 mm the two brackets lie side by side packed by shape, one on the other packed by boxes', () => {
  const inst = plateOfTwoBrackets('shape', [48, 31]);
  const byShape = createShapePacking(inst, { maxRuns: 2 }).runSync();
  expect(byShape.unplaced).toEqual([]);
  expect(byShape.height).toBeCloseTo(15, 6);
  expect(validateShapeLayout(inst, byShape)).toEqual([]);
  // 15 + 3 + 15 mm.
  expect(createBoxFitPacking(plateOfTwoBrackets('box', [48, 31])).runSync().height).toBeCloseTo(33, 6);
});

// Two of the cups and a 10 x 10 x 40 mm post that must stand upright: on the cup's floor (2.5 mm) plus the spacing
// its top is at 45.5 mm, over one cup's 30 mm rim. A second cup upside down, its rim the spacing over the first's
// (at 33 mm), has its floor's underside at 33 + 27.5 = 60.5 mm: the post stands in both hollows, the spacing under it.
const post = box(10, 10, 40);
function cupsAndPost(): PackInstanceV2 {
  return onSmallPlate('shape', [
    { id: 'cup', mesh: cup, quantity: 2 },
    { id: 'post', mesh: post, quantity: 1, upright: true },
  ]);
}

test('two cups facing each other hold a post too tall for one: the second, upside down, is the lid and is lifted out first', () => {
  const inst = cupsAndPost();
  const [cupPart, postPart] = shapeParts(inst);
  const cell = defaultCell(inst);
  const upright = columnProfile(cupPart, 0, cell, inst.spacing);
  // Half a turn about x: (x, y, z) -> (x, -y, -z).
  const halfX = ROTATION_CODES.indexOf('+x-y-z');
  const flip = (p: typeof upright) => columnProfile(cupPart, composeRotations(p.rotation, halfX), cell, inst.spacing);
  const standing = columnProfile(postPart, 0, cell, inst.spacing);
  const kinds = [
    { quantity: 2, profiles: [upright] },
    { quantity: 1, profiles: [standing] },
  ];
  // One cup alone holds nothing: the post is taller than its rim.
  expect(buildNests(kinds, cell, inst.spacing).nests).toHaveLength(0);
  const { nests, used } = buildNests([{ ...kinds[0], flip }, kinds[1]], cell, inst.spacing);
  expect(used).toEqual([2, 1]);
  expect(nests).toHaveLength(1);
  expect(nests[0].lidded).toBe(true);
  const [holder, held, lid] = nests[0].members;
  expect([holder.kind, held.kind, lid.kind]).toEqual([0, 1, 0]);
  expect(lid.dz).toBeCloseTo(30 + 3, 9);
  expect(lid.profile.rotation).toBe(halfX);
  expect(held.dz).toBeGreaterThanOrEqual(2.5 + 3 - 1e-9);
  expect(held.dz + 40).toBeLessThanOrEqual(60.5 - 3 + 1e-9);
  expect(nests[0].profile.extent[2]).toBeCloseTo(63, 9);
});

test('packed by shape the two cups and the post are 63 mm tall (two cups and the spacing), checked against the meshes', () => {
  // Without the lid the post would stand in the upper cup, over its rim: 33 + 2.5 + 3 + 40 = 78.5 mm.
  const inst = cupsAndPost();
  const lidded = createShapePacking(inst, { maxRuns: 2 }).runSync();
  expect(lidded.unplaced).toEqual([]);
  expect(validateShapeLayout(inst, lidded)).toEqual([]);
  expect(lidded.height).toBeCloseTo(63, 6);
});

test('copies of a holder filled together hold what each would hold filled on its own, also where a kind runs out midway', () => {
  // Five cups, blocks for three (as many as one cup holds with the small ones, three times), and 4 small blocks:
  // the small ones go into the first cup with the blocks, so the second holds more blocks, and the blocks run out
  // in the third. A copy that would come out as the one before it is not worked out again;
  // this checks that it is taken only when it would come out the same.
  const small = box(6, 6, 6);
  const plate = (blocks: number, cups = 5) =>
    onSmallPlate('shape', [
      { id: 'cup', mesh: cup, quantity: cups, upright: true },
      { id: 'block', mesh: block, quantity: blocks, upright: true },
      { id: 'small', mesh: small, quantity: 4, upright: true },
    ]);
  const kindsOf = (inst: PackInstanceV2) => {
    const cell = defaultCell(inst);
    return { cell, kinds: shapeParts(inst).map((p) => ({ quantity: p.quantity, profiles: p.rotations.map((r) => columnProfile(p, r, cell, inst.spacing)).sort((a, b) => a.cost - b.cost) })) };
  };
  // How many blocks one cup holds.
  const one = kindsOf(plate(100, 1));
  const perCup = buildNests(one.kinds, one.cell, 3).used[1];
  expect(perCup).toBeGreaterThan(6);
  const inst = plate(3 * perCup);
  const { cell, kinds } = kindsOf(inst);
  const together = buildNests(kinds, cell, inst.spacing);
  // One cup at a time, from the copies the ones before left.
  const left = kinds.map((k) => k.quantity);
  const alone = [];
  while (left[0] > 0) {
    const next = buildNests(kinds.map((k, i) => ({ ...k, quantity: i === 0 ? 1 : left[i] })), cell, inst.spacing);
    if (next.nests.length === 0) break;
    next.used.forEach((n, i) => (left[i] -= n));
    alone.push(next.nests[0]);
  }
  const shape = (n: { members: Array<{ kind: number; du: number; dv: number; dz: number }> }) => n.members.map((m) => [m.kind, m.du, m.dv, m.dz]);
  expect(together.nests.map(shape)).toEqual(alone.map(shape));
  expect(together.used).toEqual(kinds.map((k, i) => k.quantity - left[i]));
  // The supply runs out midway: every block and small block is held, the last cup with blocks holds fewer.
  const blocks = together.nests.map((n) => n.members.filter((m) => m.kind === 1).length);
  expect(blocks.reduce((a, b) => a + b, 0)).toBe(3 * perCup);
  expect(blocks.length).toBeGreaterThanOrEqual(3);
  expect(blocks[blocks.length - 1]).toBeLessThan(Math.max(...blocks));
  expect(together.used[2]).toBe(4);
});

test('when the nests pay, one more set is filled on a finer plan cell: four shallow cups hold eight 14 mm blocks each, as elementary geometry allows', () => {
  // A cup 12 mm tall, inside 75 x 45 mm with 2.5 mm corners; blocks 14 x 14 x 4 mm. Kept 3 mm from the walls and
  // from each other, 4 blocks fit along (4 x 14 + 3 x 3 = 65 of 69 mm) and 2 across (31 of 39 mm): 8 a cup. The
  // column profiles on 1.5 mm cells (what a 300 mm chamber gets; this small plate would get finer ones, so the cell
  // is set) take up to a cell more than a block on each side, and only 6 fit.
  const shallow = housing({ lengthMm: 80, widthMm: 50, heightMm: 12, wallMm: 2.5, floorMm: 2.5, cornerRadiusMm: 5, cornerSegments: 6 });
  const inst = onSmallPlate('shape', [
    { id: 'cup', mesh: shallow, quantity: 4, upright: true },
    { id: 'block', mesh: box(14, 14, 4), quantity: 32, upright: true },
  ]);
  const withFine = createShapePacking(inst, { maxRuns: 1, cellMm: 1.5 }).runSync();
  expect(withFine.unplaced).toEqual([]);
  expect(validateShapeLayout(inst, withFine)).toEqual([]);
  // The four cups stacked, each holding its eight blocks: 4 x 12 mm and 3 spacings.
  expect(withFine.height).toBeCloseTo(4 * 12 + 3 * 3, 6);
  // On the run's cell alone, blocks are left over above the cups.
  const coarse = createShapePacking(inst, { maxRuns: 1, cellMm: 1.5, fineNests: false }).runSync();
  expect(validateShapeLayout(inst, coarse)).toEqual([]);
  expect(coarse.height).toBeGreaterThan(withFine.height + 3);
});
