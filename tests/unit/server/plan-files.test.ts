/**
 * A plan's build file and the build sheet's views, as a mesh worker makes them
 * from the parts' stored files (server/mesh/planFiles.ts), directly and through
 * the worker pool.
 */
import { MeshPool } from '../../../server/mesh';
import { MeshWorkFailed } from '../../../server/mesh/pool';
import { planFilesError } from '../../../server/services/export3mf';
import type { AppError } from '../../../server/errors';
import { UnreadablePartFile, buildFile, sheetViews, type PlanMeshFile, type PlanMeshItem } from '../../../server/mesh/planFiles';
import { PNG } from 'pngjs';
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

const PALETTE: Array<[number, number, number]> = [[10, 20, 30], [40, 50, 60], [70, 80, 90]];
const PAPER: [number, number, number] = [255, 255, 255];
const TOP = { axes: [0, 1] as [number, number], depthAxis: 2, nearer: 1 as const, cellMm: 1 };
const FRONT = { axes: [0, 2] as [number, number], depthAxis: 1, nearer: -1 as const, cellMm: 1 };

/** A view's picture decoded (PNG, ISO/IEC 15948, by pngjs): its size, the cells not paper, and the rows (from the floor) they are in. */
function covered(view: { png: Uint8Array; width: number; height: number }) {
  const png = PNG.sync.read(Buffer.from(view.png));
  let cells = 0;
  const rows = new Set<number>();
  const colours = new Set<string>();
  for (let r = 0; r < png.height; r++) {
    for (let i = 0; i < png.width; i++) {
      const k = 4 * (r * png.width + i);
      const rgb = [png.data[k], png.data[k + 1], png.data[k + 2]];
      if (rgb.every((c, a) => c === PAPER[a])) continue;
      cells++;
      rows.add(png.height - 1 - r);
      colours.add(rgb.join(','));
    }
  }
  return { width: png.width, height: png.height, cells, rows, colours };
}

describe("a plan's views for the build sheet", () => {
  test('the top view at 1 mm cells covers each block\'s footprint, 30 x 20 cells each (a rectangle\'s area, counted by cell centres)', () => {
    const drawn = sheetViews({ files: [block], items, chamber: [100, 100, 60], views: [TOP], palette: PALETTE, background: PAPER, triangleLimit: 1000 });
    if ('reason' in drawn) throw new Error(drawn.reason);
    const { width, height, cells, rows, colours } = covered(drawn.views[0]);
    expect([width, height]).toEqual([100, 100]);
    expect(cells).toBe(2 * 30 * 20);
    // Rows 10..39: the turned block reaches y = 40, the other y = 30.
    expect(Math.min(...rows)).toBe(10);
    expect(Math.max(...rows)).toBe(39);
    // Both tops are at the same height: one shade.
    expect(colours.size).toBe(1);
  });

  test('the front view sees the blocks 10 mm tall, from z = 5', () => {
    const drawn = sheetViews({ files: [block], items, chamber: [100, 100, 60], views: [FRONT], palette: PALETTE, background: PAPER, triangleLimit: 1000 });
    if ('reason' in drawn) throw new Error(drawn.reason);
    const { cells, rows } = covered(drawn.views[0]);
    expect(cells).toBe((30 + 20) * 10);
    // Seen from the front, both blocks' front faces are at y = 10: one depth, one shade.
    expect([...rows].sort((a, b) => a - b)).toEqual([5, 6, 7, 8, 9, 10, 11, 12, 13, 14]);
    expect(covered(drawn.views[0]).colours.size).toBe(1);
  });

  test('more placed triangles than the limit: no views, and the reason counts them', () => {
    const drawn = sheetViews({ files: [block], items, chamber: [100, 100, 60], views: [TOP], palette: PALETTE, background: PAPER, triangleLimit: 20 });
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
      const drawn = await pool.sheetViews({ files: [block], items, chamber: [100, 100, 60], views: [TOP], palette: PALETTE, background: PAPER, triangleLimit: 1000 });
      if ('reason' in drawn) throw new Error(drawn.reason);
      expect(covered(drawn.views[0]).cells).toBe(1200);
    } finally {
      await pool.close();
    }
  });

  test('a worker out of time: the export answers 503 saying so, and the sheet falls back to boxes (MeshWorkFailed)', async () => {
    // 50 ms is less than a thread takes to start and load the sources, so the first job runs out of time.
    const pool = new MeshPool({ size: 1, quickBytes: 0, timeoutMs: 50 });
    try {
      const failed = await pool.buildFile({ files: [block], items }).then(
        () => null,
        (e: unknown) => e,
      );
      expect(failed).toBeInstanceOf(MeshWorkFailed);
      expect((failed as Error).message).toBe('Making the build file took longer than 50 ms and was stopped.');
      const answer = planFilesError(failed, 'the build cannot be exported') as AppError;
      expect(answer.status).toBe(503);
      expect(answer.code).toBe('mesh_work_failed');
      const unreadable = planFilesError(new UnreadablePartFile('Gear', 'gear.stl'), 'the build cannot be exported') as AppError;
      expect([unreadable.status, unreadable.message]).toEqual([409, 'The stored file of "Gear" (gear.stl) cannot be read as a mesh, so the build cannot be exported.']);
    } finally {
      await pool.close();
    }
  });
});
