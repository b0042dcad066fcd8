import { mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { MeshPool } from '../../../server/mesh';
import { demoLibrary, writeBinaryStl, write3mf, translation, torus } from '../../../shared/geometry';

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

describe('two lanes: small files are never queued behind a large one', () => {
  test('a small file sent while a large one is being measured comes back first', async () => {
    const lanes = new MeshPool({ size: 1, timeoutMs: 60_000, quickBytes: 64 * 1024 });
    try {
      // about 10 MB of STL: it takes the only bulk thread for a while
      const large = writeBinaryStl(torus(60, 20, 500, 200), 'housing');
      const small = writeBinaryStl(demoLibrary()[0].mesh, 'clip');
      expect(small.byteLength).toBeLessThan(64 * 1024);
      await lanes.measure(small, { filename: 'warm.stl' }); // both lanes started
      const finished: string[] = [];
      const big = lanes.measure(large, { filename: 'housing.stl' }).then((r) => {
        finished.push('housing');
        return r;
      });
      await new Promise((r) => setTimeout(r, 20));
      const little = lanes.measure(small, { filename: 'clip.stl' }).then((r) => {
        finished.push('clip');
        return r;
      });
      const [a, b] = await Promise.all([big, little]);
      expect(a.ok && b.ok).toBe(true);
      expect(finished).toEqual(['clip', 'housing']);
    } finally {
      await lanes.close();
    }
  });

  // A nice value per thread is a Linux behaviour (elsewhere the threads share the process's).
  (process.platform === 'linux' ? test : test.skip)('the bulk threads run at the lower CPU priority, the quick one at the process\'s', async () => {
    const niceOfThreads = () =>
      readdirSync('/proc/self/task').map((t) => Number(readFileSync(`/proc/self/task/${t}/stat`, 'utf8').split(') ')[1].split(' ')[16]));
    const before = niceOfThreads().filter((n) => n === 7).length;
    const lanes = new MeshPool({ size: 2, bulkNice: 7, quickBytes: 64 * 1024 });
    try {
      const bytes = writeBinaryStl(demoLibrary()[0].mesh, 'clip');
      await Promise.all([lanes.measure(bytes, { filename: 'a.stl' }), lanes.measure(new Uint8Array(200_000), { filename: 'b.stl' })]);
      // Each thread lowers its priority as it loads; the second bulk thread may still be loading on a busy machine.
      const niced = () => niceOfThreads().filter((n) => n === 7).length - before;
      for (let i = 0; i < 300 && niced() < 2; i++) await new Promise((r) => setTimeout(r, 100));
      // Both bulk threads, and not the quick one (which has measured a file by now).
      expect(niced()).toBe(2);
    } finally {
      await lanes.close();
    }
  });
});
