/**
 * Differential check of volume and area against manifold-3d (npm), the
 * reference library named for this: its Manifold.volume() and surfaceArea()
 * on the same triangles. manifold-3d ships as an ES module with WebAssembly,
 * so it runs in a plain Node child process fed the meshes as JSON.
 */
import { spawnSync } from 'node:child_process';
import path from 'node:path';
import { demoLibrary, measureMesh, torus, type MeshData } from '../../../shared/geometry';
import { box, tetrahedron } from './helpers';

const ROOT = path.join(__dirname, '../../..');

const SCRIPT = `
import Module from 'manifold-3d';
let input = '';
for await (const chunk of process.stdin) input += chunk;
const meshes = JSON.parse(input);
const wasm = await Module();
wasm.setup();
const cube = wasm.Manifold.cube([10, 20, 30]);
const out = { cube: [cube.volume(), cube.surfaceArea()], meshes: [] };
for (const m of meshes) {
  const mesh = new wasm.Mesh({ numProp: 3, vertProperties: new Float32Array(m.positions), triVerts: new Uint32Array(m.indices) });
  const solid = new wasm.Manifold(mesh);
  out.meshes.push({ status: String(solid.status()), volume: solid.volume(), area: solid.surfaceArea(), genus: solid.genus() });
}
process.stdout.write(JSON.stringify(out));
`;

interface Reference {
  cube: [number, number];
  meshes: { status: string; volume: number; area: number; genus: number }[];
}

/** Rounds positions to float32, as the reference library stores them, so both measure the same solid. */
function asFloat32(mesh: MeshData): MeshData {
  return { positions: Float64Array.from(Float32Array.from(mesh.positions)), indices: mesh.indices };
}

const subjects: { name: string; mesh: MeshData }[] = [
  { name: 'tetrahedron', mesh: tetrahedron() },
  { name: 'box 10 x 20 x 30', mesh: box(10, 20, 30) },
  { name: 'torus', mesh: torus(30, 8, 96, 48) },
  ...demoLibrary().map((p) => ({ name: p.name, mesh: p.mesh })),
].map((s) => ({ name: s.name, mesh: asFloat32(s.mesh) }));

let reference: Reference;

beforeAll(() => {
  const input = JSON.stringify(subjects.map((s) => ({ positions: Array.from(s.mesh.positions), indices: Array.from(s.mesh.indices) })));
  const run = spawnSync(process.execPath, ['--input-type=module', '-e', SCRIPT], { cwd: ROOT, input, encoding: 'utf8', maxBuffer: 64 * 1024 * 1024 });
  if (run.status !== 0) throw new Error(`manifold-3d reference failed: ${run.stderr}`);
  reference = JSON.parse(run.stdout);
}, 60_000);

test('the reference library gives 6000 and 2200 for Manifold.cube([10, 20, 30]) (manifold-3d documentation)', () => {
  expect(reference.cube[0]).toBeCloseTo(6000, 9);
  expect(reference.cube[1]).toBeCloseTo(2200, 9);
  const m = measureMesh(box(10, 20, 30));
  expect(m.volumeMm3).toBeCloseTo(reference.cube[0], 9);
  expect(m.areaMm2).toBeCloseTo(reference.cube[1], 9);
});

describe.each(subjects.map((s, i) => [s.name, i] as const))('%s', (_name, i) => {
  test('is accepted by manifold-3d as a valid manifold', () => {
    expect(reference.meshes[i].status).toBe('NoError');
  });

  test('volume and surface area agree with manifold-3d volume() and surfaceArea()', () => {
    const m = measureMesh(subjects[i].mesh);
    const r = reference.meshes[i];
    expect(Math.abs(m.volumeMm3 - r.volume) / r.volume).toBeLessThan(1e-6);
    expect(Math.abs(m.areaMm2 - r.area) / r.area).toBeLessThan(1e-6);
  });

  test('V - E + F matches the genus manifold-3d reports (Euler: 2 - 2g)', () => {
    expect(measureMesh(subjects[i].mesh).eulerCharacteristic).toBe(2 - 2 * reference.meshes[i].genus);
  });
});
