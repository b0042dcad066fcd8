import { prism, writeBinaryStl } from '@/shared/geometry';
import { createLayoutProfiler } from '@/workers/layoutProfile';
import type { LayoutProfileJob, LayoutProfilePart } from '@/workers/mesh.protocol';

// The editor's estimate of a layout not kept yet: the worker downloads each part's file once, slices the placed
// meshes at every layer's middle and sums them, as the server does for a layout it keeps.

const N = 48;
const R = 10;
const H = 20;
/** A regular 48-gon of circumradius 10 mm, counter-clockwise, extruded 20 mm: a faceted cylinder. */
const column = writeBinaryStl(
  prism(
    Array.from({ length: N }, (_, i) => [R * Math.cos((2 * Math.PI * i) / N), R * Math.sin((2 * Math.PI * i) / N)] as [number, number]),
    0,
    H,
  ),
  'column',
);
// Area of a regular n-gon of circumradius r: n r^2 sin(2 pi / n) / 2 (the regular polygon formula of any geometry handbook).
// STL keeps 32-bit floats, so the mesh's areas match it to about 1e-6 relative: compared to 3 decimals below.
const COLUMN_AREA = (N * R * R * Math.sin((2 * Math.PI) / N)) / 2;

const part = (over: Partial<LayoutProfilePart>): LayoutProfilePart => ({
  key: 'column|all|0,0,0',
  url: '/api/labs/l/parts/column/file',
  filename: 'column.stl',
  unit: 'mm',
  split: false,
  partIndex: 0,
  rotationDeg: [0, 0, 0],
  watertight: true,
  ...over,
});

/** Two columns side by side, and above them a 30 x 10 x 5 mm part that is not a closed mesh (it counts as its box). */
function job(layers = 300): LayoutProfileJob {
  const size = [2 * R, 2 * R * Math.cos(Math.PI / N), H];
  return {
    parts: [part({}), part({ key: 'open|all|0,0,0', url: null, filename: 'open.stl', watertight: false })],
    placements: [
      { part: 0, orientation: 'xyz', position: [0, 0, 0], size },
      { part: 0, orientation: 'xyz', position: [25, 0, 0], size },
      { part: 1, orientation: 'xyz', position: [0, 0, 25], size: [30, 10, 5] },
    ],
    layerHeightMm: 0.1,
    layers,
  };
}

describe('the mesh worker slicing a layout on screen', () => {
  test("each layer sums the placed parts' sections: two 48-gon columns by the polygon formula, the open part by its box", async () => {
    const fetched: string[] = [];
    const profile = createLayoutProfiler(async (url) => {
      fetched.push(url);
      return column;
    });
    const out = await profile(job());
    if (!out.ok) throw new Error(out.message);
    expect(out.areaProfile).toHaveLength(300);
    expect(out.meshPlacements).toBe(2);
    expect(out.boxPlacements).toBe(1);
    expect(out.boxReasons).toEqual([{ part: 1, reason: expect.stringContaining('not a closed, consistently oriented mesh') }]);
    // Layer k's middle is at (k + 0.5) x 0.1 mm: the columns from 0 to 20 mm, the box from 25 to 30 mm.
    for (const k of [0, 1, 100, 199]) expect(out.areaProfile[k]).toBeCloseTo(2 * COLUMN_AREA, 3);
    for (const k of [200, 249, 299]) expect(out.areaProfile[k]).toBeCloseTo(k >= 250 ? 300 : 0, 6);
    // Contour: two 48-gons of side 2 r sin(pi / n), and the box's 80 mm.
    expect(out.contourProfile[50]).toBeCloseTo(2 * N * 2 * R * Math.sin(Math.PI / N), 3);
    expect(out.contourProfile[260]).toBeCloseTo(80, 6);
    // One download for the file both columns use; none for the part counted as its box.
    expect(fetched).toEqual(['/api/labs/l/parts/column/file']);
  });

  test('a layout moved and sliced again reads no file again', async () => {
    let downloads = 0;
    const profile = createLayoutProfiler(async () => {
      downloads++;
      return column;
    });
    await profile(job());
    const moved = job();
    moved.placements[1] = { ...moved.placements[1], position: [25, 0, 2] };
    const out = await profile(moved);
    if (!out.ok) throw new Error(out.message);
    expect(downloads).toBe(1);
    // Layers 0 to 19 hold one column only, layers 200 to 219 the raised one only.
    expect(out.areaProfile[10]).toBeCloseTo(COLUMN_AREA, 3);
    expect(out.areaProfile[210]).toBeCloseTo(COLUMN_AREA, 3);
  });

  test('a file that cannot be downloaded counts as its box, with the reason', async () => {
    const profile = createLayoutProfiler(async () => null);
    const out = await profile(job());
    if (!out.ok) throw new Error(out.message);
    expect(out.meshPlacements).toBe(0);
    expect(out.boxReasons).toContainEqual({ part: 0, reason: expect.stringContaining('could not be read') });
    // Counted by its box: the full 20 x 19.96 mm footprint.
    expect(out.areaProfile[10]).toBeCloseTo(2 * 2 * R * 2 * R * Math.cos(Math.PI / N), 3);
  });

  test('a job naming a part it does not list is refused, not sliced', async () => {
    const profile = createLayoutProfiler(async () => column);
    const bad = job();
    bad.placements[0] = { ...bad.placements[0], part: 5 };
    await expect(profile(bad)).resolves.toEqual({ ok: false, message: 'placements[0].part must name one of the parts' });
    await expect(profile({ ...job(), layerHeightMm: 0 })).resolves.toEqual({ ok: false, message: 'layerHeightMm must be a positive number' });
  });
});
