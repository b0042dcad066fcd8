// The parts' projections the build sheet draws, against elementary geometry: the area a solid covers seen along an
// axis (a disc's pi r^2, a square frame's outer square less its hole, a rectangle from the side), its nearest
// depth, and the hole of a frame left empty. A cell counts when its centre is covered, so a projected outline of
// length L can gain or lose at most about L x (cell / 2) x sqrt(2) of area (the half-diagonal band along it).
import { prismWithHoles, translation } from '../../../shared/geometry';
import { projectionGrid, projectMesh, shadeImage } from '../../../shared/geometry/projection';
import { cylinder } from './solids';

const covered = (g: ReturnType<typeof projectionGrid>) => g.depth.reduce((n, z) => n + (z === -Infinity ? 0 : 1), 0);

describe('projecting placed meshes onto the sheet views', () => {
  test('a cylinder seen from above covers a disc of pi r^2 and is nearest at its top face', () => {
    const r = 20;
    const cell = 0.5;
    const g = projectionGrid([0, 1], 2, [120, 120], cell);
    // A 256-sided polygon: its area is (n / 2) r^2 sin(2 pi / n), within 0.01 % of the circle's.
    const n = 256;
    projectMesh(g, cylinder(r, 10, n).positions, cylinder(r, 10, n).indices, translation(50, 60, 5));
    const polygon = (n / 2) * r * r * Math.sin((2 * Math.PI) / n);
    const band = 2 * Math.PI * r * (cell / 2) * Math.SQRT2;
    expect(Math.abs(covered(g) * cell * cell - polygon)).toBeLessThan(band);
    // Within 0.1 % in fact: the outline's gains and losses cancel.
    expect(Math.abs(covered(g) * cell * cell - Math.PI * r * r) / (Math.PI * r * r)).toBeLessThan(0.002);
    const centre = Math.floor(50 / cell) + g.na * Math.floor(60 / cell);
    expect(g.depth[centre]).toBeCloseTo(15, 5);
  });

  test('a square frame shows its hole from above and a full rectangle from the side', () => {
    const cell = 0.5;
    const frame = prismWithHoles([[0, 0], [60, 0], [60, 60], [0, 60]], [[[15, 15], [15, 45], [45, 45], [45, 15]]], 0, 20);
    const at = translation(30, 40, 5);
    const top = projectionGrid([0, 1], 2, [200, 200], cell);
    projectMesh(top, frame.positions, frame.indices, at);
    // Its outlines lie on cell edges, so the count is exact: 60^2 - 30^2 = 2,700 mm^2.
    expect(covered(top) * cell * cell).toBeCloseTo(2700, 6);
    expect(top.depth[Math.floor(60 / cell) + top.na * Math.floor(70 / cell)]).toBe(-Infinity);
    expect(top.depth[Math.floor(32 / cell) + top.na * Math.floor(42 / cell)]).toBeCloseTo(25, 5);
    // Seen from the front (x across, z up, the viewer at y = 0): a 60 x 20 mm rectangle, nearest at the frame's
    // front face y = 40 (depths signed: -40); seen from the back, at y = 100.
    const front = projectionGrid([0, 2], 1, [200, 200], cell, -1);
    projectMesh(front, frame.positions, frame.indices, at);
    expect(covered(front) * cell * cell).toBeCloseTo(1200, 6);
    expect(front.depth[Math.floor(35 / cell) + front.na * Math.floor(10 / cell)]).toBeCloseTo(-40, 5);
    const back = projectionGrid([0, 2], 1, [200, 200], cell, 1);
    projectMesh(back, frame.positions, frame.indices, at);
    expect(back.depth[Math.floor(35 / cell) + back.na * Math.floor(10 / cell)]).toBeCloseTo(100, 5);
  });

  test('the picture shades each covered cell by its depth, far to near, and leaves the rest as background, top row first', () => {
    const cell = 1;
    const g = projectionGrid([0, 1], 2, [100, 40], cell);
    const block = prismWithHoles([[0, 0], [20, 0], [20, 20], [0, 20]], [], 0, 10);
    projectMesh(g, block.positions, block.indices, translation(10, 10, 0));
    projectMesh(g, block.positions, block.indices, translation(60, 10, 30));
    const palette = [[1, 1, 1], [2, 2, 2], [3, 3, 3], [4, 4, 4]] as const;
    const rgb = shadeImage(g, palette, [255, 255, 255]);
    expect(rgb).toHaveLength(3 * 100 * 40);
    const at = (i: number, j: number) => rgb[3 * ((g.nb - 1 - j) * g.na + i)];
    const counts = new Map<number, number>();
    for (let k = 0; k < rgb.length; k += 3) counts.set(rgb[k], (counts.get(rgb[k]) ?? 0) + 1);
    // The lower block's top (z = 10) is the farthest covered depth, the upper one's (z = 40) the nearest.
    expect(counts).toEqual(new Map([[255, 4000 - 800], [1, 400], [4, 400]]));
    expect(at(15, 15)).toBe(1);
    expect(at(65, 15)).toBe(4);
    expect(at(15, 35)).toBe(255);
    // Row j = 10 is the blocks' first: 29 rows from the picture's top.
    expect(rgb[3 * (29 * 100 + 15)]).toBe(1);
    expect(rgb[3 * (30 * 100 + 15)]).toBe(255);
  });

  test('parts whose tops all lie at one height are drawn in the nearest shade, not the farthest', () => {
    const g = projectionGrid([0, 1], 2, [100, 40], 1);
    const plate = prismWithHoles([[0, 0], [20, 0], [20, 20], [0, 20]], [], 0, 4);
    projectMesh(g, plate.positions, plate.indices, translation(10, 10, 0));
    projectMesh(g, plate.positions, plate.indices, translation(60, 10, 0));
    const rgb = shadeImage(g, [[1, 1, 1], [2, 2, 2], [3, 3, 3]], [255, 255, 255]);
    const counts = new Map<number, number>();
    for (let k = 0; k < rgb.length; k += 3) counts.set(rgb[k], (counts.get(rgb[k]) ?? 0) + 1);
    expect(counts).toEqual(new Map([[255, 4000 - 800], [3, 800]]));
  });
});
