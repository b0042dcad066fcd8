/**
 * A layout by shape measured by a second, outside implementation: manifold-3d (npm), a general-purpose solid
 * modelling library, with its own geometry. Manifold.minGap(other, searchLength) gives the smallest distance
 * between two solids' surfaces (capped at searchLength), intersect(other).volume() the volume they share (a part
 * inside another shares all of its own), boundingBox() the extent. None of it goes through the project's
 * validator, slicer or trees. Used by the tests and by `npm run bench:pack -- --shapes`; `runManifold` runs the
 * geometry tests' own measures with the same library.
 *
 * The lift-out order (in reverse, each part rises straight up clear of the parts listed before it) is sampled
 * every 0.5 mm of the rise; a sample closer than 0.25 mm to another part counts as touching it. A wall thicker
 * than a step cannot be passed through between two samples (the generated parts' thinnest is 1.5 mm).
 *
 * manifold-3d ships as an ES module with WebAssembly, so it runs in a plain Node child process fed, as JSON, each
 * part's mesh once and each placement's 3MF transform (3MF Core, 3.3), which the library applies itself.
 */
import { spawnSync } from 'node:child_process';
import path from 'node:path';
import { shapeParts, usableRegion, type PackInstanceV2, type PackResultV2 } from '../../shared/packing';

const ROOT = path.join(__dirname, '../..');
export const LIFT_STEP_MM = 0.5;

/**
 * Runs `body` in a Node child process with manifold-3d loaded: it finds the JSON of `input` as `job`, the library
 * as `wasm` (set up), `solidOf({ positions, indices })` making a Manifold of a mesh (32-bit coordinates, as the
 * library stores them), and must leave its answer in `out`, which comes back parsed.
 */
export function runManifold<T>(body: string, input: unknown): T {
  const script = `
import Module from 'manifold-3d';
let text = '';
for await (const chunk of process.stdin) text += chunk;
const job = JSON.parse(text);
const wasm = await Module();
wasm.setup();
const solidOf = (m) => new wasm.Manifold(new wasm.Mesh({ numProp: 3, vertProperties: new Float32Array(m.positions), triVerts: new Uint32Array(m.indices) }));
let out;
${body}
process.stdout.write(JSON.stringify(out));
`;
  const run = spawnSync(process.execPath, ['--input-type=module', '-e', script], { cwd: ROOT, input: JSON.stringify(input), encoding: 'utf8', maxBuffer: 256 * 1024 * 1024 });
  if (run.status !== 0) throw new Error(`manifold-3d reference failed: ${run.stderr}`);
  return JSON.parse(run.stdout) as T;
}

const LAYOUT_SCRIPT = `
const parts = job.parts.map(solidOf);
// A 3MF transform (row vectors, p' = [x y z 1] M) as the library's column-major 4 x 4 matrix.
const solids = job.placements.map(({ part, m }) => parts[part].transform([m[0], m[1], m[2], 0, m[3], m[4], m[5], 0, m[6], m[7], m[8], 0, m[9], m[10], m[11], 1]));
const boxes = solids.map((s) => s.boundingBox());
const reach = job.spacing + 1e-3;
const near = (a, b) => [0, 1, 2].every((k) => a.min[k] < b.max[k] + reach && b.min[k] < a.max[k] + reach);
out = { status: solids.map((s) => String(s.status())), boxes: boxes.map((b) => [...b.min, ...b.max]), pairs: [], touches: [], liftPairs: 0 };
for (let i = 0; i < solids.length; i++) {
  for (let j = i + 1; j < solids.length; j++) {
    if (!near(boxes[i], boxes[j])) continue;
    // Every result of the library lives in its WebAssembly heap until deleted.
    const both = solids[i].intersect(solids[j]);
    out.pairs.push({ i, j, gap: solids[i].minGap(solids[j], job.spacing + 1), shared: both.volume() });
    both.delete();
  }
}
const step = job.liftStep;
for (let j = solids.length - 1; j >= 0; j--) {
  const a = boxes[j];
  for (let i = 0; i < j; i++) {
    const b = boxes[i];
    if (!(a.min[0] < b.max[0] && b.min[0] < a.max[0] && a.min[1] < b.max[1] && b.min[1] < a.max[1]) || b.max[2] <= a.min[2]) continue;
    out.liftPairs++;
    for (let t = step; t <= b.max[2] - a.min[2] + step; t += step) {
      const lifted = solids[j].translate([0, 0, t]);
      const gap = lifted.minGap(solids[i], step);
      lifted.delete();
      if (gap < step / 2) {
        out.touches.push({ lifted: j, hits: i, rise: t });
        break;
      }
    }
  }
}
`;

export interface Reference {
  status: string[];
  /** Per placement: min x y z, max x y z. */
  boxes: number[][];
  /** Every two placed meshes whose boxes come within the spacing: surface gap (capped at spacing + 1) and shared volume. */
  pairs: Array<{ i: number; j: number; gap: number; shared: number }>;
  touches: Array<{ lifted: number; hits: number; rise: number }>;
  /** Pairs the lift-out check had to follow (the later part's plan overlaps an earlier one reaching above its bottom). */
  liftPairs: number;
}

export function reference(instance: PackInstanceV2, result: PackResultV2): Reference {
  // Each part's mesh once, in its file coordinates; each placement its part and its 3MF transform, which the
  // library applies itself.
  const parts = shapeParts(instance);
  const index = new Map(parts.map((p, i) => [p.id, i]));
  return runManifold<Reference>(LAYOUT_SCRIPT, {
    spacing: instance.spacing,
    liftStep: LIFT_STEP_MM,
    // A mesh that is not closed counts as its box (as the contract's check takes it); one wound inside out is turned.
    parts: parts.map((p) => {
      const indices = Array.from(p.sliceMesh.indices);
      if (p.facing < 0) for (let t = 0; t < indices.length; t += 3) [indices[t + 1], indices[t + 2]] = [indices[t + 2], indices[t + 1]];
      return { positions: Array.from(p.sliceMesh.positions), indices };
    }),
    placements: result.placements.map((pl) => ({ part: index.get(pl.id), m: pl.transform })),
  });
}

/** The stored coordinates are 32-bit floats in the reference: about 2e-5 mm at 200 mm. */
export const FLOAT32_MM = 1e-4;

/** The largest face of a box given as [min x, y, z, max x, y, z] (mm^2). */
function largestFace(b: readonly number[]): number {
  const [x, y, z] = [b[3] - b[0], b[4] - b[1], b[5] - b[2]];
  return Math.max(x * y, y * z, z * x);
}

/** What the reference finds wrong with a layout, in words; empty when it finds nothing. */
export function referenceFaults(instance: PackInstanceV2, ref: Reference): string[] {
  const faults: string[] = [];
  ref.status.forEach((s, i) => {
    if (s !== 'NoError') faults.push(`placement ${i}: manifold-3d does not take the mesh as a solid (${s})`);
  });
  const u = usableRegion(instance);
  ref.boxes.forEach((b, i) => {
    for (let k = 0; k < 3; k++) {
      if (b[k] < u.min[k] - FLOAT32_MM || b[k + 3] > u.max[k] + FLOAT32_MM) faults.push(`placement ${i} leaves the usable region along ${'xyz'[k]}`);
    }
  });
  for (const p of ref.pairs) {
    if (p.gap < instance.spacing - FLOAT32_MM) faults.push(`placements ${p.i} and ${p.j} are ${p.gap.toFixed(4)} mm apart`);
    // Solids that only touch (no spacing asked) may share a sliver as thick as their float32 coordinates' rounding
    // over the face they touch on: at most FLOAT32_MM times the larger face of the smaller box.
    if (p.shared > FLOAT32_MM * Math.min(largestFace(ref.boxes[p.i]), largestFace(ref.boxes[p.j]))) faults.push(`placements ${p.i} and ${p.j} share ${p.shared.toFixed(3)} mm^3`);
  }
  for (const t of ref.touches) faults.push(`placement ${t.lifted}, lifted ${t.rise} mm, touches placement ${t.hits}`);
  return faults;
}
