/**
 * The packing by shape checked by a second, outside implementation: manifold-3d (npm), a general-purpose solid
 * modelling library, measures the engine's layouts with its own geometry. Manifold.minGap(other, searchLength)
 * gives the smallest distance between two solids' surfaces (capped at searchLength), intersect(other).volume()
 * the volume they share (a part inside another shares all of its own), boundingBox() the extent. None of it goes
 * through the project's validator, slicer or trees, so the spec's shape rules are checked twice, independently:
 * - every placed mesh inside the usable region;
 * - every two placed meshes at least the spacing apart, and neither inside the other;
 * - the lift-out order: in reverse, each part rises straight up clear of the parts listed before it. The rise is
 *   sampled every 0.5 mm; a sample closer than 0.25 mm to another part counts as touching it. The thinnest wall
 *   of these parts is 1.5 mm, more than a step, so a rise that passes through a wall has a sample inside it.
 * manifold-3d ships as an ES module with WebAssembly, so it runs in a plain Node child process fed the placed
 * meshes (in chamber coordinates, through each placement's 3MF transform) as JSON. The hand-made wrong layouts
 * at the end show that the reference finds each fault, and that the project's validator names the same.
 */
import { spawnSync } from 'node:child_process';
import path from 'node:path';
import { housing } from '@/shared/geometry';
import {
  createShapePacking,
  generateShapeMix,
  shapeParts,
  summariseShapeLayout,
  usableRegion,
  validateShapeLayout,
  type PackInstanceV2,
  type PackResultV2,
} from '@/shared/packing';
import { box } from '../../geometry/helpers';
import { shapeInstance } from './instance';

const ROOT = path.join(__dirname, '../../../..');
const LIFT_STEP = 0.5;

const SCRIPT = `
import Module from 'manifold-3d';
let input = '';
for await (const chunk of process.stdin) input += chunk;
const job = JSON.parse(input);
const wasm = await Module();
wasm.setup();
const solids = job.meshes.map((m) => new wasm.Manifold(new wasm.Mesh({ numProp: 3, vertProperties: new Float32Array(m.positions), triVerts: new Uint32Array(m.indices) })));
const boxes = solids.map((s) => s.boundingBox());
const reach = job.spacing + 1e-3;
const near = (a, b) => [0, 1, 2].every((k) => a.min[k] < b.max[k] + reach && b.min[k] < a.max[k] + reach);
const out = { status: solids.map((s) => String(s.status())), boxes: boxes.map((b) => [...b.min, ...b.max]), pairs: [], touches: [], liftPairs: 0 };
for (let i = 0; i < solids.length; i++) {
  for (let j = i + 1; j < solids.length; j++) {
    if (!near(boxes[i], boxes[j])) continue;
    out.pairs.push({ i, j, gap: solids[i].minGap(solids[j], job.spacing + 1), shared: solids[i].intersect(solids[j]).volume() });
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
      const gap = solids[j].translate([0, 0, t]).minGap(solids[i], step);
      if (gap < step / 2) {
        out.touches.push({ lifted: j, hits: i, rise: t });
        break;
      }
    }
  }
}
process.stdout.write(JSON.stringify(out));
`;

interface Reference {
  status: string[];
  /** Per placement: min x y z, max x y z. */
  boxes: number[][];
  /** Every two placed meshes whose boxes come within the spacing: surface gap (capped at spacing + 1) and shared volume. */
  pairs: Array<{ i: number; j: number; gap: number; shared: number }>;
  touches: Array<{ lifted: number; hits: number; rise: number }>;
  /** Pairs the lift-out check had to follow (the later part's plan overlaps an earlier one reaching above its bottom). */
  liftPairs: number;
}

/** The placed meshes in chamber coordinates: p' = [x y z 1] M, M the placement's 12 numbers (3MF Core, 3.3). */
function placedMeshes(instance: PackInstanceV2, result: PackResultV2): Array<{ positions: number[]; indices: number[] }> {
  const parts = new Map(shapeParts(instance).map((p) => [p.id, p.mesh]));
  return result.placements.map((pl) => {
    const mesh = parts.get(pl.id)!;
    const m = pl.transform!;
    const positions: number[] = [];
    for (let k = 0; k < mesh.positions.length; k += 3) {
      const [x, y, z] = [mesh.positions[k], mesh.positions[k + 1], mesh.positions[k + 2]];
      positions.push(x * m[0] + y * m[3] + z * m[6] + m[9], x * m[1] + y * m[4] + z * m[7] + m[10], x * m[2] + y * m[5] + z * m[8] + m[11]);
    }
    return { positions, indices: Array.from(mesh.indices) };
  });
}

function reference(instance: PackInstanceV2, result: PackResultV2): Reference {
  const input = JSON.stringify({ spacing: instance.spacing, liftStep: LIFT_STEP, meshes: placedMeshes(instance, result) });
  const run = spawnSync(process.execPath, ['--input-type=module', '-e', SCRIPT], { cwd: ROOT, input, encoding: 'utf8', maxBuffer: 256 * 1024 * 1024 });
  if (run.status !== 0) throw new Error(`manifold-3d reference failed: ${run.stderr}`);
  return JSON.parse(run.stdout);
}

/** The stored coordinates are 32-bit floats in the reference: about 2e-5 mm at 200 mm. */
const FLOAT32_MM = 1e-4;

function expectValidByReference(instance: PackInstanceV2, result: PackResultV2, ref: Reference): void {
  expect(new Set(ref.status)).toEqual(new Set(['NoError']));
  const u = usableRegion(instance);
  for (const b of ref.boxes) {
    for (let k = 0; k < 3; k++) {
      expect(b[k]).toBeGreaterThanOrEqual(u.min[k] - FLOAT32_MM);
      expect(b[k + 3]).toBeLessThanOrEqual(u.max[k] + FLOAT32_MM);
    }
  }
  const closest = Math.min(...ref.pairs.map((p) => p.gap));
  expect(closest).toBeGreaterThanOrEqual(instance.spacing - FLOAT32_MM);
  expect(Math.max(...ref.pairs.map((p) => p.shared))).toBe(0);
  expect(ref.touches).toEqual([]);
}

describe('layouts by shape, measured by manifold-3d', () => {
  // Generated concave mixes in a chamber small enough that parts go into each other's hollows; the runs are capped,
  // so the layouts are the same on any machine.
  test.each([
    [100, 1],
    [80, 3],
  ])('%i parts (mix %i): in the region, every two surfaces the spacing apart, none inside another, lifted out in order', (parts, seed) => {
    const instance = generateShapeMix({ parts, seed, chamber: [200, 200, 300], fit: 'shape', timeLimitMs: 60_000 });
    const result = createShapePacking(instance, { maxRuns: 3 }).runSync();
    expect(result.unplaced).toEqual([]);
    expect(result.placements).toHaveLength(parts);
    const ref = reference(instance, result);
    // The layout is nested: the check has parts in others' hollows to follow, not only boxes side by side.
    const inside = result.placements.filter((p, j) =>
      result.placements.some((q, i) => i !== j && [0, 1].every((k) => p.position[k] >= q.position[k] && p.position[k] + p.size[k] <= q.position[k] + q.size[k]) && p.position[2] >= q.position[2] && p.position[2] < q.position[2] + q.size[2]),
    );
    expect(inside.length).toBeGreaterThanOrEqual(10);
    expect(ref.liftPairs).toBeGreaterThanOrEqual(inside.length);
    // Some pair stands at the spacing itself (the packing closes the gaps it may), within 32-bit rounding.
    expect(Math.min(...ref.pairs.map((p) => p.gap))).toBeLessThan(instance.spacing + 0.01);
    expectValidByReference(instance, result, ref);
    expect(validateShapeLayout(instance, result)).toEqual([]);
  }, 120_000);
});

describe('wrong layouts: the reference finds each fault, and the validator names the same', () => {
  // An open housing, 60 x 40 x 25 mm outside, walls and floor 2 mm, and a 10 mm cube; 3 mm spacing.
  const holder = housing({ lengthMm: 60, widthMm: 40, heightMm: 25, wallMm: 2, floorMm: 2, cornerRadiusMm: 4, cornerSegments: 6 });
  const inst = shapeInstance(
    [
      { id: 'housing', mesh: holder, quantity: 1, orientations: ['upright'] },
      { id: 'cube', mesh: box(10, 10, 10), quantity: 1 },
    ],
    3,
  );
  const place = (items: Array<[string, [number, number, number]]>) => summariseShapeLayout(inst, items.map(([id, position]) => ({ id, rotation: 0, position })));
  const H: [number, number, number] = [20, 20, 0];

  test('the cube on the housing floor, 3 mm from the wall and the floor: valid by both', () => {
    const r = place([['housing', H], ['cube', [20 + 2 + 3, 20 + 15, 2 + 3]]]);
    const ref = reference(inst, r);
    expectValidByReference(inst, r, ref);
    expect(ref.liftPairs).toBe(1);
    expect(ref.pairs[0].gap).toBeCloseTo(3, 4);
    expect(validateShapeLayout(inst, r)).toEqual([]);
  });

  test('the cube 2 mm from the inner wall: the reference measures 2 mm, the validator says too close', () => {
    const r = place([['housing', H], ['cube', [20 + 2 + 2, 20 + 15, 2 + 3]]]);
    const ref = reference(inst, r);
    expect(ref.pairs[0].gap).toBeCloseTo(2, 4);
    expect(ref.pairs[0].shared).toBe(0);
    expect(validateShapeLayout(inst, r).map((p) => p.message).join()).toMatch(/only 2\.000000 mm from/);
  });

  test('the cube through the wall: they share the 2 x 10 x 10 mm of wall in the cube, and the validator refuses it', () => {
    const r = place([['housing', H], ['cube', [20 - 5, 20 + 15, 5]]]);
    const ref = reference(inst, r);
    // The cube reaches 5 mm past the housing's outer face at x = 20, through the 2 mm wall and 3 mm into the hollow:
    // it shares 2 x 10 x 10 mm of the wall.
    expect(ref.pairs[0].shared).toBeCloseTo(200, 3);
    expect(ref.pairs[0].gap).toBe(0);
    expect(validateShapeLayout(inst, r).length).toBeGreaterThan(0);
  });

  test('the cube inside the housing listed first: the housing, lifted first, takes the cube with it; both say so', () => {
    const r = place([['cube', [20 + 2 + 3, 20 + 15, 2 + 3]], ['housing', H]]);
    const ref = reference(inst, r);
    expect(ref.pairs[0].gap).toBeCloseTo(3, 4);
    // The housing's floor meets the cube's underside after a rise of 3 mm (the spacing under it).
    expect(ref.touches).toHaveLength(1);
    expect(ref.touches[0].rise).toBeGreaterThan(2.5);
    expect(ref.touches[0].rise).toBeLessThanOrEqual(3.5);
    expect(validateShapeLayout(inst, r).map((p) => `${p.field} ${p.message}`).join()).toMatch(/lift|order/i);
  });
});
