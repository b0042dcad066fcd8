/**
 * A plan's build file and the build sheet's views, as a mesh worker makes them
 * from the parts' stored files (server/mesh/planFiles.ts), directly and through
 * the worker pool.
 */
import { MeshPool } from '../../../server/mesh';
import { UnreadablePartFile, buildFile, sheetViews, type PlanMeshFile, type PlanMeshItem } from '../../../server/mesh/planFiles';
import { measureMesh, parse3mf, prism, read3mfModel, writeBinaryStl } from '../../../shared/geometry';

jest.setTimeout(60_000);

/** A 30 x 20 x 10 mm block, as a stored binary STL. */
const block: PlanMeshFile = {
  name: 'Block',
  bytes: writeBinaryStl(prism([[0, 0], [30, 0], [30, 20], [0, 20]], 0, 10)),
  filename: 'block.stl',
  unit: 'mm',
  split: false,
  partIndex: 0,
  rotationDeg: [0, 0, 0],
};
const items: PlanMeshItem[] = [
  { file: 0, orientation: 'xyz', position: [10, 10, 5] },
  // Turned a quarter about z (box 20 x 30 x 10) beside the first.
  { file: 0, orientation: 'yxz', position: [50, 10, 5] },
];

/** The cells a view's runs cover, and the runs' rows. */
function covered(runs: Int32Array): { cells: number; rows: Set<number> } {
  let cells = 0;
  const rows = new Set<number>();
  for (let k = 0; k < runs.length; k += 4) {
    cells += runs[k + 2];
    rows.add(runs[k]);
  }
  return { cells, rows };
}

describe("a plan's views for the build sheet", () => {
  test('the top view at 1 mm cells covers each block\'s footprint, 30 x 20 cells each (a rectangle\'s area, counted by cell centres)', () => {
    const drawn = sheetViews({ files: [block], items, chamber: [100, 100, 60], views: [{ axes: [0, 1], depthAxis: 2, nearer: 1, cellMm: 1 }], levels: 8, triangleLimit: 1000 });
    if ('reason' in drawn) throw new Error(drawn.reason);
    const { cells, rows } = covered(drawn.views[0]);
    expect(cells).toBe(2 * 30 * 20);
    // Rows 10..39: the turned block reaches y = 40, the other y = 30.
    expect(Math.min(...rows)).toBe(10);
    expect(Math.max(...rows)).toBe(39);
    // Both tops are at the same height: one shade.
    const levels = new Set<number>();
    for (let k = 3; k < drawn.views[0].length; k += 4) levels.add(drawn.views[0][k]);
    expect(levels.size).toBe(1);
  });

  test('the front view sees the blocks 10 mm tall, from z = 5', () => {
    const drawn = sheetViews({ files: [block], items, chamber: [100, 100, 60], views: [{ axes: [0, 2], depthAxis: 1, nearer: -1, cellMm: 1 }], levels: 8, triangleLimit: 1000 });
    if ('reason' in drawn) throw new Error(drawn.reason);
    const { cells, rows } = covered(drawn.views[0]);
    expect(cells).toBe((30 + 20) * 10);
    expect([...rows].sort((a, b) => a - b)).toEqual([5, 6, 7, 8, 9, 10, 11, 12, 13, 14]);
  });

  test('more placed triangles than the limit: no views, and the reason counts them', () => {
    const drawn = sheetViews({ files: [block], items, chamber: [100, 100, 60], views: [{ axes: [0, 1], depthAxis: 2, nearer: 1, cellMm: 1 }], levels: 8, triangleLimit: 20 });
    expect(drawn).toEqual({ reason: expect.stringContaining('The placed parts have 24 triangles, more than the 20 a sheet draws') });
  });

  test('a stored file that holds no mesh names the part and its file', () => {
    const broken = { ...block, name: 'Gear', filename: 'gear.stl', bytes: new TextEncoder().encode('not a mesh at all') };
    expect(() => buildFile({ files: [broken], items })).toThrow(new UnreadablePartFile('Gear', 'gear.stl'));
    expect(() => buildFile({ files: [broken], items })).toThrow('The stored file of "Gear" (gear.stl) cannot be read as a mesh');
  });
});

describe("a plan's build file", () => {
  test('holds the mesh once and one numbered item per placement, each at its box corner (3MF core: build items with transforms)', () => {
    const bytes = buildFile({ files: [block], items });
    const model = read3mfModel(bytes, { filename: 'plan.3mf' });
    if (!model.ok) throw new Error(JSON.stringify(model.problems));
    expect(model.model.objects.size).toBe(1);
    expect(model.model.items.map((i) => i.name)).toEqual(['1', '2']);
    const parsed = parse3mf(bytes, { filename: 'plan.3mf', splitObjects: true });
    if (!parsed.ok) throw new Error(JSON.stringify(parsed.problems));
    const boxes = parsed.parts.map((part) => {
      const m = measureMesh(part);
      return { min: m.bboxMinMm, max: m.bboxMinMm.map((v, a) => v + m.sizeMm[a]) };
    });
    expect(boxes[0].min).toEqual([10, 10, 5]);
    expect(boxes[0].max).toEqual([40, 30, 15]);
    expect(boxes[1].min).toEqual([50, 10, 5]);
    expect(boxes[1].max).toEqual([70, 40, 15]);
  });

  test('through the worker pool: the package back, and an unreadable file as UnreadablePartFile', async () => {
    const pool = new MeshPool({ size: 1, quickBytes: 0 });
    try {
      const bytes = await pool.buildFile({ files: [block], items });
      const model = read3mfModel(bytes, { filename: 'plan.3mf' });
      expect(model.ok && model.model.items.length).toBe(2);
      const broken = { ...block, name: 'Gear', filename: 'gear.stl', bytes: new TextEncoder().encode('not a mesh at all') };
      await expect(pool.buildFile({ files: [broken], items })).rejects.toBeInstanceOf(UnreadablePartFile);
      const drawn = await pool.sheetViews({ files: [block], items, chamber: [100, 100, 60], views: [{ axes: [0, 1], depthAxis: 2, nearer: 1, cellMm: 1 }], levels: 8, triangleLimit: 1000 });
      if ('reason' in drawn) throw new Error(drawn.reason);
      expect(covered(drawn.views[0]).cells).toBe(1200);
    } finally {
      await pool.close();
    }
  });
});
