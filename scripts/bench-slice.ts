/**
 * Slicing benchmark: the section area and contour at the middle of every
 * layer, from the meshes, for
 *   - a 10,000-triangle part (target: milliseconds),
 *   - each demo library part on all six sides,
 *   - a 1,000,000-triangle torus at 0.1 mm, in this thread and in a worker
 *     thread with the mesh transferred to it (target: a few seconds),
 *   - a 500-placement layout profile, with the slice cache cold and warm.
 * Prints milliseconds (median of several runs where it is cheap) and the
 * machine; nothing here is a pass/fail test.
 *
 *   npm run bench:slice
 */
import { cpus } from 'node:os';
import { performance } from 'node:perf_hooks';
import { Worker } from 'node:worker_threads';
import {
  demoLibrary,
  layoutProfiles,
  measureMesh,
  placementTransform,
  rotatedBox,
  rotationIndex,
  SliceCache,
  slicePart,
  torus,
  type MeshData,
} from '../shared/geometry';

const H = 0.1;
const SIDES = ['+x+y+z', '+x-y-z', '+x-z+y', '+x+z-y', '+y+z+x', '-y+z-x'].map(rotationIndex);

function median(values: number[]): number {
  const s = [...values].sort((a, b) => a - b);
  return s[Math.floor(s.length / 2)];
}

function time(fn: () => void, runs: number): number {
  fn(); // warm the JIT
  const ms: number[] = [];
  for (let i = 0; i < runs; i++) {
    const t0 = performance.now();
    fn();
    ms.push(performance.now() - t0);
  }
  return median(ms);
}

const WORKER_SOURCE = `
const { parentPort } = require('node:worker_threads');
require('tsx/cjs/api').register();
const { slicePart } = require(${JSON.stringify(require.resolve('../shared/geometry/slice'))});
parentPort.on('message', ({ positions, indices, rotation, layerHeightMm }) => {
  const t0 = performance.now();
  const p = slicePart({ positions, indices }, rotation, layerHeightMm);
  const sliceMs = performance.now() - t0;
  parentPort.postMessage({ areaMm2: p.areaMm2, contourMm: p.contourMm, sliceMs }, [p.areaMm2.buffer, p.contourMm.buffer]);
});
parentPort.postMessage('ready');
`;

async function inWorker(mesh: MeshData, rotation: number): Promise<{ totalMs: number; sliceMs: number; layers: number }> {
  const worker = new Worker(WORKER_SOURCE, { eval: true });
  try {
    await new Promise<void>((resolve, reject) => {
      worker.once('message', () => resolve());
      worker.once('error', reject);
    });
    // Copies, so the transfer leaves this thread's mesh usable for the next run.
    const positions = mesh.positions.slice();
    const indices = mesh.indices.slice();
    const t0 = performance.now();
    const reply = await new Promise<{ areaMm2: Float64Array; sliceMs: number }>((resolve, reject) => {
      worker.once('message', resolve);
      worker.once('error', reject);
      worker.postMessage({ positions, indices, rotation, layerHeightMm: H }, [positions.buffer, indices.buffer]);
    });
    return { totalMs: performance.now() - t0, sliceMs: reply.sliceMs, layers: reply.areaMm2.length };
  } finally {
    await worker.terminate();
  }
}

async function main(): Promise<void> {
  const cpu = cpus()[0];
  console.log(`machine: ${cpus().length} x ${cpu?.model ?? 'unknown cpu'}, node ${process.version}; layer height ${H} mm`);

  // 1. A 10,000-triangle part.
  const small = torus(30, 8, 100, 50);
  console.log(`\n10,000-triangle torus (${small.indices.length / 3} triangles), median of 20 runs:`);
  for (const [label, rotation] of [
    ['standing (160 layers)', rotationIndex('+x+y+z')],
    ['on its side (760 layers)', rotationIndex('+x-z+y')],
  ] as const) {
    console.log(`  ${label}: ${time(() => slicePart(small, rotation, H), 20).toFixed(2)} ms`);
  }

  // 2. The demo library, all six sides each.
  console.log('\ndemo parts, all six sides, median of 5 runs:');
  for (const part of demoLibrary()) {
    const ms = time(() => SIDES.forEach((r) => slicePart(part.mesh, r, H)), 5);
    console.log(`  ${part.name.padEnd(22)} ${String(part.mesh.indices.length / 3).padStart(6)} triangles: ${ms.toFixed(2)} ms for 6 profiles`);
  }

  // 3. A 1,000,000-triangle mesh.
  const big = torus(60, 20, 1000, 500);
  const volume = measureMesh(big).volumeMm3;
  console.log(`\n1,000,000-triangle torus (${big.indices.length / 3} triangles, ${big.positions.length / 3} vertices):`);
  for (const [label, rotation] of [
    ['standing', rotationIndex('+x+y+z')],
    ['on its side', rotationIndex('+x-z+y')],
  ] as const) {
    const t0 = performance.now();
    const p = slicePart(big, rotation, H);
    const ms = performance.now() - t0;
    const sliced = p.areaMm2.reduce((s, a) => s + a, 0) * H;
    console.log(
      `  ${label}: ${ms.toFixed(0)} ms in this thread, ${p.areaMm2.length} layers; ` +
        `sum(area) x h = ${sliced.toFixed(1)} mm3 vs mesh volume ${volume.toFixed(1)} mm3 (${(((sliced - volume) / volume) * 100).toFixed(3)} %)`,
    );
    const w = await inWorker(big, rotation);
    console.log(`  ${label}: ${w.totalMs.toFixed(0)} ms in a worker thread (slicing ${w.sliceMs.toFixed(0)} ms, the rest is the transfer)`);
  }

  // 4. A layout: 500 placements of the demo parts, in several rotations, at heights on and off the layer grid.
  const library = demoLibrary();
  const parts = library.map((p, i) => ({ key: `demo-${i}`, mesh: p.mesh }));
  const boxes = library.map((p) => measureMesh(p.mesh));
  const placements = Array.from({ length: 500 }, (_, i) => {
    const part = i % parts.length;
    const rotation = SIDES[i % SIDES.length];
    const position = [10 + (i % 10) * 30, 10 + (Math.floor(i / 10) % 10) * 30, 5 + Math.floor(i / 100) * 60 + (i % 7) * 0.037];
    const b = rotatedBox(rotation, boxes[part].bboxMinMm, boxes[part].bboxMaxMm);
    return {
      part,
      position,
      size: [0, 1, 2].map((a) => b.max[a] - b.min[a]),
      transform: placementTransform(rotation, boxes[part].bboxMinMm, boxes[part].bboxMaxMm, position),
    };
  });
  const layers = Math.ceil(Math.max(...placements.map((p) => p.position[2] + p.size[2])) / H) + 50;
  const cache = new SliceCache();
  let t0 = performance.now();
  const cold = layoutProfiles({ parts, placements, layerHeightMm: H, layers, cache });
  const coldMs = performance.now() - t0;
  t0 = performance.now();
  layoutProfiles({ parts, placements, layerHeightMm: H, layers, cache });
  const warmMs = performance.now() - t0;
  const partsVolume = placements.reduce((s, p) => s + boxes[p.part].volumeMm3, 0);
  const sliced = cold.areaProfile.reduce((s, a) => s + a, 0) * H;
  console.log(
    `\nlayout of ${placements.length} placements (${parts.length} parts, 6 sides, 7 phases), ${layers} layers:\n` +
      `  cold cache ${coldMs.toFixed(0)} ms (${cache.misses} slicings), warm cache ${warmMs.toFixed(1)} ms; ` +
      `sum(area) x h = ${sliced.toFixed(0)} mm3 vs parts' volume ${partsVolume.toFixed(0)} mm3 (${(((sliced - partsVolume) / partsVolume) * 100).toFixed(2)} %)`,
  );
}

void main();
