import { prism } from '../../../shared/geometry/generate';
import { coverage, renderThumbnail } from '../../../shared/geometry/thumbnail';
import { uvSphere } from './solids';

const SIZE = 96;
const MARGIN = 4;

describe('part thumbnails', () => {
  test("a cube seen along its space diagonal covers a regular hexagon of area √3·a² (orthogonal projection of a cube, a standard result of solid geometry)", () => {
    const a = 10;
    const cube = prism([[0, 0], [a, 0], [a, a], [0, a]], 0, a);
    const t = renderThumbnail(cube, SIZE, MARGIN);
    // The hexagon's height on the picture is 4a/√6 (the longer extent), fitted to SIZE - 2·MARGIN pixels.
    const scale = (SIZE - 2 * MARGIN) / ((4 * a) / Math.sqrt(6));
    const expectedPx = Math.sqrt(3) * a * a * scale * scale;
    expect(coverage(t) * SIZE * SIZE).toBeGreaterThan(expectedPx * 0.97);
    expect(coverage(t) * SIZE * SIZE).toBeLessThan(expectedPx * 1.03);
  });

  test('a cube shows its three visible sides in three different shades, on a transparent background', () => {
    const cube = prism([[0, 0], [10, 0], [10, 10], [0, 10]], 0, 10);
    const t = renderThumbnail(cube, SIZE, MARGIN);
    const shades = new Set<string>();
    for (let i = 0; i < SIZE * SIZE; i++) if (t.rgba[4 * i + 3] === 255) shades.add(`${t.rgba[4 * i]},${t.rgba[4 * i + 1]},${t.rgba[4 * i + 2]}`);
    expect(shades.size).toBe(3);
    expect(t.rgba[3]).toBe(0);
  });

  test('a sphere covers a disc of area πr² from any side (to the faceting of the mesh)', () => {
    const r = 20;
    const t = renderThumbnail(uvSphere(r, 64, 32), SIZE, MARGIN);
    const scale = (SIZE - 2 * MARGIN) / (2 * r);
    const expectedPx = Math.PI * r * r * scale * scale;
    expect(coverage(t) * SIZE * SIZE).toBeGreaterThan(expectedPx * 0.96);
    expect(coverage(t) * SIZE * SIZE).toBeLessThan(expectedPx * 1.03);
  });

  test('an empty mesh gives an empty picture, not an error', () => {
    expect(coverage(renderThumbnail({ positions: new Float64Array(0), indices: new Uint32Array(0) }))).toBe(0);
  });
});
