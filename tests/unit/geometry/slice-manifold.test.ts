/**
 * Cavalieri's principle against an outside measure: the sections at the middle
 * of every layer, times the layer height, add up to the solid's volume as
 * manifold-3d (npm, the reference library for mesh volume) measures it, within
 * the slicing error, run in a child process (scripts/lib/manifold-check.ts
 * runManifold: manifold-3d is an ES module with WebAssembly).
 *
 * The slicing error bound (see slicingErrorBoundMm3): within one layer the
 * section area changes by at most the horizontal projection of the surface in
 * that layer (divergence theorem on the slab), so the layer sum is off by at
 * most h x the summed |projected area| of the triangles.
 */
import { demoLibrary, slicePart, slicingErrorBoundMm3, torus, upAxisOfRotation, rotationIndex, type MeshData } from '../../../shared/geometry';
import { runManifold } from '../../../scripts/lib/manifold-check';
import { uvSphere } from './solids';

const SCRIPT = `
out = job.map((m) => {
  const solid = solidOf(m);
  return { status: String(solid.status()), volume: solid.volume() };
});
`;

/** Rounds positions to float32, as the reference library stores them, so both measure the same solid. */
function asFloat32(mesh: MeshData): MeshData {
  return { positions: Float64Array.from(Float32Array.from(mesh.positions)), indices: mesh.indices };
}

const subjects: { name: string; mesh: MeshData }[] = [
  { name: 'torus 30 / 8', mesh: torus(30, 8, 96, 48) },
  { name: 'sphere r 15', mesh: uvSphere(15, 64, 32) },
  ...demoLibrary().map((p) => ({ name: p.name, mesh: p.mesh })),
].map((s) => ({ name: s.name, mesh: asFloat32(s.mesh) }));

/** One rotation for each of the six up axes: part +z, -z, +y, -y, +x, -x up. */
const UPS = ['+x+y+z', '+x-y-z', '+x-z+y', '+x+z-y', '+y+z+x', '-y+z-x'].map(rotationIndex);

let reference: { status: string; volume: number }[];

beforeAll(() => {
  reference = runManifold<{ status: string; volume: number }[]>(
    SCRIPT,
    subjects.map((s) => ({ positions: Array.from(s.mesh.positions), indices: Array.from(s.mesh.indices) })),
  );
}, 60_000);

test('the six up axes are six different ones', () => {
  const seen = new Set(UPS.map((r) => JSON.stringify(upAxisOfRotation(r))));
  expect(seen.size).toBe(6);
});

test.each(subjects.map((s, i) => [s.name, i]))('%s: sum(area) x 0.1 mm is its manifold-3d volume within the slicing error, on each of its six sides', (_name, i) => {
  const { mesh } = subjects[i as number];
  const ref = reference[i as number];
  expect(ref.status).toBe('NoError');
  const h = 0.1;
  for (const rotation of UPS) {
    const p = slicePart(mesh, rotation, h);
    const sliced = p.areaMm2.reduce((s, a) => s + a, 0) * h;
    const bound = slicingErrorBoundMm3(mesh, upAxisOfRotation(rotation), h);
    expect(Math.abs(sliced - ref.volume)).toBeLessThanOrEqual(bound);
    // The bound is loose; the layer sums are far closer in practice. A sign slip or a lost triangle would not be.
    expect(Math.abs(sliced - ref.volume) / ref.volume).toBeLessThan(0.02);
  }
});

test('finer layers come closer: the torus at 0.4, 0.1 and 0.025 mm', () => {
  const { mesh } = subjects[0];
  const volume = reference[0].volume;
  const errors = [0.4, 0.1, 0.025].map((h) => Math.abs(slicePart(mesh, 0, h).areaMm2.reduce((s, a) => s + a, 0) * h - volume));
  expect(errors[1]).toBeLessThan(errors[0]);
  expect(errors[2]).toBeLessThan(errors[1]);
});
