/**
 * Stacks of one part: round cups wider at the rim than at the foot sink into
 * each other. The pitch found on the meshes is checked against elementary
 * geometry: two coaxial cups whose inside and outside lean by the same angle
 * t from the vertical (tan t = rim radius less foot radius, over the height),
 * wall w across, floor f, the upper one z higher. In a cut through the axis
 * the upper cup's outside and the lower cup's inside are parallel lines z
 * apart vertically, so z sin t apart square to them, less the wall's own
 * thickness square to it, w cos t. They are the spacing g apart when
 * z = (g + w cos t) / sin t; and the upper floor's underside is g over the
 * lower floor's top when z = f + g. The pitch is the larger of the two.
 * (The meshes are 64-sided: their faces lie a little inside the circle, by
 * r (1 - cos(pi / 64)), under 0.04 mm here, on both cups alike.)
 */
import { taperedCup, type TaperedCupParams } from '@/shared/geometry';
import { createShapePacking, generateShapeMix, validateShapeLayout } from '@/shared/packing';
import { columnProfile, defaultCell, shapeParts, summariseShapeLayout } from '@/shared/packing/shape';
import { settleLayout } from '@/shared/packing/shape/settle';
import { stackPitch } from '@/shared/packing/shape/stack';
import { shapeInstance } from './instance';

const G = 3;

function cup(bottomRadiusMm: number, topRadiusMm: number, heightMm: number, wallMm: number, floorMm: number): TaperedCupParams {
  return { bottomRadiusMm, topRadiusMm, heightMm, wallMm, floorMm, segments: 64 };
}

/** The pitch of two such cups by the formulas above. */
function geometricPitch(c: TaperedCupParams, g: number): number {
  const lean = Math.atan((c.topRadiusMm - c.bottomRadiusMm) / c.heightMm);
  return Math.max(c.floorMm + g, (g + c.wallMm * Math.cos(lean)) / Math.sin(lean));
}

function pitchOnMesh(c: TaperedCupParams, halt?: () => boolean): number | null {
  const inst = shapeInstance([{ id: 'cup', mesh: taperedCup(c), quantity: 2, orientations: ['upright'] }], G);
  const [part] = shapeParts(inst);
  const cell = defaultCell(inst);
  // Upright as built: the identity turn. A gain of 1 keeps any pitch under the copy's height plus the spacing.
  return stackPitch(part, columnProfile(part, 0, cell, G), cell, G, 1, halt);
}

describe('stacked copies of a cup (pitch against elementary geometry)', () => {
  test.each([
    ['walls leaning 21.8 degrees: the walls decide', cup(18, 30, 30, 2, 2), 13.078],
    ['a wide bowl leaning 45 degrees: the walls decide', cup(20, 40, 20, 2, 2), 6.243],
    ['a shallow tray with a 4 mm floor: the floors decide', cup(20, 40, 10, 2, 4), 7],
    // The demo library's sorting cup (shared/geometry demoLibrary).
    ['a cup leaning 26.6 degrees, as the demo lab\'s sorting cup: the walls decide', cup(16, 26, 20, 2, 2.5), 10.708],
  ])('%s', (_name, c, expected) => {
    // The formula's value, written out, so a wrong formula cannot pass with a wrong engine.
    expect(geometricPitch(c, G)).toBeCloseTo(expected, 3);
    const pitch = pitchOnMesh(c);
    expect(pitch).not.toBeNull();
    expect(Math.abs(pitch! - expected)).toBeLessThan(0.05);
  });

  // With four sides the same builder makes a square tray (its corners on the axes): flat walls, so the formula
  // holds exactly, with the wall's lean and thickness taken square to a face, not along a corner. A face's distance
  // from the axis is the corner's radius over sqrt 2, so tan t = (top - foot radius) / (sqrt 2 x height), and the
  // wall, w across at a corner, is w / sqrt 2 thick square to the face. Where two faces meet, the upper tray's outer
  // corner and the lower one's inner corner are further apart than the faces (the faces decide).
  test.each([
    ['a square tray leaning 35.3 degrees', cup(20, 40, 20, 3, 2), 8.196],
    ['a deep square tray leaning 10.7 degrees', cup(20, 28, 30, 3, 2), 27.44],
  ])('%s: flat faces, the walls decide', (_name, c, expected) => {
    const sq = { ...c, segments: 4 };
    const lean = Math.atan((c.topRadiusMm - c.bottomRadiusMm) / (Math.SQRT2 * c.heightMm));
    const formula = Math.max(c.floorMm + G, (G + (c.wallMm / Math.SQRT2) * Math.cos(lean)) / Math.sin(lean));
    expect(formula).toBeCloseTo(expected, 3);
    const pitch = pitchOnMesh(sq);
    expect(pitch).not.toBeNull();
    expect(Math.abs(pitch! - formula)).toBeLessThan(0.02);
  });

  test('a look cut short by the time counts for nothing: the pitch stays where nothing was looked at', () => {
    // Finely tessellated walls: a look takes thousands of pairs of leaves, so the halt, asked every 256, trips inside
    // the first look (the search asks it twice before: on the way in and at its first step).
    const c = { ...cup(18, 30, 30, 2, 2), segments: 256 };
    const untouched = pitchOnMesh(c, () => true);
    let asked = 0;
    const cut = pitchOnMesh(c, () => ++asked > 2);
    expect(asked).toBe(3);
    expect(cut).toBe(untouched);
    // Looked at whole, the walls' pitch (13.078 mm above), well under where the search starts.
    const whole = pitchOnMesh(c);
    expect(Math.abs(whole! - 13.078)).toBeLessThan(0.05);
    expect(untouched! - whole!).toBeGreaterThan(1);
  });

  test('six deep square trays on a plate with room for two stand in two stacks of three, though the plan grid sees no tray sink into another', () => {
    const c = { ...cup(20, 28, 30, 3, 2), segments: 4 };
    // 56 mm corner to corner: two side by side on a 120 x 62 mm plate, not three, and not two across.
    const inst = shapeInstance([{ id: 'tray', mesh: taperedCup(c), quantity: 6, orientations: ['upright'] }], G, { chamber: [120, 62, 300] });
    const [part] = shapeParts(inst);
    const cell = defaultCell(inst);
    // On the plan grid alone (no stacks) a tray rests on the one under it where the grid puts it, far higher.
    const p = columnProfile(part, 0, cell, G);
    const onGrid = createShapePacking(inst, { maxRuns: 2, stacks: false }).runSync();
    expect(validateShapeLayout(inst, onGrid)).toEqual([]);
    expect(onGrid.height).toBeGreaterThan(p.extent[2] + 2 * (p.extent[2] + G) * 0.85);
    const stacked = createShapePacking(inst, { maxRuns: 2 }).runSync();
    expect(validateShapeLayout(inst, stacked)).toEqual([]);
    expect(stacked.placements).toHaveLength(6);
    // The formula's pitch (27.44 mm, above): 30 + 2 x 27.44 = 84.88 mm.
    expect(stacked.height).toBeGreaterThan(30 + 2 * 27.44 - 0.05);
    expect(stacked.height).toBeLessThan(30 + 2 * 27.44 + 0.1);
  });

  test('deep bins of two shapes and cups kept upright: stacks of three stand side by side, the build one hexagonal bin stack tall', () => {
    // 20 square bins (above: pitch 27.44 mm), 16 hexagonal bins 35 mm tall and 12 cups on a 234 mm plate. The
    // plate's room reckoned for the stacks alone says stacks of four square bins (112.4 mm); as boxes of three
    // (84.9 mm) beside hexagonal ones of three (35 + 2 x 26.39 = 87.8 mm, the hexagon's faces leaning 11.2 degrees:
    // tan t = 8 cos 30 / 35, the wall 2.5 cos 30 thick square to a face) and two tall stacks of cups they fit in
    // one tier, 5 mm over the floor margin.
    const bins: Array<[string, TaperedCupParams, number]> = [
      ['bin-sq', { ...cup(20, 28, 30, 3, 2), segments: 4 }, 20],
      ['bin-hex', { ...cup(22, 30, 35, 2.5, 2.5), segments: 6 }, 16],
      ['cup', cup(16, 26, 20, 2, 2.5), 12],
    ];
    const hex = bins[1][1];
    const lean = Math.atan(((hex.topRadiusMm - hex.bottomRadiusMm) * Math.cos(Math.PI / 6)) / hex.heightMm);
    const hexPitch = (G + hex.wallMm * Math.cos(Math.PI / 6) * Math.cos(lean)) / Math.sin(lean);
    expect(hexPitch).toBeCloseTo(26.387, 3);
    const inst = shapeInstance(
      bins.map(([id, c, quantity]) => ({ id, mesh: taperedCup(c), quantity, orientations: ['upright'] })),
      G,
      { chamber: [250, 250, 300], margin: { xy: 8, bottom: 5, top: 5 } },
    );
    const result = createShapePacking(inst, { maxRuns: 2 }).runSync();
    expect(validateShapeLayout(inst, result)).toEqual([]);
    expect(result.placements).toHaveLength(48);
    expect(result.height).toBeGreaterThan(5 + 35 + 2 * hexPitch - 0.05);
    expect(result.height).toBeLessThan(5 + 35 + 2 * hexPitch + 0.1);
  });

  test('a cup whose walls barely lean gains too little to stack (the pitch is over 0.85 of its height plus the spacing)', () => {
    const c = cup(25, 30, 40, 2, 3);
    // 40.19 mm of 43: 0.93.
    expect(geometricPitch(c, G) / (c.heightMm + G)).toBeGreaterThan(0.85);
    const inst = shapeInstance([{ id: 'cup', mesh: taperedCup(c), quantity: 2, orientations: ['upright'] }], G);
    const [part] = shapeParts(inst);
    expect(stackPitch(part, columnProfile(part, 0, defaultCell(inst), G), defaultCell(inst), G)).toBeNull();
  });

  test('27 cups on a plate with room for 9 side by side pack as 9 stacks of 3: the build is one cup and two pitches tall', () => {
    const c = cup(18, 30, 30, 2, 2);
    const inst = shapeInstance([{ id: 'cup', mesh: taperedCup(c), quantity: 27 }], G);
    // 200 mm plate, 60 mm cups 3 mm apart: 3 x 3 places.
    const stacked = createShapePacking(inst, { maxRuns: 2 }).runSync();
    expect(validateShapeLayout(inst, stacked)).toEqual([]);
    expect(stacked.placements).toHaveLength(27);
    const pitch = geometricPitch(c, G);
    expect(stacked.height).toBeGreaterThan(c.heightMm + 2 * pitch - 0.05);
    expect(stacked.height).toBeLessThan(c.heightMm + 2 * pitch + 0.1);
    // Without stacks each cup rests where the plan grid lets it, higher up.
    const apart = createShapePacking(inst, { maxRuns: 2, stacks: false }).runSync();
    expect(validateShapeLayout(inst, apart)).toEqual([]);
    expect(apart.height).toBeGreaterThan(stacked.height + 10);
  });

  test("the benchmark's mixes with cups added keep the rest of the mix as it was", () => {
    const plain = generateShapeMix({ parts: 50, seed: 4 });
    const withCups = generateShapeMix({ parts: 50, seed: 4, cups: 5 });
    const summary = (parts: typeof plain.parts) => parts.map((p) => `${p.id} ${p.quantity} ${p.size?.map((v) => v.toFixed(6)).join(' ')}`);
    expect(summary(withCups.parts.slice(0, plain.parts.length))).toEqual(summary(plain.parts));
    expect(withCups.parts.slice(plain.parts.length).map((p) => [p.id, p.quantity])).toEqual([
      ['cup-1', 5],
      ['cup-2', 5],
      ['cup-3', 5],
    ]);
  });

  test('a stack whose lowest cup sinks settles with it, its pitch kept (the settling grid alone would open it up)', () => {
    const c = cup(18, 30, 30, 2, 2);
    const inst = shapeInstance([{ id: 'cup', mesh: taperedCup(c), quantity: 3, orientations: ['upright'] }], G);
    const parts = shapeParts(inst);
    const pitch = pitchOnMesh(c)!;
    // A stack of three 20 mm over the floor (nothing under it): the whole stack comes down to the floor.
    const stack = [0, 1, 2].map((i) => ({ part: 0, rotation: 0, position: [50, 50, 20 + i * pitch] as [number, number, number] }));
    const together = settleLayout(inst, parts, stack.map((it) => ({ ...it, group: 7 })));
    expect(together.map((it) => it.position[2])).toEqual([0, pitch, 2 * pitch].map((z) => expect.closeTo(z, 5)));
    const result = summariseShapeLayout(inst, together.map((it) => ({ id: 'cup', rotation: it.rotation, position: it.position })));
    expect(validateShapeLayout(inst, result)).toEqual([]);
    // One by one, the upper cups stop where the settling's grid puts them over the one below, higher up.
    const apart = settleLayout(inst, parts, stack);
    expect(apart[0].position[2]).toBeCloseTo(0, 5);
    expect(apart[2].position[2]).toBeGreaterThan(2 * pitch + 2);
  });

  test('a stack set on another straight over it closes up into one at the pitch: the junction is a pitch, not the grid\'s', () => {
    const c = cup(18, 30, 30, 2, 2);
    const inst = shapeInstance([{ id: 'cup', mesh: taperedCup(c), quantity: 6, orientations: ['upright'] }], G);
    const parts = shapeParts(inst);
    const pitch = pitchOnMesh(c)!;
    // Two stacks of three as their boxes stand one on the other (the upper's box the spacing over the lower's).
    const lowerTop = 30 + 2 * pitch;
    const stacks = [0, 1, 2, 3, 4, 5].map((i) => ({
      part: 0,
      rotation: 0,
      position: [50, 50, i < 3 ? i * pitch : lowerTop + G + (i - 3) * pitch] as [number, number, number],
      group: i < 3 ? 1 : 2,
    }));
    const closed = settleLayout(inst, parts, stacks.map((it) => ({ ...it, pitch })));
    expect(closed.map((it) => it.position[2])).toEqual([0, 1, 2, 3, 4, 5].map((i) => expect.closeTo(i * pitch, 5)));
    const result = summariseShapeLayout(inst, closed.map((it) => ({ id: 'cup', rotation: it.rotation, position: it.position })));
    expect(validateShapeLayout(inst, result)).toEqual([]);
    // Without the pitch the upper stack's first cup rests where the settling's grid puts it over the lower's top.
    const apart = settleLayout(inst, parts, stacks);
    expect(apart[3].position[2]).toBeGreaterThan(3 * pitch + 2);
  });
});
