/**
 * Differential check of volume and area against manifold-3d (npm), the
 * reference library named for this: its Manifold.volume() and surfaceArea()
 * on the same triangles, run in a child process (scripts/lib/manifold-check.ts
 * runManifold: manifold-3d is an ES module with WebAssembly).
 */
import { demoLibrary, measureMesh, torus, type MeshData } from '../../../shared/geometry';
import { runManifold } from '../../../scripts/lib/manifold-check';
import { box, tetrahedron } from './helpers';

const SCRIPT = `
const cube = wasm.Manifold.cube([10, 20, 30]);
out = { cube: [cube.volume(), cube.surfaceArea()], meshes: [] };
for (const m of job) {
  const solid = solidOf(m);
  out.meshes.push({ status: String(solid.status()), volume: solid.volume(), area: solid.surfaceArea(), genus: solid.genus() });
}
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
  reference = runManifold<Reference>(
    SCRIPT,
    subjects.map((s) => ({ positions: Array.from(s.mesh.positions), indices: Array.from(s.mesh.indices) })),
  );
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
