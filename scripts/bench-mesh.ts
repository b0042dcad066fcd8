/**
 * Measuring benchmark: writes a 1,000,000-triangle binary STL (a finely
 * tessellated torus, 48 MB), then reads and measures it in-process and through
 * the server's worker pool, printing milliseconds and the process's peak RSS.
 * Also times the alternative edge count (a JS Map keyed on vertex pairs)
 * against the adjacency-list count the metrics use, and reads the same mesh
 * as a 3MF package.
 *
 * Then a plan of ten copies of it: its build file (3MF) and its build
 * sheet's views made in the worker pool, as the server makes them, with the
 * calling thread's longest stall meanwhile (what every other request would
 * wait), and the build file written on the calling thread for comparison.
 *
 *   npm run bench:mesh            (target: under 3 s for the file)
 */
import { mkdtempSync, readFileSync, rmSync, writeFileSync, statSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { monitorEventLoopDelay, performance } from 'node:perf_hooks';
import { measureMeshFile, measureMesh, parseStl, torus, translation, write3mf, writeBinaryStl } from '../shared/geometry';
import { closeMeshPool, measureFile } from '../server/mesh';
import { drawSheetViews, writeBuildFile } from '../server/mesh/pool';
import { buildFile, type PlanMeshFile, type PlanMeshItem } from '../server/mesh/planFiles';

const MAJOR = 1000;
const MINOR = 500; // 2 x 1000 x 500 = 1,000,000 triangles

function peakRssMb(): number {
  return process.resourceUsage().maxRSS / 1024;
}

/** Runs `work` while sampling the event loop: its wall time and the loop's longest stall (ms). */
async function stalls<T>(work: () => Promise<T> | T): Promise<{ value: T; ms: number; stallMs: number }> {
  const loop = monitorEventLoopDelay({ resolution: 5 });
  loop.enable();
  // The monitor records the time between its ticks; the first tick has none before it.
  await new Promise((resolve) => setTimeout(resolve, 20));
  const t0 = performance.now();
  const value = await work();
  const ms = performance.now() - t0;
  // One more turn of the loop, so a stall that ended the work is recorded.
  await new Promise((resolve) => setTimeout(resolve, 10));
  loop.disable();
  return { value, ms, stallMs: loop.max / 1e6 };
}

function mapEdgeCount(indices: Uint32Array, vertexCount: number): number {
  const uses = new Map<number, number>();
  for (let f = 0; f < indices.length; f += 3) {
    for (let k = 0; k < 3; k++) {
      const a = indices[f + k];
      const b = indices[f + (k + 1) % 3];
      const key = a < b ? a * vertexCount + b : b * vertexCount + a;
      uses.set(key, (uses.get(key) ?? 0) + 1);
    }
  }
  let open = 0;
  for (const n of uses.values()) if (n === 1) open++;
  return open;
}

async function main(): Promise<void> {
  const dir = mkdtempSync(path.join(tmpdir(), 'bench-mesh-'));
  const file = path.join(dir, 'torus-1m.stl');
  try {
    const rssAtStart = peakRssMb();
    let t0 = performance.now();
    writeFileSync(file, writeBinaryStl(torus(60, 20, MAJOR, MINOR), 'benchmark torus'));
    const fileMb = statSync(file).size / 1e6;
    console.log(`generated ${MAJOR * MINOR * 2} triangles, ${fileMb.toFixed(1)} MB binary STL in ${(performance.now() - t0).toFixed(0)} ms`);
    const rssAfterGenerate = peakRssMb();

    // The server's path first, so the peak RSS it reaches is not hidden by the in-process runs below.
    // A cold worker pays for starting the thread and loading the sources; the second file shows the steady state.
    for (const label of ['worker pool, first file (includes worker start)', 'worker pool, next file']) {
      t0 = performance.now();
      const result = await measureFile(file, { filename: 'torus-1m.stl' });
      const ms = performance.now() - t0;
      console.log(`${label}: ${ms.toFixed(0)} ms from the path on disk (${result.ok ? `${result.parts[0].metrics.triangles} triangles` : result.problems[0].code})`);
    }
    const rssAfterWorker = peakRssMb();
    console.log(
      `peak RSS: ${rssAtStart.toFixed(0)} MB at start, ${rssAfterGenerate.toFixed(0)} MB after generating, ` +
        `${rssAfterWorker.toFixed(0)} MB after measuring in the worker (+${(rssAfterWorker - rssAfterGenerate).toFixed(0)} MB, ` +
        `${((rssAfterWorker - rssAfterGenerate) / fileMb).toFixed(1)} x the file)`,
    );

    const stl = new Uint8Array(readFileSync(file));
    t0 = performance.now();
    const parsed = parseStl(stl, { filename: 'torus-1m.stl' });
    const parseMs = performance.now() - t0;
    if (!parsed.ok) throw new Error(parsed.problems[0].message);
    t0 = performance.now();
    const metrics = measureMesh(parsed.parts[0]);
    const metricsMs = performance.now() - t0;
    console.log(`in process: parse + weld ${parseMs.toFixed(0)} ms, metrics ${metricsMs.toFixed(0)} ms, total ${(parseMs + metricsMs).toFixed(0)} ms`);
    console.log(
      `  volume ${metrics.volumeMm3.toFixed(1)} mm3 (smooth torus 2 pi^2 R r^2 = ${(2 * Math.PI ** 2 * 60 * 400).toFixed(1)}), ` +
        `area ${metrics.areaMm2.toFixed(1)} mm2, watertight ${metrics.watertight}, oriented ${metrics.oriented}, shells ${metrics.shells}`,
    );

    t0 = performance.now();
    const whole = measureMeshFile(stl, { filename: 'torus-1m.stl' });
    console.log(`in process, measureMeshFile: ${(performance.now() - t0).toFixed(0)} ms (${whole.ok ? 'ok' : whole.problems[0].code})`);

    t0 = performance.now();
    const open = mapEdgeCount(parsed.parts[0].indices, parsed.parts[0].positions.length / 3);
    console.log(`alternative edge count with a JS Map: ${(performance.now() - t0).toFixed(0)} ms (${open} open edges), vs the whole metrics above`);

    // The same solid as a 3MF package (XML in a ZIP) for comparison with the binary STL.
    const threeMf = write3mf([{ ...parsed.parts[0], name: 'torus' }], [{ objectIndex: 0, transform: translation(0, 0, 0) }]);
    t0 = performance.now();
    const fromThreeMf = measureMeshFile(threeMf, { filename: 'torus-1m.3mf' });
    console.log(
      `3MF of the same mesh (${(threeMf.length / 1e6).toFixed(1)} MB zipped): measureMeshFile ${(performance.now() - t0).toFixed(0)} ms ` +
        `(${fromThreeMf.ok ? `${fromThreeMf.parts[0].metrics.triangles} triangles` : fromThreeMf.problems[0].code})`,
    );

    // A plan of ten copies side by side, as the server makes its build file and sheet (../server/services/export3mf.ts).
    // Held as the server's file store hands them out (server/storage: a SharedArrayBuffer), so the thread reads
    // them where they are; bytes of an ordinary buffer are copied on the way, which on this machine stalls the
    // calling thread about 150 ms for these 50 MB.
    const shared = new Uint8Array(new SharedArrayBuffer(stl.byteLength));
    shared.set(stl);
    const files: PlanMeshFile[] = [{ name: 'torus', bytes: shared, filename: 'torus-1m.stl', unit: 'mm', split: false, partIndex: 0, rotationDeg: [0, 0, 0] }];
    const items: PlanMeshItem[] = Array.from({ length: 10 }, (_, i) => ({ file: 0, orientation: 'xyz', position: [(i % 2) * 165, Math.floor(i / 2) * 165, 0] }));
    const pooled = await stalls(() => writeBuildFile({ files, items }));
    console.log(
      `build file of 10 placed copies (${(pooled.value.length / 1e6).toFixed(1)} MB) in the worker pool: ${pooled.ms.toFixed(0)} ms, ` +
        `the calling thread's longest stall ${pooled.stallMs.toFixed(0)} ms`,
    );
    const views = await stalls(() =>
      drawSheetViews({ files, items, chamber: [340, 840, 50], views: [{ axes: [0, 1], depthAxis: 2, nearer: 1, cellMm: 1 }], palette: [[52, 80, 110], [168, 194, 220]], background: [255, 255, 255], triangleLimit: 20_000_000 }),
    );
    console.log(`sheet's top view of them (1 mm cells) in the worker pool: ${views.ms.toFixed(0)} ms, the calling thread's longest stall ${views.stallMs.toFixed(0)} ms`);
    const inline = await stalls(() => buildFile({ files, items }));
    console.log(`the same build file written on the calling thread: ${inline.ms.toFixed(0)} ms, its longest stall ${inline.stallMs.toFixed(0)} ms`);
  } finally {
    await closeMeshPool();
    rmSync(dir, { recursive: true, force: true });
  }
}

void main();
