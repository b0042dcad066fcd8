import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { MeshPool } from '../../../server/mesh';
import { demoLibrary, writeBinaryStl, write3mf, translation } from '../../../shared/geometry';

jest.setTimeout(60_000);

let dir: string;
let pool: MeshPool;

beforeAll(() => {
  dir = mkdtempSync(path.join(tmpdir(), 'measure-file-'));
  pool = new MeshPool({ size: 2, timeoutMs: 30_000 });
});

afterAll(async () => {
  await pool.close();
  rmSync(dir, { recursive: true, force: true });
});

test('an uploaded file on disk is measured in a worker thread', async () => {
  const gear = demoLibrary().find((p) => p.kind === 'gear')!;
  const file = path.join(dir, 'upload-1');
  writeFileSync(file, writeBinaryStl(gear.mesh));
  const result = await pool.measure(file, { filename: 'drive gear.stl', unit: 'mm' });
  if (!result.ok) throw new Error(result.problems[0].message);
  expect(result.format).toBe('stl');
  expect(result.parts[0].name).toBe('drive gear');
  expect(result.parts[0].metrics.watertight).toBe(true);
  expect(result.parts[0].metrics.volumeMm3).toBeGreaterThan(0);
});

test('bytes in memory are measured too, and a 3MF gives one part per build item', async () => {
  const [a, b] = demoLibrary();
  const bytes = write3mf([{ name: 'A', ...a.mesh }, { name: 'B', ...b.mesh }], [{ objectIndex: 0, transform: translation(0, 0, 0) }, { objectIndex: 1, transform: translation(80, 0, 0) }]);
  const result = await pool.measure(bytes, { filename: 'set.3mf' });
  expect(result.ok && result.parts.map((p) => p.name)).toEqual(['A', 'B']);
});

test('a bad file comes back as its problem, not as an error', async () => {
  const file = path.join(dir, 'upload-2');
  writeFileSync(file, new Uint8Array(0));
  const result = await pool.measure(file, { filename: 'nothing.stl' });
  expect(result.ok).toBe(false);
  expect(!result.ok && result.problems[0].code).toBe('empty-file');
});

test('several files measured at once all get their own answer', async () => {
  const library = demoLibrary();
  const results = await Promise.all(library.map((p, i) => pool.measure(writeBinaryStl(p.mesh), { filename: `part-${i}.stl` })));
  expect(results.map((r) => r.ok && r.parts[0].name)).toEqual(library.map((_, i) => `part-${i}`));
});

test('a file that cannot be read rejects with the file name', async () => {
  await expect(pool.measure(path.join(dir, 'missing'), { filename: 'gone.stl' })).rejects.toThrow('gone.stl');
});

test('a file that takes longer than the time limit is answered with a problem, and the next file still gets an answer', async () => {
  const slow = new MeshPool({ size: 1, timeoutMs: 1 });
  try {
    const bytes = writeBinaryStl(demoLibrary()[6].mesh);
    const result = await slow.measure(bytes, { filename: 'slow.stl' });
    expect(!result.ok && result.problems[0].code).toBe('measure-timeout');
    expect(!result.ok && result.problems[0].message).toContain('"slow.stl"');
    // the stopped worker was replaced: the next job is answered instead of waiting forever
    const next = await slow.measure(bytes, { filename: 'next.stl' });
    expect(!next.ok && next.problems[0].message).toContain('"next.stl"');
  } finally {
    await slow.close();
  }
});
